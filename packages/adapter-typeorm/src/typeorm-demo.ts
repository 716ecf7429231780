import type { DemoColumn, DemoCommitFiles, DemoRelation, DemoStep, DemoStory, DemoTable } from '@schema-strata/core/extract';

/**
 * Core's demo story written as TypeORM entity classes, one file per entity, with the physical
 * names, types, keys and referential actions of the Prisma rendering (so that the ORMs' demos
 * give the same physical schema): varchar(n), timestamp(3), numeric(p,s), a native enum type
 * named as the story names it, Prisma's default actions (restrict / set null on delete, cascade
 * on update) stated explicitly, and the many-to-many join table `_<A>To<B>` with columns A and B.
 */

const ACTION = { cascade: 'CASCADE', restrict: 'RESTRICT', 'set null': 'SET NULL' } as const;

interface Layout {
  /** Blank line between members. */
  spaced: boolean;
  quote: string;
}

function q(s: string, l: Layout): string {
  return `${l.quote}${s}${l.quote}`;
}

function columnOptions(c: DemoColumn, step: DemoStep, l: Layout): string[] {
  const o: string[] = [`name: ${q(c.name, l)}`];
  switch (c.type) {
    case 'serial':
    case 'int':
      o.push(`type: ${q('int', l)}`);
      break;
    case 'string':
      if (c.length) o.push(`type: ${q('varchar', l)}`, `length: ${c.length}`);
      else o.push(`type: ${q('text', l)}`);
      break;
    case 'text':
      o.push(`type: ${q('text', l)}`);
      break;
    case 'boolean':
      o.push(`type: ${q('boolean', l)}`);
      break;
    case 'date':
      o.push(`type: ${q('date', l)}`);
      break;
    case 'datetime':
      o.push(`type: ${q('timestamp', l)}`, 'precision: 3');
      break;
    case 'decimal':
      o.push(`type: ${q('decimal', l)}`, `precision: ${c.precision ?? 10}`, `scale: ${c.scale ?? 2}`);
      break;
    case 'enum':
      o.push(`type: ${q('enum', l)}`, `enum: ${c.enum}`, `enumName: ${q(c.enum!, l)}`);
      void step;
      break;
  }
  if (c.nullable) o.push('nullable: true');
  if (c.unique) o.push('unique: true');
  if (c.default !== undefined) {
    if (c.default === 'now') o.push(`default: () => ${q('now()', l)}`);
    else if (c.type === 'enum') o.push(`default: ${c.enum}.${String(c.default)}`);
    else o.push(`default: ${typeof c.default === 'string' ? q(c.default, l) : String(c.default)}`);
  }
  return o;
}

function tsType(c: DemoColumn): string {
  switch (c.type) {
    case 'serial':
    case 'int':
      return 'number';
    case 'boolean':
      return 'boolean';
    case 'date':
    case 'datetime':
      return 'Date';
    case 'enum':
      return c.enum!;
    default:
      return 'string';
  }
}

/** Relations that point at a model: [referencing table, relation]. */
function incoming(step: DemoStep, model: string): Array<[DemoTable, DemoRelation]> {
  const out: Array<[DemoTable, DemoRelation]> = [];
  for (const t of step.tables) for (const r of t.relations) if (r.references === model) out.push([t, r]);
  return out;
}

const isOneToOne = (t: DemoTable, r: DemoRelation): boolean => r.columns.length === 1 && !!t.columns.find((c) => c.name === r.columns[0])?.unique;

