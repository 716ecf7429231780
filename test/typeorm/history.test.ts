import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { extractHistory, type History, type ScriptedCommit } from '@schema-strata/core';
import { typeormAdapter } from '@schema-strata/adapter-typeorm';
import { compareWithOracle, compile, load, oracleTables, typeormMetadata } from './oracle.js';
import { runAdapter, writeWithTrees } from './harness.js';

/**
 * A synthetic history of a co-op's TypeORM entities, checked version by version against
 * TypeORM's own metadata for the tree of that commit (the oracle), plus the bad inputs each
 * giving a diagnostic and a complete output.
 */

const TSCONFIG = '{ "compilerOptions": { "strict": true, "strictPropertyInitialization": false, "experimentalDecorators": true, "emitDecoratorMetadata": true } }\n';

const BASE = (extra = ''): string => `import { CreateDateColumn, PrimaryGeneratedColumn, UpdateDateColumn } from 'typeorm';

export abstract class Row {
  @PrimaryGeneratedColumn()
  id: number;

  @CreateDateColumn()
  createdAt: Date;
${extra}}
`;

const MEMBER = (o: { cls?: string; phone?: boolean; uniqueEmail?: boolean; address?: boolean } = {}): string => `import { Column, Entity } from 'typeorm';
import { Row } from './base';
${o.address ? "import { Address } from './address';\n" : ''}
@Entity('members')
export class ${o.cls ?? 'Member'} extends Row {
  @Column({ length: 80 })
  name: string;

  @Column(${o.uniqueEmail ? '{ unique: true }' : ''})
  email: string;
${o.phone ? "\n  @Column({ type: 'varchar', length: 30, nullable: true })\n  phone: string | null;\n" : ''}${o.address ? '\n  @Column(() => Address)\n  address: Address;\n' : ''}}
`;

const TOOL = (o: { cls?: string; nameLength?: number; category?: boolean; code?: boolean; tags?: string; condition?: boolean; broken?: boolean; computed?: boolean } = {}): string => {
  const cls = o.cls ?? 'Tool';
  const imports = [`import { Column, Entity${o.category ? ', ManyToOne' : ''}${o.tags ? ', JoinTable, ManyToMany' : ''} } from 'typeorm';`, "import { Row } from './base';"];
  if (o.category) imports.push("import { Category } from './category';");
  if (o.code) imports.push("import { CodeColumn } from './decorators';");
  if (o.tags) imports.push(`import { Tag } from '${o.tags}';`);
  if (o.condition) imports.push("import { Condition } from './condition';");
  if (o.computed) imports.push("import { lengthFor } from './sizes';");
  const body: string[] = [`  @Column({ length: ${o.nameLength ?? 80} })\n  name: string;`];
  if (o.category) body.push('  @ManyToOne(() => Category, { onDelete: \'SET NULL\' })\n  category: Category;');
  if (o.code) body.push('  @CodeColumn()\n  code: string;');
  if (o.tags) body.push('  @ManyToMany(() => Tag)\n  @JoinTable()\n  tags: Tag[];');
  if (o.condition) body.push("  @Column({ type: 'enum', enum: Condition, default: Condition.Good })\n  condition: Condition;");
  if (o.computed) body.push("  @Column({ type: 'varchar', length: lengthFor('brand') })\n  brand: string;");
  if (o.broken) body.push('  @Column({ length: 20 )\n  brand: string;');
  return `${imports.join('\n')}\n\n@Entity()\nexport class ${cls} extends Row {\n${body.join('\n\n')}\n}\n`;
};

const LOAN = (o: { member?: string; tool?: string; cascade?: boolean } = {}): string => `import { Column, Entity, ManyToOne } from 'typeorm';
import { Row } from './base';
import { ${o.member ?? 'Member'} } from './member';
import { ${o.tool ?? 'Tool'} } from './tool';

@Entity('loans')
export class Loan extends Row {
  @ManyToOne(() => ${o.member ?? 'Member'}${o.cascade ? ", { onDelete: 'CASCADE' }" : ''})
  member: ${o.member ?? 'Member'};

  @ManyToOne(() => ${o.tool ?? 'Tool'}, { nullable: false })
  tool: ${o.tool ?? 'Tool'};

  @Column({ type: 'timestamp', nullable: true })
  returnedAt: Date;
}
`;

