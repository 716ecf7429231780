import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { DATA_SOURCE_TYPES } from '@schema-strata/adapter-typeorm';
import { compareWithOracle, oracle } from './oracle.js';
import { runAdapter } from './harness.js';

const require = createRequire(import.meta.url);

/**
 * Finding the entities as the data source says (read statically), the naming strategy and the
 * options it sets; checked against TypeORM's metadata for the options TypeORM would get.
 */

const ENTITY = (cls: string, table?: string, extra = ''): string => `import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';

@Entity(${table ? `'${table}'` : ''})
export class ${cls} {
  @PrimaryGeneratedColumn()
  id: number;

  @Column()
  displayName: string;
${extra}}
`;

const TSCONFIG = '{ "compilerOptions": { "experimentalDecorators": true, "emitDecoratorMetadata": true, "outDir": "dist", "rootDir": "src" } }\n';

const tableNames = (r: Awaited<ReturnType<typeof runAdapter>>): string[] => r.snapshot!.tables.map((t) => t.name).sort();

describe('entities selected by the data source', () => {
  it('takes the entities a glob names, mapping compiled output back to the sources', async () => {
    const files = {
      'package.json': '{ "name": "coop" }',
      'tsconfig.json': TSCONFIG,
      'src/data-source.ts': "import { DataSource } from 'typeorm';\nexport default new DataSource({ type: 'postgres', entities: ['dist/entity/**/*.js'], migrations: ['dist/migrations/*.js'] });\n",
      'src/entity/member.ts': ENTITY('Member', 'members'),
      'src/entity/tool.ts': ENTITY('Tool'),
      'src/scratch/old-member.ts': ENTITY('OldMember', 'old_members'),
    };
    const r = await runAdapter(files);
    expect(tableNames(r)).toEqual(['members', 'tool']);
    expect(r.located.files).toEqual(['src/data-source.ts', 'src/entity/member.ts', 'src/entity/tool.ts', 'tsconfig.json']);
    expect(r.located.consulted).toEqual(['package.json']);
  });

  it('reads __dirname globs, classes listed by name, and leaves test entities out', async () => {
    const files = {
      'package.json': '{}',
      'src/config/db.ts': "import { DataSource } from 'typeorm';\nimport { Loan } from '../lending/loan';\nexport const db = new DataSource({ type: 'postgres', entities: [__dirname + '/../catalog/*.entity.{ts,js}', Loan], synchronize: false });\n",
      'src/catalog/tool.entity.ts': ENTITY('Tool'),
      'src/catalog/tag.entity.ts': ENTITY('Tag'),
      'src/catalog/helper.ts': ENTITY('NotListed'),
      'src/lending/loan.ts': ENTITY('Loan'),
      'src/lending/fee.ts': ENTITY('Fee'),
    };
    const r = await runAdapter(files);
    expect(tableNames(r)).toEqual(['loan', 'tag', 'tool']);
  });

  it('takes the files --path names (and what they follow) instead of a data source', async () => {
    const files = {
      'src/data-source.ts': "import { DataSource } from 'typeorm';\nexport const ds = new DataSource({ type: 'postgres', entities: ['src/**/*.ts'] });\n",
      'src/base.ts': "import { PrimaryGeneratedColumn } from 'typeorm';\nexport abstract class Row {\n  @PrimaryGeneratedColumn()\n  id: number;\n}\n",
      'src/a/member.ts': "import { Column, Entity } from 'typeorm';\nimport { Row } from '../base';\n@Entity()\nexport class Member extends Row {\n  @Column()\n  name: string;\n}\n",
      'src/b/tool.ts': ENTITY('Tool'),
    };
    const r = await runAdapter(files, {}, ['src/a/member.ts']);
    expect(r.located.files).toEqual(['src/a/member.ts', 'src/base.ts']);
    expect(r.snapshot!.tables.map((t) => `${t.name}(${t.columns.map((c) => c.name).join(',')})`)).toEqual(['member(id,name)']);
  });

  it('reads ormconfig.json and the TYPEORM_ENTITIES of ormconfig.env', async () => {
    const json = await runAdapter({
      'ormconfig.json': '{ "type": "postgres", "entities": ["src/model/*.ts"] }',
      'src/model/member.ts': ENTITY('Member'),
      'src/other/member.ts': ENTITY('Other'),
    });
    expect(tableNames(json)).toEqual(['member']);
    const env = await runAdapter({
      'ormconfig.env': 'TYPEORM_CONNECTION = postgres\nTYPEORM_ENTITIES = src/model/*.ts\n',
      'src/model/member.ts': ENTITY('Member'),
      'src/other/member.ts': ENTITY('Other'),
    });
    expect(tableNames(env)).toEqual(['member']);
  });

  it('takes every entity when the data source loads them elsewhere (autoLoadEntities), but not test entities', async () => {
    const r = await runAdapter({
      'src/app.module.ts': "import { TypeOrmModule } from '@nestjs/typeorm';\nexport const imports = [TypeOrmModule.forRoot({ type: 'postgres', autoLoadEntities: true })];\n",
      'src/member/member.entity.ts': ENTITY('Member'),
      'src/tool/tool.entity.ts': ENTITY('Tool'),
      'test/fixtures/probe.entity.ts': ENTITY('Probe'),
      'src/member/member.entity.spec.ts': ENTITY('SpecOnly'),
    });
    expect(tableNames(r)).toEqual(['member', 'tool']);
  });

  it('reads the sources, not compiled output committed beside them, and follows only what a configuration names', async () => {
    const compiled = "\"use strict\";\nconst typeorm_1 = require(\"typeorm\");\nlet Tool = class Tool {};\nTool = __decorate([(0, typeorm_1.Entity)()], Tool);\nexports.Tool = Tool;\n";
    const r = await runAdapter({
      'src/tool.entity.ts': ENTITY('Tool'),
      'dist/tool.entity.js': compiled,
      'src/container.ts': "import { createConnection, Repository } from 'typeorm';\nimport { Tool } from './tool.entity';\nimport { Mailer } from './mailer';\nimport { ToolService } from './tool.service';\nexport const boot = () => createConnection({ type: 'mysql', entities: [Tool], synchronize: false });\nexport const services = [Mailer, ToolService];\n",
      'src/mailer.ts': 'export class Mailer {}\n',
      'src/tool.service.ts': "import { Repository } from 'typeorm';\nimport { Tool } from './tool.entity';\nexport class ToolService { constructor(private readonly tools: Repository<Tool>) {} }\n",
    });
    expect(r.located.files).toEqual(['src/container.ts', 'src/tool.entity.ts']);
    expect(r.snapshot!.tables[0]!.columns.find((c) => c.name === 'displayName')!.type).toEqual({ kind: 'string', length: 255 });
  });

  it('reports a MongoDB data source as unsupported, and leaves MongoDB entities out of a relational one', async () => {
    const mongo = await runAdapter({
      'src/data-source.ts': "import { DataSource } from 'typeorm';\nexport const ds = new DataSource({ type: 'mongodb', entities: ['src/**/*.ts'] });\n",
      'src/member.ts': ENTITY('Member'),
    });
    expect(mongo.failed).toBe(true);
    expect(mongo.diagnostics.map((d) => d.code)).toContain('typeorm/mongodb-unsupported');
    const mixed = await runAdapter({
      'src/member.ts': ENTITY('Member'),
      'src/log.ts': "import { Entity, ObjectIdColumn, ObjectId } from 'typeorm';\n@Entity()\nexport class Log {\n  @ObjectIdColumn()\n  id: ObjectId;\n}\n",
    });
    expect(tableNames(mixed)).toEqual(['member']);
    expect(mixed.diagnostics.map((d) => d.code)).toContain('typeorm/mongodb-entity');
  });
});