function renderEntity(t: DemoTable, step: DemoStep, l: Layout): string {
  const decorators = new Set<string>(['Entity', 'Column']);
  const imports = new Set<string>();
  const enums = new Set<string>();
  const members: string[] = [];
  const single = t.primaryKey.length === 1 ? t.primaryKey[0] : undefined;
  for (const c of t.columns) {
    const type = tsType(c) + (c.nullable ? ' | null' : '');
    if (c.type === 'enum') enums.add(c.enum!);
    const opts = columnOptions(c, step, l).join(', ');
    if (c.type === 'serial' && single === c.name) {
      decorators.add('PrimaryGeneratedColumn');
      members.push(`  @PrimaryGeneratedColumn({ name: ${q(c.name, l)} })\n  ${c.field}!: number;`);
    } else if (t.primaryKey.includes(c.name)) {
      decorators.add('PrimaryColumn');
      members.push(`  @PrimaryColumn({ ${opts} })\n  ${c.field}!: ${type};`);
    } else {
      if (c.type === 'serial') decorators.add('Generated');
      members.push(`  ${c.type === 'serial' ? '@Generated()\n  ' : ''}@Column({ ${opts} })\n  ${c.field}!: ${type};`);
    }
  }
  for (const r of t.relations) {
    const one = isOneToOne(t, r);
    const deco = one ? 'OneToOne' : 'ManyToOne';
    decorators.add(deco);
    decorators.add('JoinColumn');
    const optional = r.columns.some((n) => t.columns.find((c) => c.name === n)?.nullable);
    const onDelete = r.onDelete ? ACTION[r.onDelete] : optional ? 'SET NULL' : 'RESTRICT';
    if (r.references !== t.model) imports.add(r.references);
    const join = r.columns.length === 1 ? `{ name: ${q(r.columns[0]!, l)} }` : `[${r.columns.map((c) => `{ name: ${q(c, l)} }`).join(', ')}]`;
    members.push(
      `  @${deco}(() => ${r.references}, (x) => x.${r.backField}, { onDelete: ${q(onDelete, l)}, onUpdate: ${q('CASCADE', l)} })\n` +
        `  @JoinColumn(${join})\n  ${r.field}!: ${r.references}${optional ? ' | null' : ''};`,
    );
  }
  for (const [other, r] of incoming(step, t.model)) {
    const one = isOneToOne(other, r);
    if (other.model !== t.model) imports.add(other.model);
    decorators.add(one ? 'OneToOne' : 'OneToMany');
    members.push(`  @${one ? 'OneToOne' : 'OneToMany'}(() => ${other.model}, (x) => x.${r.field})\n  ${r.backField}!: ${other.model}${one ? ' | null' : '[]'};`);
  }
  // many-to-many: the join table is owned by the model whose name sorts first (Prisma's column A)
  const pairs: Array<{ other: string; field: string; otherField: string }> = [];
  for (const m of t.manyToMany) pairs.push({ other: m.with, field: m.field, otherField: m.backField });
  for (const o of step.tables) for (const m of o.manyToMany) if (m.with === t.model) pairs.push({ other: o.model, field: m.backField, otherField: m.field });
  for (const p of pairs) {
    decorators.add('ManyToMany');
    if (p.other !== t.model) imports.add(p.other);
    const owner = t.model < p.other;
    const first = owner ? t.model : p.other;
    const second = owner ? p.other : t.model;
    if (owner) {
      decorators.add('JoinTable');
      members.push(
        `  @ManyToMany(() => ${p.other}, (x) => x.${p.otherField})\n` +
          `  @JoinTable({ name: ${q(`_${first}To${second}`, l)}, joinColumn: { name: ${q('A', l)} }, inverseJoinColumn: { name: ${q('B', l)} } })\n` +
          `  ${p.field}!: ${p.other}[];`,
      );
    } else {
      members.push(`  @ManyToMany(() => ${p.other}, (x) => x.${p.otherField}, { onDelete: ${q('CASCADE', l)}, onUpdate: ${q('CASCADE', l)} })\n  ${p.field}!: ${p.other}[];`);
    }
  }
  const head = [`import { ${[...decorators].sort().join(', ')} } from ${q('typeorm', l)};`];
  for (const i of [...imports].sort()) head.push(`import { ${i} } from ${q(`./${i}`, l)};`);
  if (enums.size > 0) head.push(`import { ${[...enums].sort().join(', ')} } from ${q('./enums', l)};`);
  return `${head.join('\n')}\n\n@Entity(${q(t.table, l)})\nexport class ${t.model} {\n${members.join(l.spaced ? '\n\n' : '\n')}\n}\n`;
}

function renderEnums(step: DemoStep, l: Layout): string {
  return step.enums.map((e) => `export enum ${e.name} {\n${e.values.map((v) => `  ${v} = ${q(v, l)},`).join('\n')}\n}\n`).join('\n');
}

const DATA_SOURCE = `import 'reflect-metadata';
import { DataSource } from 'typeorm';

// Neighbourhood tool-lending cooperative
export const AppDataSource = new DataSource({
  type: 'postgres',
  url: process.env.DATABASE_URL,
  entities: [__dirname + '/entity/*.{ts,js}'],
  synchronize: false,
});
`;

const TSCONFIG = `{
  "compilerOptions": {
    "target": "ES2021",
    "module": "commonjs",
    "strict": true,
    "experimentalDecorators": true,
    "emitDecoratorMetadata": true,
    "outDir": "dist",
    "rootDir": "src"
  }
}
`;

/** One step of the story as TypeORM source files (path -> text). */
export function renderTypeormStep(step: DemoStep): Record<string, string> {
  const l: Layout = step.variant === 'reformat' ? { spaced: false, quote: '"' } : { spaced: true, quote: "'" };
  const files: Record<string, string> = {};
  for (const t of step.tables) files[`src/entity/${t.model}.ts`] = renderEntity(t, step, l);
  if (step.enums.length > 0) files['src/entity/enums.ts'] = renderEnums(step, l);
  if (step.variant === 'broken') {
    files['src/entity/Fee.ts'] = "import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';\n\n@Entity('fees')\nexport class Fee {\n  @PrimaryGeneratedColumn({ name: 'id' })\n  id!: number;\n\n  @Column({ name: 'amount', type: 'decimal', precision: 8, scale: 2 \n  amount!: string;\n";
  }
  return files;
}

/** The demo story as TypeORM entity files: each step's tree is exactly its files. */
export function renderTypeormDemo(story: DemoStory): DemoCommitFiles[] {
  return story.steps.map((s) => ({
    replaceTree: true,
    files: {
      'README.md': `# ${story.title}\n\nDemo data for schema-strata (invented).\n`,
      'package.json': '{\n  "name": "tool-coop",\n  "private": true,\n  "dependencies": { "typeorm": "^0.3.0", "pg": "^8.0.0", "reflect-metadata": "^0.2.0" }\n}\n',
      'tsconfig.json': TSCONFIG,
      'src/data-source.ts': DATA_SOURCE,
      ...renderTypeormStep(s),
    },
  }));
}