const CATEGORY = `import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';

@Entity('categories')
export class Category {
  @PrimaryGeneratedColumn()
  id: number;

  @Column({ unique: true })
  label: string;
}
`;

const DECORATORS = `import { Column, ColumnOptions } from 'typeorm';

export function CodeColumn(options: ColumnOptions = {}) {
  return Column({ type: 'varchar', length: 12, unique: true, ...options });
}
`;

const TAG = `import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';

@Entity('tags')
export class Tag {
  @PrimaryGeneratedColumn()
  id: number;

  @Column({ length: 40 })
  word: string;
}
`;

const RESERVATION = `import { Column, Entity, JoinColumn, ManyToOne, PrimaryColumn } from 'typeorm';
import { Implement } from './tool';

@Entity('reservations')
export class Reservation {
  @PrimaryColumn({ name: 'tool_id' })
  toolId: number;

  @PrimaryColumn({ type: 'date' })
  startsOn: string;

  @ManyToOne(() => Implement, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'tool_id' })
  tool: Implement;
}
`;

const ADDRESS = `import { Column } from 'typeorm';

export class Address {
  @Column({ nullable: true })
  street: string;

  @Column({ nullable: true })
  city: string;
}
`;

const VIEW = `import { ViewColumn, ViewEntity } from 'typeorm';

@ViewEntity({ name: 'open_loans', expression: 'SELECT * FROM loans WHERE "returnedAt" IS NULL' })
export class OpenLoan {
  @ViewColumn()
  id: number;
}
`;

const CONDITION = (values: string[]): string => `export enum Condition {\n${values.map((v) => `  ${v[0]!.toUpperCase()}${v.slice(1)} = '${v}',`).join('\n')}\n}\n`;

const DUPLICATE = `import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';

@Entity('members')
export class MemberCopy {
  @PrimaryGeneratedColumn()
  id: number;

  @Column()
  nickname: string;
}
`;

const CYCLE_A = `import { Column, Entity } from 'typeorm';
import { Tangle } from './tangle';

@Entity('knots')
export class Knot extends Tangle {
  @Column()
  label: string;
}
`;

const CYCLE_B = `import { Column } from 'typeorm';
import { Knot } from './knot';

export class Tangle extends Knot {
  @Column()
  twist: number;
}
`;

interface Step {
  message: string;
  files: Record<string, string | null>;
  /** What the step is about; the checks below look versions up by it. */
  tag?: string;
}