describe('naming strategy and options of the data source', () => {
  const RELATED = {
    'src/member.ts': "import { Column, Entity, OneToMany, PrimaryGeneratedColumn } from 'typeorm';\nimport { ToolLoan } from './loan';\n@Entity()\nexport class CoopMember {\n  @PrimaryGeneratedColumn()\n  memberId: number;\n\n  @Column()\n  fullName: string;\n\n  @OneToMany(() => ToolLoan, (l) => l.borrowedBy)\n  loans: ToolLoan[];\n}\n",
    'src/loan.ts': "import { Column, Entity, JoinTable, ManyToMany, ManyToOne, PrimaryGeneratedColumn } from 'typeorm';\nimport { CoopMember } from './member';\n@Entity()\nexport class ToolLoan {\n  @PrimaryGeneratedColumn()\n  id: number;\n\n  @Column({ type: 'timestamp' })\n  dueAt: Date;\n\n  @ManyToOne(() => CoopMember, (m) => m.loans)\n  borrowedBy: CoopMember;\n\n  @ManyToMany(() => CoopMember)\n  @JoinTable()\n  witnessedBy: CoopMember[];\n}\n",
  };

  it("detects the community snake-case strategy and agrees with TypeORM running it", async () => {
    const files = {
      ...RELATED,
      'src/data-source.ts': "import { DataSource } from 'typeorm';\nimport { SnakeNamingStrategy } from 'typeorm-naming-strategies';\nexport const ds = new DataSource({ type: 'postgres', entities: ['src/*.ts'], namingStrategy: new SnakeNamingStrategy() });\n",
    };
    const r = await runAdapter(files);
    const theirs = await oracle(RELATED, { naming: 'snake' });
    expect(compareWithOracle(r.snapshot!, theirs)).toEqual([]);
    expect(tableNames(r)).toEqual(['coop_member', 'tool_loan', 'tool_loan_witnessed_by_coop_member']);
    expect(r.snapshot!.tables.find((t) => t.name === 'tool_loan')!.columns.map((c) => c.name)).toContain('borrowed_by_member_id');
  });

  it("detects a project's own snake-case class, and takes TypeORM's default for an unknown strategy (with a diagnostic)", async () => {
    const own = await runAdapter({
      ...RELATED,
      'src/naming.ts': "import { DefaultNamingStrategy, NamingStrategyInterface } from 'typeorm';\nimport { snakeCase } from 'typeorm/util/StringUtils';\nexport class CoopNaming extends DefaultNamingStrategy implements NamingStrategyInterface {\n  tableName(className: string, customName?: string): string {\n    return customName ? customName : snakeCase(className);\n  }\n  columnName(propertyName: string, customName: string | undefined, prefixes: string[]): string {\n    return snakeCase(prefixes.concat('').join('_')) + (customName ? customName : snakeCase(propertyName));\n  }\n}\n",
      'src/data-source.ts': "import { DataSource } from 'typeorm';\nimport { CoopNaming } from './naming';\nexport const ds = new DataSource({ type: 'postgres', entities: ['src/*.ts'], namingStrategy: new CoopNaming() });\n",
    });
    expect(own.snapshot!.tables.find((t) => t.name === 'coop_member')!.columns.map((c) => c.name)).toContain('full_name');
    const odd = await runAdapter({
      ...RELATED,
      'src/naming.ts': "import { DefaultNamingStrategy } from 'typeorm';\nexport class UpperNaming extends DefaultNamingStrategy {\n  tableName(className: string): string {\n    return className.toUpperCase();\n  }\n}\n",
      'src/data-source.ts': "import { DataSource } from 'typeorm';\nimport { UpperNaming } from './naming';\nexport const ds = new DataSource({ type: 'postgres', entities: ['src/*.ts'], namingStrategy: new UpperNaming() });\n",
    });
    expect(odd.diagnostics.map((d) => d.code)).toContain('typeorm/unknown-naming-strategy');
    expect(tableNames(odd)).toContain('coop_member');
    // one chosen at run time is said to be so
    const chosen = await runAdapter({
      ...RELATED,
      'src/data-source.ts': "import { DataSource, DefaultNamingStrategy } from 'typeorm';\nimport { SnakeNamingStrategy } from 'typeorm-naming-strategies';\nexport const ds = new DataSource({ type: 'postgres', entities: ['src/*.ts'], namingStrategy: process.env.COOP_DB === 'postgres' ? new SnakeNamingStrategy() : new DefaultNamingStrategy() });\n",
    });
    expect(chosen.diagnostics.map((d) => [d.code, d.message])).toEqual([
      ['typeorm/unknown-naming-strategy', "the naming strategy (?:) depends on run-time configuration; TypeORM's default naming is used (set --typeorm-naming default|snake)"],
    ]);
    expect(chosen.snapshot!.tables.find((t) => t.name === 'tool_loan')!.columns.map((c) => c.name)).toContain('dueAt');
    // (a member of a global in the condition is not known either: it may be unset)
    const flag = await runAdapter({
      ...RELATED,
      'src/data-source.ts': "import { DataSource, DefaultNamingStrategy } from 'typeorm';\nimport { SnakeNamingStrategy } from 'typeorm-naming-strategies';\nexport const ds = new DataSource({ type: 'postgres', entities: ['src/*.ts'], namingStrategy: process.env.COOP_SNAKE ? new SnakeNamingStrategy() : new DefaultNamingStrategy() });\n",
    });
    expect(flag.diagnostics.map((d) => d.code)).toEqual(['typeorm/unknown-naming-strategy']);
    const forced = await runAdapter(RELATED, { 'typeorm-naming': 'snake' });
    expect(forced.snapshot!.tables.find((t) => t.name === 'tool_loan')!.columns.map((c) => c.name)).toContain('due_at');
  });

  it('applies entityPrefix and the default schema of the data source, as TypeORM does', async () => {
    const files = {
      ...RELATED,
      'src/data-source.ts': "import { DataSource } from 'typeorm';\nexport const ds = new DataSource({ type: 'postgres', entities: ['src/*.ts'], entityPrefix: 'coop_', schema: 'lending' });\n",
    };
    const r = await runAdapter(files);
    const theirs = await oracle(RELATED, { entityPrefix: 'coop_', schema: 'lending' });
    expect(compareWithOracle(r.snapshot!, theirs)).toEqual([]);
    expect(r.snapshot!.tables.map((t) => `${t.namespace}.${t.name}`).sort()).toEqual(['lending.coop_coop_member', 'lending.coop_tool_loan', 'lending.coop_tool_loan_witnessed_by_coop_member']);
  });
});

