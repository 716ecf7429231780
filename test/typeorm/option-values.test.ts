import { describe, expect, it } from 'vitest';
import { compareWithOracle, oracle } from './oracle.js';
import { runAdapter } from './harness.js';

/**
 * Values that decorator options take from the project's own code (helper functions, static class
 * properties, wrappers that apply a list of decorators) and the tsconfig chain that governs the
 * entities; each checked against TypeORM's own metadata of the same sources (oracle.ts), or, where
 * the value is decided at run time, against the diagnostic that says so.
 */

const HEAD = "import { Column, CreateDateColumn, Entity, JoinColumn, JoinTable, ManyToMany, ManyToOne, PrimaryGeneratedColumn } from 'typeorm';\n";

describe('helper functions in decorator options', () => {
  const files = {
    'src/db-types.ts':
      "import type { ColumnType } from 'typeorm';\n\n/** One place to say which column types the co-op's database uses. */\nexport function dbType(t: ColumnType): ColumnType {\n  return t;\n}\n\nexport const jsonType = (): ColumnType => 'jsonb';\n",
    'src/loan.ts':
      HEAD +
      "import { dbType, jsonType } from './db-types';\n\n@Entity('loans')\nexport class Loan {\n  @PrimaryGeneratedColumn()\n  id: number;\n\n  @Column({ type: dbType('timestamptz') })\n  dueAt: Date;\n\n  @CreateDateColumn({ type: dbType('timestamptz') })\n  lentAt: Date;\n\n  @Column({ type: jsonType(), nullable: true })\n  conditionNotes: object;\n}\n",
  };

  it("give the value they return, as TypeORM's metadata has it", async () => {
    const r = await runAdapter(files);
    expect(r.diagnostics).toEqual([]);
    expect(compareWithOracle(r.snapshot!, await oracle(files))).toEqual([]);
    const cols = r.snapshot!.tables[0]!.columns;
    expect(cols.map((c) => [c.name, c.nativeType])).toEqual([['id', 'Number'], ['dueAt', 'timestamptz'], ['lentAt', 'timestamptz'], ['conditionNotes', 'jsonb']]);
  });

  it('with several returns, decided at run time, are reported and not guessed', async () => {
    // which return runs depends on a setting read when the application starts: undecidable statically
    const branched = {
      ...files,
      'src/db-types.ts':
        "import type { ColumnType } from 'typeorm';\n\nlet engine: string | undefined;\nexport function configure(e: string): void {\n  engine = e;\n}\n\nexport function dbType(t: ColumnType): ColumnType {\n  if (engine === 'sqlite' && t === 'timestamptz') return 'datetime';\n  return t;\n}\n\nexport const jsonType = (): ColumnType => 'jsonb';\n",
      // a constant chosen by the environment: its members are unknown too, and named as written
      'src/settings.ts': "const onSqlite = { notes: 'simple-json' } as const;\nconst onPostgres = { notes: 'jsonb' } as const;\nexport const settings = process.env.COOP_DB === 'sqlite' ? onSqlite : onPostgres;\n",
    };
    branched['src/loan.ts'] = branched['src/loan.ts'].replace("import { dbType, jsonType } from './db-types';\n", "import { dbType } from './db-types';\nimport { settings } from './settings';\n").replace('type: jsonType()', 'type: settings.notes');
    const r = await runAdapter(branched);
    const nl = r.diagnostics.filter((d) => d.code === 'typeorm/not-literal');
    expect(nl.map((d) => [d.file, d.line])).toEqual([['src/loan.ts', 11], ['src/loan.ts', 14], ['src/loan.ts', 17]]);
    expect(nl[0]!.message).toContain('(dbType())');
    expect(nl[2]!.message).toContain('(settings.notes)');
    // the type then comes from the property's metadata, as the diagnostic says
    expect(r.snapshot!.tables[0]!.columns.find((c) => c.name === 'dueAt')!.nativeType).toBe('Date');
  });
});

describe('static class properties', () => {
  it("name a join table as TypeORM's metadata does", async () => {
    // tool.ts sorts (and loads) first: the category class is defined before the tool's decorators read it
    const files = {
      'src/tools/category.ts':
        HEAD +
        "import { Tool } from '../tool';\n\n@Entity('tool_categories')\nexport class ToolCategory {\n  static toolJoinTable = 'tool_category_tools';\n\n  @PrimaryGeneratedColumn()\n  id: number;\n\n  @Column()\n  label: string;\n\n  @ManyToMany(() => Tool, (t) => t.categories)\n  tools: Tool[];\n}\n",
      'src/tool.ts':
        HEAD +
        "import { ToolCategory } from './tools/category';\n\n@Entity('tools')\nexport class Tool {\n  @PrimaryGeneratedColumn()\n  id: number;\n\n  @ManyToMany(() => ToolCategory, (c) => c.tools)\n  @JoinTable({ name: ToolCategory.toolJoinTable, joinColumn: { name: 'tool_id' }, inverseJoinColumn: { name: 'category_id' } })\n  categories: ToolCategory[];\n}\n",
    };
    const r = await runAdapter(files);
    expect(r.diagnostics).toEqual([]);
    expect(compareWithOracle(r.snapshot!, await oracle(files))).toEqual([]);
    expect(r.snapshot!.tables.map((t) => t.name).sort()).toEqual(['tool_categories', 'tool_category_tools', 'tools']);
  });
});