const steps: Step[] = [
  { message: 'Members, tools and their base class', files: { 'tsconfig.json': TSCONFIG, 'src/base.ts': BASE(), 'src/member.ts': MEMBER(), 'src/tool.ts': TOOL() } },
  { message: 'Loans', files: { 'src/loan.ts': LOAN() } },
  { message: 'Members may leave a phone number', files: { 'src/member.ts': MEMBER({ phone: true }) }, tag: 'add-column' },
  { message: 'Notes for the next meeting', files: { 'NOTES.md': 'agenda\n' } },
  { message: 'Longer tool names', files: { 'src/tool.ts': TOOL({ nameLength: 160 }) }, tag: 'retype' },
  { message: 'Tool categories', files: { 'src/category.ts': CATEGORY, 'src/tool.ts': TOOL({ nameLength: 160, category: true }) }, tag: 'add-relation' },
  { message: 'Categories are not related to tools after all', files: { 'src/tool.ts': TOOL({ nameLength: 160 }) }, tag: 'remove-relation' },
  { message: 'Every row records its last update', files: { 'src/base.ts': BASE('\n  @UpdateDateColumn()\n  updatedAt: Date;\n') }, tag: 'base-column' },
  { message: 'Members are persons (same table)', files: { 'src/member.ts': MEMBER({ cls: 'Person', phone: true }), 'src/loan.ts': LOAN({ member: 'Person' }) }, tag: 'rename-keep' },
  { message: 'Tools are implements (new table)', files: { 'src/tool.ts': TOOL({ cls: 'Implement', nameLength: 160 }), 'src/loan.ts': LOAN({ member: 'Person', tool: 'Implement' }) }, tag: 'rename-table' },
  { message: 'Implement codes through a custom decorator', files: { 'src/decorators.ts': DECORATORS, 'src/tool.ts': TOOL({ cls: 'Implement', nameLength: 160, code: true }) }, tag: 'custom-decorator' },
  { message: 'Tags on implements', files: { 'src/tag.ts': TAG, 'src/tool.ts': TOOL({ cls: 'Implement', nameLength: 160, code: true, tags: './tag' }) }, tag: 'many-to-many' },
  { message: 'Phone numbers are no longer kept', files: { 'src/member.ts': MEMBER({ cls: 'Person' }) }, tag: 'remove-column' },
  { message: 'One account per e-mail address', files: { 'src/member.ts': MEMBER({ cls: 'Person', uniqueEmail: true }) } },
  { message: 'Reservations keyed by implement and day', files: { 'src/reservation.ts': RESERVATION }, tag: 'add-entity' },
  { message: 'Categories are gone', files: { 'src/category.ts': null }, tag: 'remove-entity' },
  { message: 'Postal addresses', files: { 'src/address.ts': ADDRESS, 'src/member.ts': MEMBER({ cls: 'Person', uniqueEmail: true, address: true }) } },
  { message: 'Loans go with their member', files: { 'src/loan.ts': LOAN({ member: 'Person', tool: 'Implement', cascade: true }) } },
  { message: 'A view of open loans', files: { 'src/open-loans.ts': VIEW }, tag: 'view' },
  { message: 'Implement condition', files: { 'src/condition.ts': CONDITION(['good', 'worn']), 'src/tool.ts': TOOL({ cls: 'Implement', nameLength: 160, code: true, tags: './tag', condition: true }) } },
  { message: 'A broken implement can wait for repair', files: { 'src/condition.ts': CONDITION(['good', 'worn', 'broken']) }, tag: 'enum-values' },
  { message: 'Work in progress on brands', files: { 'src/tool.ts': TOOL({ cls: 'Implement', nameLength: 160, code: true, tags: './tag', condition: true, broken: true }) }, tag: 'bad:syntax' },
  { message: 'Brands, sized by a helper', files: { 'src/sizes.ts': "export function lengthFor(_what: string): number {\n  if (process.env.COOP_WIDE_COLUMNS) return 80;\n  return 40;\n}\n", 'src/tool.ts': TOOL({ cls: 'Implement', nameLength: 160, code: true, tags: './tag', condition: true, computed: true }) }, tag: 'bad:not-literal' },
  { message: 'Tags are dropped (the implement still refers to them)', files: { 'src/tag.ts': null }, tag: 'bad:deleted-target' },
  { message: 'Implements no longer tagged', files: { 'src/tool.ts': TOOL({ cls: 'Implement', nameLength: 160, code: true, condition: true }), 'src/sizes.ts': null } },
  { message: 'A copy of the members table', files: { 'src/zz-member-copy.ts': DUPLICATE }, tag: 'bad:duplicate-table' },
  { message: 'Tangled base classes', files: { 'src/zz-member-copy.ts': null, 'src/knot.ts': CYCLE_A, 'src/tangle.ts': CYCLE_B }, tag: 'bad:cycle' },
  { message: 'Untangled', files: { 'src/knot.ts': null, 'src/tangle.ts': null } },
];