describe("the application's data source, not a test helper's", () => {
  // the application reads its database type at start-up; an integration-test helper names one
  const files = {
    'package.json': '{ "name": "coop" }',
    'src/data-source.ts':
      "import { DataSource, type DataSourceOptions } from 'typeorm';\nimport { SnakeNamingStrategy } from 'typeorm-naming-strategies';\n\nexport const ds = new DataSource({\n  type: process.env.COOP_DB,\n  url: process.env.COOP_DB_URL,\n  entities: ['src/entity/*.ts'],\n  namingStrategy: new SnakeNamingStrategy(),\n} as DataSourceOptions);\n",
    'integration-tests/helpers/db.ts':
      "import { DataSource } from 'typeorm';\n\nexport const testDb = new DataSource({ type: 'sqlite', database: ':memory:', entities: ['src/entity/*.ts'], synchronize: true });\n",
    'src/entity/member.ts':
      "import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';\n\n@Entity()\nexport class Member {\n  @PrimaryGeneratedColumn()\n  id: number;\n\n  @Column()\n  displayName: string;\n\n  @Column()\n  joinedOn: Date;\n}\n",
  };

  it("decides the database and the naming, as TypeORM's metadata under the application's options has them", async () => {
    const r = await runAdapter(files);
    expect(r.diagnostics.map((d) => [d.code, d.file])).toEqual([['typeorm/database-unknown', 'src/data-source.ts']]);
    // the oracle builds the entities alone (the data source files would connect), with the application's naming on PostgreSQL
    const entities = { 'src/entity/member.ts': files['src/entity/member.ts'] };
    expect(compareWithOracle(r.snapshot!, await oracle(entities, { naming: 'snake' }))).toEqual([]);
    expect(r.snapshot!.tables[0]!.columns.map((c) => c.name)).toEqual(['id', 'display_name', 'joined_on']);
    // with the database named, nothing to say about it
    const named = await runAdapter(files, { 'typeorm-database': 'postgres' });
    expect(named.diagnostics).toEqual([]);
    expect(named.snapshot).toEqual(r.snapshot);
  });

  it('says so when the test helpers disagree on the type', async () => {
    const r = await runAdapter({ ...files, 'integration-tests/helpers/pg.ts': "import { DataSource } from 'typeorm';\n\nexport const pgDb = new DataSource({ type: 'postgres', entities: ['src/entity/*.ts'] });\n" });
    const d = r.diagnostics.find((x) => x.code === 'typeorm/several-data-sources')!;
    expect(d.message).toBe('data sources of several types (sqlite, postgres); the settings of src/data-source.ts are used (a type decided at run time), not those of test code; --typeorm-database chooses another');
    // PostgreSQL's rules, as the database-unknown diagnostic says (SQLite's would make it a datetime)
    expect(r.snapshot!.tables[0]!.columns.find((c) => c.name === 'joined_on')!.type).toEqual({ kind: 'timestamp', withZone: false });
  });
});