describe('a wrapper that applies the decorators it is given', () => {
  it("reads them as applied, as TypeORM's metadata has them when the wrapper applies them", async () => {
    const files = {
      'src/flags.ts': "export const enabled = new Set<string>(['reservations']);\n",
      'src/decorators/when-enabled.ts':
        "import { enabled } from '../flags';\n\nexport function WhenEnabled(flag: string, decorators: PropertyDecorator[]): PropertyDecorator {\n  return (target, key) => {\n    if (!enabled.has(flag)) return;\n    decorators.forEach((d) => d(target, key));\n  };\n}\n\nexport function WhenEnabledClass(flag: string, decorators: ClassDecorator[]): ClassDecorator {\n  return (target) => {\n    if (!enabled.has(flag)) return;\n    decorators.forEach((d) => d(target));\n  };\n}\n",
      'src/member.ts':
        HEAD +
        "import { WhenEnabled } from './decorators/when-enabled';\nimport { Reservation } from './reservation';\n\n@Entity('members')\nexport class Member {\n  @PrimaryGeneratedColumn()\n  id: number;\n\n  @WhenEnabled('reservations', [ManyToOne(() => Reservation, { onDelete: 'SET NULL' }), JoinColumn({ name: 'next_reservation_id' })])\n  nextReservation: Reservation;\n\n  @WhenEnabled('reservations', [Column({ type: 'int', default: 0 })])\n  reservationCount: number;\n}\n",
      'src/reservation.ts':
        HEAD +
        "import { WhenEnabledClass } from './decorators/when-enabled';\n\n@WhenEnabledClass('reservations', [Entity('reservations')])\nexport class Reservation {\n  @PrimaryGeneratedColumn()\n  id: number;\n\n  @Column()\n  startsOn: Date;\n}\n",
    };
    const r = await runAdapter(files);
    expect(r.diagnostics).toEqual([]);
    expect(compareWithOracle(r.snapshot!, await oracle(files))).toEqual([]);
    const member = r.snapshot!.tables.find((t) => t.name === 'members')!;
    expect(member.columns.map((c) => c.name)).toEqual(['id', 'reservationCount', 'next_reservation_id']);
  });
});

describe('a tsconfig chain through a base whose name is not tsconfig.json', () => {
  const files = {
    'tsconfig.json': '{ "extends": "./config/tsconfig-base.json", "include": ["src"] }\n',
    // TypeScript reads tsconfig files with comments and trailing commas
    'config/tsconfig-base.json': '{\n  // shared by the co-op\'s packages\n  "compilerOptions": {\n    "baseUrl": "../src",\n    "strict": true,\n    "experimentalDecorators": true,\n    "emitDecoratorMetadata": true,\n  },\n}\n',
    'src/people/member.ts': HEAD + "@Entity('members')\nexport class Member {\n  @PrimaryGeneratedColumn()\n  id: number;\n\n  @Column()\n  displayName: string;\n}\n",
    'src/lending/loan.ts':
      HEAD + "import { Member } from 'people/member';\n\n@Entity('loans')\nexport class Loan {\n  @PrimaryGeneratedColumn()\n  id: number;\n\n  @ManyToOne(() => Member, { nullable: false })\n  borrower: Member;\n}\n",
  };

  it("resolves imports through the base's baseUrl, as TypeORM's metadata (compiled with it) has them", async () => {
    const r = await runAdapter(files);
    expect(r.diagnostics).toEqual([]);
    expect(r.located.files).toContain('config/tsconfig-base.json');
    expect(compareWithOracle(r.snapshot!, await oracle(files, { strict: true, baseUrl: 'src' }))).toEqual([]);
    expect(r.snapshot!.tables.find((t) => t.name === 'loans')!.foreignKeys.map((f) => f.referencedTable)).toEqual(['members']);
  });

  it("takes the base's strictNullChecks: a union with null is Object, which TypeORM refuses", async () => {
    const strict = { ...files, 'src/people/member.ts': files['src/people/member.ts'].replace('  displayName: string;\n', '  displayName: string;\n\n  @Column({ nullable: true })\n  nickname: string | null;\n') };
    await expect(oracle(strict, { strict: true, baseUrl: 'src' })).rejects.toThrow(/Data type "Object" in "Member.nickname" is not supported/);
    const r = await runAdapter(strict);
    expect(r.diagnostics.map((d) => [d.code, d.file, d.line])).toEqual([['typeorm/strict-null-union', 'src/people/member.ts', 11]]);
  });
});