let dir: string;
let history: History;
/** Files of each commit's tree, by commit id. */
const treeAt = new Map<string, Record<string, string>>();
const tagOf = new Map<string, string>();

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'strata-typeorm-history-'));
  const commits: ScriptedCommit[] = steps.map((s, i) => ({
    date: new Date(Date.UTC(2024, 0, 1 + i * 7, 18)).toISOString().replace('.000Z', '+00:00'),
    message: s.message,
    files: s.files,
  }));
  const { ids, trees } = await writeWithTrees(dir, commits);
  for (const [id, t] of trees) treeAt.set(id, t);
  steps.forEach((s, i) => {
    if (s.tag) tagOf.set(ids[i]!, s.tag);
  });
  history = await extractHistory({ repo: dir, adapter: typeormAdapter });
}, 120_000);

afterAll(() => {
  rmSync(dir, { recursive: true, force: true });
});

const tablesOf = (v: History['versions'][number]) => history.snapshots.get(v.snapshot!)!.tables.map((t) => t.table);
const versionTagged = (tag: string) => history.versions.find((v) => tagOf.get(v.commit) === tag)!;

describe('a synthetic TypeORM history', () => {
  it('has a version for every commit that changes the entities (not the notes)', () => {
    expect(steps.length).toBeGreaterThanOrEqual(20);
    expect(history.versions.length).toBe(steps.length - 1);
    expect(history.versions.every((v) => v.status !== 'absent')).toBe(true);
  });

  it('agrees with TypeORM at every version whose sources TypeORM can load', async () => {
    let checked = 0;
    for (const v of history.versions) {
      const tag = tagOf.get(v.commit);
      if (tag?.startsWith('bad:')) continue;
      const files = treeAt.get(v.commit)!;
      const o = { strict: true };
      const ds = await typeormMetadata(load(compile(files, o), o), o);
      const theirs = oracleTables(ds);
      const diff = compareWithOracle({ tables: tablesOf(v) }, theirs, ds);
      expect(diff, `version ${v.index} (${v.subject})`).toEqual([]);
      expect(history.snapshots.get(v.snapshot!)!.views.map((x) => x.name).sort()).toEqual([...theirs.views].sort());
      checked++;
    }
    expect(checked).toBeGreaterThanOrEqual(20);
  }, 240_000);

  it('gives, version after version, the tables a fresh assembly of that version gives (what it takes over is right)', async () => {
    const strip = (t: object): string => JSON.stringify(t, (k, v) => (k === 'origin' || k === 'id' ? undefined : v));
    for (const v of history.versions) {
      if (v.status === 'partial') continue;
      const fresh = await runAdapter(treeAt.get(v.commit)!);
      const ours = tablesOf(v).map(strip).sort();
      const theirs = fresh.snapshot!.tables.map((t) => strip({ ...t, foreignKeys: [...t.foreignKeys].sort((a, b) => (JSON.stringify(a) < JSON.stringify(b) ? -1 : 1)), uniques: [...t.uniques].sort((a, b) => (JSON.stringify(a) < JSON.stringify(b) ? -1 : 1)) })).sort();
      expect(ours, `version ${v.index}`).toEqual(theirs);
    }
  });

  it('changes every subclass table in the version where the base class gains a column', () => {
    const v = versionTagged('base-column');
    const added = history.changes.filter((c) => c.version === v.index && c.kind === 'column-added');
    expect(added.map((c) => c.table).sort()).toEqual(['loans', 'members', 'tool']);
    expect(added.every((c) => c.column === 'updatedAt')).toBe(true);
  });

  it('sees no change when a class is renamed and keeps its table, a new table when the name follows the class', () => {
    const keep = versionTagged('rename-keep');
    expect(keep.status).toBe('no change');
    expect(history.changes.filter((c) => c.version === keep.index)).toEqual([]);
    const moved = versionTagged('rename-table');
    const kinds = history.changes.filter((c) => c.version === moved.index).map((c) => `${c.kind.replace(/-/g, ' ')} ${c.table}`);
    expect(kinds).toContain('table removed tool');
    expect(kinds).toContain('table added implement');
  });

  it('records columns added, removed and retyped, relations added and removed, enum values changed', () => {
    const at = (tag: string) => history.changes.filter((c) => c.version === versionTagged(tag).index).map((c) => `${c.kind.replace(/-/g, ' ')} ${c.table}${c.column ? '.' + c.column : ''}`);
    expect(at('add-column')).toContain('column added members.phone');
    expect(at('remove-column')).toContain('column removed members.phone');
    expect(at('retype')).toContain('column type changed tool.name');
    expect(at('add-relation')).toEqual(expect.arrayContaining(['table added categories', 'column added tool.categoryId', 'foreign key added tool']));
    expect(at('remove-relation')).toEqual(expect.arrayContaining(['column removed tool.categoryId', 'foreign key removed tool']));
    expect(at('many-to-many')).toContain('table added implement_tags_tags');
    expect(at('custom-decorator')).toContain('column added implement.code');
    expect(at('add-entity')).toContain('table added reservations');
    expect(at('remove-entity')).toContain('table removed categories');
    expect(at('enum-values')).toContain('column enum values changed implement.condition');
    const join = tablesOf(versionTagged('many-to-many')).find((t) => t.name === 'implement_tags_tags')!;
    expect(join.kind).toBe('implicit-join');
    expect(history.snapshots.get(versionTagged('view').snapshot!)!.views.map((x) => x.name)).toEqual(['open_loans']);
  });
});