describe("a configuration of another tool, with `entities` and a type TypeORM has no driver for", () => {
  it("does not decide the database: the types are TypeORM's DriverFactory's", async () => {
    // reference: the list of drivers TypeORM's DriverFactory reports for a type it does not know
    const { DriverFactory } = require('typeorm/driver/DriverFactory') as { DriverFactory: new () => { create(c: unknown): unknown } };
    let supported: string[] = [];
    try {
      new DriverFactory().create({ options: { type: 'postgresql' } });
    } catch (e) {
      supported = [...(e as Error).message.matchAll(/"([\w-]+)"/g)].map((m) => m[1]!).filter((t) => t !== 'postgresql');
    }
    expect([...DATA_SOURCE_TYPES].sort()).toEqual(supported.sort());
    const files = {
      'package.json': '{ "name": "coop" }',
      'src/catalog/orm.config.ts': "import * as entities from '../entity/member';\n\nmodule.exports = { entities: Object.values(entities), clientUrl: 'postgres://localhost/catalog', type: 'postgresql' };\n",
      'src/data-source.ts': "import { DataSource } from 'typeorm';\n\nexport const ds = new DataSource({ type: 'mysql', entities: ['src/entity/*.ts'] });\n",
      'src/entity/member.ts': "import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';\n\n@Entity()\nexport class Member {\n  @PrimaryGeneratedColumn()\n  id: number;\n\n  @Column()\n  joinedOn: Date;\n}\n",
    };
    const r = await runAdapter(files);
    expect(r.diagnostics.map((d) => d.code)).toEqual(['typeorm/several-data-sources']);
    expect(r.diagnostics[0]!.message).toContain('the settings of src/data-source.ts are used (mysql)');
    // MySQL's rule for Date (TypeORM's MysqlDriver normalises it to datetime; types.test.ts checks the mapping)
    expect(r.snapshot!.tables[0]!.columns.find((c) => c.name === 'joinedOn')!.nativeType).toBe('Date');
    expect(r.snapshot!.tables[0]!.columns.find((c) => c.name === 'joinedOn')!.type.kind).toBe('datetime');
  });
});

describe('options of one database per branch, built on shared ones that hold the entities', () => {
  // a pattern of a real service: `{ ...common, type: 'mysql' }` or `{ ...common, type: 'sqlite' }`,
  // chosen by the environment inside a getter
  const files = {
    'package.json': '{ "name": "coop" }',
    'src/bootstrap/data-source.ts':
      "import { DataSource } from 'typeorm';\nimport { Member } from '../entity/member';\n\nexport class AppDataSource {\n  private ds: DataSource | undefined;\n\n  get dataSource(): DataSource {\n    const isMySql = process.env.COOP_DB === 'mysql';\n    const common = {\n      entities: [Member],\n      migrations: [`${__dirname}/../migrations/${isMySql ? 'mysql' : 'sqlite'}/*.js`],\n      logging: false,\n    };\n    if (isMySql) {\n      const mysqlOptions = { ...common, type: 'mysql' as const, charset: 'utf8mb4', host: process.env.COOP_DB_HOST };\n      this.ds = new DataSource(mysqlOptions);\n    } else {\n      const sqliteOptions = { ...common, type: 'sqlite' as const, database: process.env.COOP_DB_PATH ?? 'coop.sqlite' };\n      this.ds = new DataSource(sqliteOptions);\n    }\n    return this.ds;\n  }\n}\n",
    'src/entity/member.ts':
      "import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';\n\n@Entity('members')\nexport class Member {\n  @PrimaryGeneratedColumn()\n  id: number;\n\n  @Column({ type: 'datetime' })\n  joinedAt: Date;\n\n  @Column({ type: 'tinyint' })\n  verified: number;\n\n  @Column()\n  lastSeen: Date;\n}\n",
  };

  it("takes the first branch's database (MySQL here) and says so; --typeorm-database chooses another", async () => {
    // reference: TypeORM's MysqlDriver and AbstractSqliteDriver normalizeType
    const self = { options: { type: 'mysql' }, uuidColumnTypeSuported: false, version: '8.0.0' };
    const mysql = (t: unknown): string => require('typeorm/driver/mysql/MysqlDriver').MysqlDriver.prototype.normalizeType.call(self, { type: t });
    const sqlite = (t: unknown): string => require('typeorm/driver/sqlite-abstract/AbstractSqliteDriver').AbstractSqliteDriver.prototype.normalizeType.call(self, { type: t });
    const r = await runAdapter(files);
    expect(r.diagnostics.map((d) => [d.code, d.message])).toEqual([
      ['typeorm/several-data-sources', 'data sources of several types (mysql, sqlite); the settings of src/bootstrap/data-source.ts are used (mysql); --typeorm-database chooses another'],
    ]);
    const cols = r.snapshot!.tables[0]!.columns;
    expect(cols.map((c) => c.name)).toEqual(['id', 'joinedAt', 'verified', 'lastSeen']);
    expect(cols.find((c) => c.name === 'lastSeen')!.type.kind).toBe('datetime');
    expect(mysql(Date)).toBe('datetime');
    const other = await runAdapter(files, { 'typeorm-database': 'sqlite' });
    expect(other.diagnostics.map((d) => d.code)).toEqual(['typeorm/several-data-sources']);
    expect(sqlite(Date)).toBe('datetime');
    expect(sqlite('tinyint')).toBe('tinyint');
  });

  it('with --path, a data source among the selected files gives the database and the naming, and which selected entities count', async () => {
    const more = {
      ...files,
      'src/bootstrap/data-source.ts': files['src/bootstrap/data-source.ts']
        .replace("import { Member } from '../entity/member';\n", "import { SnakeNamingStrategy } from 'typeorm-naming-strategies';\nimport { Member } from '../entity/member';\nimport { Loan } from '../entity/loan';\n")
        .replace('entities: [Member],', 'entities: [Member, Loan],\n      namingStrategy: new SnakeNamingStrategy(),'),
      'src/entity/loan.ts': "import { Entity, PrimaryGeneratedColumn } from 'typeorm';\n\n@Entity('loans')\nexport class Loan {\n  @PrimaryGeneratedColumn()\n  id: number;\n}\n",
      // an entity class the data source does not list (TypeORM would not register it)
      'src/entity/old-member.ts': "import { Entity, PrimaryGeneratedColumn } from 'typeorm';\n\n@Entity('members')\nexport class OldMember {\n  @PrimaryGeneratedColumn()\n  id: number;\n}\n",
    };
    const r = await runAdapter(more, {}, ['src/bootstrap/data-source.ts', 'src/entity/member.ts', 'src/entity/old-member.ts']);
    // (the data source is consulted; Loan, which it lists, is not followed, nor reported missing)
    expect(r.located.files).toEqual(['src/entity/member.ts', 'src/entity/old-member.ts']);
    expect(r.located.consulted).toContain('src/bootstrap/data-source.ts');
    expect(r.diagnostics.map((d) => d.code)).toEqual(['typeorm/several-data-sources']);
    expect(r.snapshot!.tables.map((t) => t.name)).toEqual(['members']);
    // the naming of the data source (the community package's snake case: checked against it in naming tests)
    expect(r.snapshot!.tables[0]!.columns.map((c) => c.name)).toEqual(['id', 'joined_at', 'verified', 'last_seen']);
    expect(r.snapshot!.tables[0]!.columns.find((c) => c.name === 'last_seen')!.type.kind).toBe('datetime');
  });

  it('a MongoDB data source beside them, for some documents, does not decide; its entities are left out', async () => {
    const withMongo = {
      ...files,
      'src/bootstrap/data-source.ts': files['src/bootstrap/data-source.ts']
        .replace("import { Member } from '../entity/member';\n", "import { Member } from '../entity/member';\nimport { LoanNote } from '../entity/loan-note';\n")
        .replace('  get dataSource(): DataSource {', "  get documents(): DataSource {\n    return new DataSource({ type: 'mongodb', host: process.env.COOP_MONGO_HOST, entities: [LoanNote], synchronize: true });\n  }\n\n  get dataSource(): DataSource {"),
      'src/entity/loan-note.ts': "import { Column, Entity, ObjectId, ObjectIdColumn } from 'typeorm';\n\n@Entity('loan_notes')\nexport class LoanNote {\n  @ObjectIdColumn()\n  id: ObjectId;\n\n  @Column()\n  text: string;\n}\n",
    };
    const r = await runAdapter(withMongo);
    expect(r.failed).toBeUndefined();
    expect(r.diagnostics.map((d) => [d.code, d.file ?? ''])).toEqual([
      ['typeorm/several-data-sources', ''],
      ['typeorm/mongodb-entity', 'src/entity/loan-note.ts'],
    ]);
    expect(r.diagnostics[0]!.message).toContain('data sources of several types (mongodb, mysql, sqlite); the settings of src/bootstrap/data-source.ts are used (mysql)');
    expect(r.snapshot!.tables.map((t) => t.name)).toEqual(['members']);
    // a MongoDB data source alone is still no relational schema
    const only = await runAdapter({ ...withMongo, 'src/bootstrap/data-source.ts': "import { DataSource } from 'typeorm';\nimport { LoanNote } from '../entity/loan-note';\n\nexport const ds = new DataSource({ type: 'mongodb', entities: [LoanNote] });\n" });
    expect(only.failed).toBe(true);
    expect(only.diagnostics.map((d) => d.code)).toContain('typeorm/mongodb-unsupported');
  });

  it('with no type read at all, an unsupported type says that PostgreSQL is the default and names the flag', async () => {
    const noType = { ...files, 'src/bootstrap/data-source.ts': "import { DataSource } from 'typeorm';\nimport { Member } from '../entity/member';\n\nexport const ds = new DataSource({ entities: [Member], logging: false, ...JSON.parse(process.env.COOP_DB_OPTIONS ?? '{}') });\n" };
    const r = await runAdapter(noType);
    const d = r.diagnostics.filter((x) => x.code === 'typeorm/unsupported-type');
    expect(d.map((x) => x.line)).toEqual([9, 12]);
    expect(d[0]!.message).toContain("is not a column type of postgres (no data source's type was read: PostgreSQL's rules are the default; --typeorm-database names the database)");
  });
});