describe('bad input in the history: a diagnostic and a complete output', () => {
  const diagnostics = (tag: string) => versionTagged(tag).diagnostics;

  it('a syntax error keeps the file\'s last good facts (status partial)', () => {
    const v = versionTagged('bad:syntax');
    expect(v.status).toBe('partial');
    expect(diagnostics('bad:syntax').map((d) => d.code)).toContain('typeorm/syntax-error');
    const d = diagnostics('bad:syntax').find((x) => x.code === 'typeorm/syntax-error')!;
    expect(d.file).toBe('src/tool.ts');
    expect(d.line).toBeGreaterThan(1);
    expect(tablesOf(v).map((t) => t.name)).toContain('implement');
  });

  it('a decorator argument that is not a literal is reported and read as far as it goes', () => {
    const v = versionTagged('bad:not-literal');
    const d = v.diagnostics.find((x) => x.code === 'typeorm/not-literal')!;
    expect(d).toBeDefined();
    expect(d.message).toContain('lengthFor');
    const brand = tablesOf(v).find((t) => t.name === 'implement')!.columns.find((c) => c.name === 'brand')!;
    expect(brand.type).toEqual({ kind: 'string' });
  });

  it('an entity file deleted while another still refers to it: the relation is left out, the rest stays', () => {
    const v = versionTagged('bad:deleted-target');
    const d = v.diagnostics.find((x) => x.code === 'typeorm/missing-file')!;
    expect(d.file).toBe('src/tool.ts');
    expect(d.message).toContain('./tag');
    const names = tablesOf(v).map((t) => t.name);
    expect(names).not.toContain('tags');
    expect(names).not.toContain('implement_tags_tags');
    expect(names).toEqual(expect.arrayContaining(['implement', 'loans', 'members', 'reservations']));
  });

  it('two classes claiming one table: the second is reported and left out', () => {
    const v = versionTagged('bad:duplicate-table');
    const d = v.diagnostics.find((x) => x.code === 'typeorm/duplicate-table')!;
    expect(d.file).toBe('src/zz-member-copy.ts');
    const members = tablesOf(v).find((t) => t.name === 'members')!;
    expect(members.columns.map((c) => c.name)).toContain('email');
    expect(members.columns.map((c) => c.name)).not.toContain('nickname');
  });

  it('a cycle of base classes is cut and reported; the other tables are whole', () => {
    const v = versionTagged('bad:cycle');
    expect(v.diagnostics.map((x) => x.code)).toContain('typeorm/inheritance-cycle');
    const knots = tablesOf(v).find((t) => t.name === 'knots')!;
    expect(knots.columns.map((c) => c.name).sort()).toEqual(['label', 'twist']);
    expect(tablesOf(v).map((t) => t.name)).toEqual(expect.arrayContaining(['implement', 'loans', 'members', 'reservations']));
  });
});