describe('--typeorm-assume: settings the entities and the data source read from process.env', () => {
  // the oracle loads the same entity modules with the environment set (TypeScript's own output,
  // TypeORM's own metadata); the data source file is not loaded (it would connect)
  const entities = {
    'src/entity/tool.ts':
      "import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';\nimport * as process from 'process';\n\nconst inTests = process.env.COOP_ENV === 'test';\n\n@Entity('tools')\nexport class Tool {\n  @PrimaryGeneratedColumn()\n  id: number;\n\n  @Column({ type: process.env.COOP_ENV === 'test' ? 'varchar' : 'text' })\n  label: string;\n\n  @Column({ length: inTests ? 20 : 80 })\n  code: string;\n\n  @Column({ nullable: process.env.COOP_ENV !== 'production' })\n  shelf: string;\n}\n",
  };
  const files = {
    ...entities,
    'package.json': '{ "name": "coop" }',
    'src/data-source.ts': "import { DataSource } from 'typeorm';\nimport { Tool } from './entity/tool';\n\nexport const ds = new DataSource({ type: (process.env.COOP_DB_TYPE || 'postgres') as 'postgres', entities: [Tool] });\n",
  };

  for (const coopEnv of ['production', 'test']) {
    it(`reads the options as TypeORM does with that environment (COOP_ENV=${coopEnv})`, async () => {
      process.env['COOP_ENV'] = coopEnv;
      try {
        const theirs = await oracle(entities);
        const r = await runAdapter(files, { 'typeorm-assume': [`process.env.COOP_ENV=${coopEnv}`, 'process.env.COOP_DB_TYPE=postgres'] });
        expect(r.diagnostics).toEqual([]);
        expect(compareWithOracle(r.snapshot!, theirs)).toEqual([]);
        const cols = r.snapshot!.tables[0]!.columns;
        expect(cols.map((c) => [c.name, c.nativeType, c.nullable])).toEqual([
          ['id', 'Number', false],
          ['label', coopEnv === 'test' ? 'varchar' : 'text', false],
          ['code', coopEnv === 'test' ? 'String(20)' : 'String(80)', false],
          ['shelf', 'String', coopEnv !== 'production'],
        ]);
      } finally {
        delete process.env['COOP_ENV'];
      }
    });
  }

  it('without it: each such option is not known (TypeORM default, a diagnostic), and the data source type neither', async () => {
    const r = await runAdapter(files);
    expect(r.diagnostics.map((d) => [d.code, d.line])).toEqual([
      ['typeorm/database-unknown', 4],
      ['typeorm/not-literal', 12],
      ['typeorm/not-literal', 15],
      ['typeorm/not-literal', 18],
    ]);
  });

  it("the data source's type read from process.env decides the database", async () => {
    const r = await runAdapter(files, { 'typeorm-assume': ['process.env.COOP_ENV=production', 'process.env.COOP_DB_TYPE=mysql'] });
    expect(r.diagnostics).toEqual([]);
    // MySQL's type rules: a varchar(80) stays, `text` is MySQL's text (TypeORM's MysqlDriver normalisation, types.test.ts)
    expect(r.snapshot!.tables[0]!.columns.find((c) => c.name === 'label')!.nativeType).toBe('text');
    // a data source written with quoted keys, as JSON is, and a type cast (a real project's form)
    const quoted = { ...files, 'src/data-source.ts': "import { DataSource } from 'typeorm';\nimport { Tool } from './entity/tool';\n\nexport function settings() {\n  return {\n    \"type\": (process.env.COOP_DB_TYPE as any) || \"sqlite\",\n    \"entities\": [Tool],\n  };\n}\nexport const ds = new DataSource(settings());\n" };
    const q = await runAdapter(quoted, { 'typeorm-assume': ['process.env.COOP_ENV=production', 'process.env.COOP_DB_TYPE=mysql'] });
    expect(q.located.files).toContain('src/data-source.ts');
    expect(q.diagnostics).toEqual([]);
    expect(q.snapshot).toEqual(r.snapshot);
    const unknownType = await runAdapter(quoted, { 'typeorm-assume': ['process.env.COOP_ENV=production'] });
    expect(unknownType.diagnostics.map((d) => d.message)).toEqual([
      "the data source type (process.env.COOP_DB_TYPE) depends on run-time configuration; PostgreSQL's type rules are used (set --typeorm-database, or --typeorm-assume process.env.COOP_DB_TYPE=VALUE)",
    ]);
    const bad = await runAdapter(files, { 'typeorm-assume': ['COOP_DB_TYPE'] });
    expect(bad.diagnostics.map((d) => [d.severity, d.code])).toContainEqual(['error', 'typeorm/bad-assume-option']);
  });
});
