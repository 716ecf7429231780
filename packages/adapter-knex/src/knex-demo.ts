import type { DemoColumn, DemoCommitFiles, DemoRelation, DemoStep, DemoStory, DemoTable } from '@schema-strata/core/extract';

/*
 * Core's demo story written as Knex migrations: one knexfile, and one new migration per step,
 * computed from the difference between the step and the one before. Physical names are those
 * of the other adapters' demos (Prisma's implicit many-to-many table `_TagToTool` with columns
 * A and B included), so that the three ORMs' demos describe the same database.
 */

const ACTION = { cascade: 'CASCADE', restrict: 'RESTRICT', 'set null': 'SET NULL' } as const;

type Style = 'compact' | 'spread';

interface Ctx {
  /** Table name of each model, in the step being rendered. */
  tableOf: Map<string, string>;
  enums: Map<string, string[]>;
  style: Style;
}

const q = (s: string): string => `'${s.replace(/\\/g, '\\\\').replace(/'/g, "\\'")}'`;

/** The column builder call of a demo column, without nullability and default. */
function columnCall(c: DemoColumn, ctx: Ctx): string {
  switch (c.type) {
    case 'serial':
      return `increments(${q(c.name)})`;
    case 'int':
      return `integer(${q(c.name)})`;
    case 'string':
      return c.length ? `string(${q(c.name)}, ${c.length})` : `string(${q(c.name)})`;
    case 'text':
      return `text(${q(c.name)})`;
    case 'boolean':
      return `boolean(${q(c.name)})`;
    case 'date':
      return `date(${q(c.name)})`;
    case 'datetime':
      // as Prisma's DateTime on PostgreSQL: timestamp(3) without time zone
      return `timestamp(${q(c.name)}, { useTz: false, precision: 3 })`;
    case 'decimal':
      return `decimal(${q(c.name)}, ${c.precision ?? 10}, ${c.scale ?? 2})`;
    case 'enum': {
      const values = ctx.enums.get(c.enum!) ?? [];
      return `enu(${q(c.name)}, [${values.map(q).join(', ')}], { useNative: true, enumName: ${q(c.enum!)} })`;
    }
  }
}

function defaultCall(c: DemoColumn): string {
  if (c.default === undefined) return '';
  if (c.default === 'now') return '.defaultTo(knex.fn.now())';
  return `.defaultTo(${typeof c.default === 'string' ? q(c.default) : String(c.default)})`;
}

function columnLine(t: DemoTable, c: DemoColumn, ctx: Ctx, alter = false): string {
  const mods: string[] = [];
  if (c.type !== 'serial') mods.push(c.nullable ? '.nullable()' : '.notNullable()');
  const d = defaultCall(c);
  if (d) mods.push(d);
  if (c.unique && !alter) mods.push('.unique()');
  const rel = !alter ? t.relations.find((r) => r.columns.length === 1 && r.columns[0] === c.name) : undefined;
  if (rel) mods.push(...relationCalls(rel, ctx));
  if (alter) mods.push('.alter()');
  return chain(`t.${columnCall(c, ctx)}`, mods, ctx.style);
}

function relationCalls(r: DemoRelation, ctx: Ctx): string[] {
  const calls = [`.references('id')`, `.inTable(${q(ctx.tableOf.get(r.references) ?? r.references)})`];
  if (r.onDelete) calls.push(`.onDelete(${q(ACTION[r.onDelete])})`);
  return calls;
}

function chain(head: string, mods: string[], style: Style): string {
  if (style === 'compact' || mods.length < 3) return `${head}${mods.join('')};`;
  return `${head}\n${mods.map((m) => `  ${m}`).join('\n')};`;
}

function indent(lines: string[], n: number): string[] {
  const pad = ' '.repeat(n);
  return lines.flatMap((l) => l.split('\n')).map((l) => (l ? pad + l : l));
}

/** A createTable call for a demo table. */
function createTable(t: DemoTable, ctx: Ctx): string[] {
  const body: string[] = [];
  for (const c of t.columns) body.push(columnLine(t, c, ctx));
  const single = t.primaryKey.length === 1 && t.columns.find((c) => c.name === t.primaryKey[0])?.type === 'serial';
  if (!single && t.primaryKey.length > 0) body.push(`t.primary([${t.primaryKey.map(q).join(', ')}]);`);
  for (const r of t.relations) {
    if (r.columns.length === 1) continue;
    body.push(chain(`t.foreign([${r.columns.map(q).join(', ')}])`, relationCalls(r, ctx), ctx.style));
  }
  return [`await knex.schema.createTable(${q(t.table)}, (t) => {`, ...indent(body, 2), '});'];
}

/** Implicit many-to-many join tables, named and shaped as Prisma's (`_AToB`, columns A and B). */
function joinTables(step: DemoStep): DemoTable[] {
  const out: DemoTable[] = [];
  for (const t of step.tables) {
    for (const m of t.manyToMany) {
      const [a, b] = [t.model, m.with].sort() as [string, string];
      out.push({
        model: `${a}To${b}`,
        table: `_${a}To${b}`,
        columns: [
          { name: 'A', field: 'A', type: 'int' },
          { name: 'B', field: 'B', type: 'int' },
        ],
        primaryKey: ['A', 'B'],
        relations: [],
        manyToMany: [],
        // referenced models are kept aside: the join table's keys are written by joinTable()
        ...{ joins: [a, b] },
      } as DemoTable & { joins: [string, string] });
    }
  }
  return out;
}

function joinTableCall(j: DemoTable & { joins?: [string, string] }, ctx: Ctx): string[] {
  const [a, b] = j.joins!;
  const key = (col: string, model: string): string =>
    chain(`t.integer(${q(col)})`, ['.notNullable()', `.references('id')`, `.inTable(${q(ctx.tableOf.get(model)!)})`, `.onDelete('CASCADE')`, `.onUpdate('CASCADE')`], ctx.style);
  return [
    `await knex.schema.createTable(${q(j.table)}, (t) => {`,
    ...indent([key('A', a), key('B', b), `t.primary(['A', 'B']);`], 2),
    '});',
  ];
}

/** Tables of a step by physical name, join tables included. */
function tablesOf(step: DemoStep): Map<string, DemoTable> {
  return new Map([...step.tables, ...joinTables(step)].map((t) => [t.table, t]));
}

const sameColumn = (a: DemoColumn, b: DemoColumn): boolean =>
  a.type === b.type && a.length === b.length && a.precision === b.precision && a.scale === b.scale && !!a.nullable === !!b.nullable && a.default === b.default && a.enum === b.enum;

const relKey = (r: DemoRelation): string => `${r.columns.join(',')}>${r.references}:${r.onDelete ?? ''}`;

/** Order new tables so that a table comes after the tables it references. */
function creationOrder(tables: DemoTable[], ctx: Ctx): DemoTable[] {
  const names = new Set(tables.map((t) => t.table));
  const done = new Set<string>();
  const out: DemoTable[] = [];
  const visit = (t: DemoTable, depth: number): void => {
    if (done.has(t.table) || depth > tables.length) return;
    const deps = [...t.relations.map((r) => ctx.tableOf.get(r.references)!), ...((t as { joins?: string[] }).joins ?? []).map((m) => ctx.tableOf.get(m)!)];
    for (const d of deps) {
      const dt = tables.find((x) => x.table === d);
      if (dt && dt !== t && names.has(d)) visit(dt, depth + 1);
    }
    done.add(t.table);
    out.push(t);
  };
  for (const t of tables) visit(t, 0);
  return out;
}

/** The statements of the migration from one step to the next. */
function migrationBody(prev: DemoStep | null, step: DemoStep, style: Style): string[] {
  const ctx: Ctx = {
    tableOf: new Map(step.tables.map((t) => [t.model, t.table])),
    enums: new Map(step.enums.map((e) => [e.name, e.values])),
    style,
  };
  const before = prev ? tablesOf(prev) : new Map<string, DemoTable>();
  const after = tablesOf(step);
  const out: string[] = [];
  const prevEnums = new Map((prev?.enums ?? []).map((e) => [e.name, e.values]));

  // new tables first: the changed ones may point at them
  const added = creationOrder([...after.values()].filter((t) => !before.has(t.table)), ctx);
  for (const t of added) out.push(...((t as { joins?: unknown }).joins ? joinTableCall(t, ctx) : createTable(t, ctx)));
  // tables that are changed
  for (const [name, t] of after) {
    const old = before.get(name);
    if (!old) continue;
    const lines: string[] = [];
    const later: string[] = [];
    const oldCols = new Map(old.columns.map((c) => [c.name, c]));
    const newCols = new Map(t.columns.map((c) => [c.name, c]));
    const oldRels = new Map(old.relations.map((r) => [relKey(r), r]));
    const newRels = new Map(t.relations.map((r) => [relKey(r), r]));
    for (const r of old.relations) {
      if (newRels.has(relKey(r))) continue;
      lines.push(`t.dropForeign([${r.columns.map(q).join(', ')}]);`);
    }
    const pkChanged = old.primaryKey.join() !== t.primaryKey.join();
    for (const c of old.columns) if (!newCols.has(c.name)) lines.push(`t.dropColumn(${q(c.name)});`);
    for (const c of t.columns) {
      const o = oldCols.get(c.name);
      if (!o) {
        lines.push(columnLine({ ...t, relations: t.relations.filter((r) => !oldRels.has(relKey(r))) }, c, ctx));
        continue;
      }
      const enumChanged = c.type === 'enum' && (prevEnums.get(c.enum!) ?? []).join() !== (ctx.enums.get(c.enum!) ?? []).join();
      if (enumChanged) {
        // a native enum's values change: the column is made again on a new type
        out.push(`await knex.schema.alterTable(${q(name)}, (t) => {`, `  t.dropColumn(${q(c.name)});`, '});');
        out.push(`await knex.schema.raw('DROP TYPE IF EXISTS "${c.enum}"');`);
        later.push(columnLine(t, c, ctx));
        continue;
      }
      if (!sameColumn(o, c)) lines.push(columnLine(t, c, ctx, true));
      if (c.unique && !o.unique) lines.push(`t.unique([${q(c.name)}]);`);
      if (!c.unique && o.unique) lines.push(`t.dropUnique([${q(c.name)}]);`);
    }
    if (pkChanged && t.primaryKey.length > 0 && !t.columns.some((c) => c.type === 'serial' && t.primaryKey.length === 1 && t.primaryKey[0] === c.name)) {
      if (old.primaryKey.every((k) => newCols.has(k)) && old.primaryKey.length > 0) lines.push('t.dropPrimary();');
      lines.push(`t.primary([${t.primaryKey.map(q).join(', ')}]);`);
    }
    for (const r of t.relations) {
      if (oldRels.has(relKey(r))) continue;
      if (r.columns.length === 1 && !oldCols.has(r.columns[0]!)) continue; // written with its new column
      lines.push(chain(`t.foreign([${r.columns.map(q).join(', ')}])`, relationCalls(r, ctx), style));
    }
    if (lines.length > 0) out.push(`await knex.schema.alterTable(${q(name)}, (t) => {`, ...indent(lines, 2), '});');
    if (later.length > 0) out.push(`await knex.schema.alterTable(${q(name)}, (t) => {`, ...indent(later, 2), '});');
  }
  // removed tables
  for (const name of before.keys()) if (!after.has(name)) out.push(`await knex.schema.dropTable(${q(name)});`);
  return out;
}

function migrationFile(body: string[], style: Style): string {
  const lines = [
    '/** @param {import("knex").Knex} knex */',
    'exports.up = async function (knex) {',
    ...indent(body, style === 'spread' ? 4 : 2),
    '};',
    '',
    'exports.down = async function () {',
    style === 'spread' ? '    // migrations of the co-op are not rolled back' : '  // migrations of the co-op are not rolled back',
    '};',
    '',
  ];
  return lines.join('\n');
}

function slug(message: string): string {
  return message.toLowerCase().replace(/[^a-z0-9]+/g, '_').replace(/^_+|_+$/g, '').slice(0, 48);
}

function stamp(date: string): string {
  const d = new Date(date);
  const p = (n: number): string => String(n).padStart(2, '0');
  return `${d.getUTCFullYear()}${p(d.getUTCMonth() + 1)}${p(d.getUTCDate())}${p(d.getUTCHours())}${p(d.getUTCMinutes())}${p(d.getUTCSeconds())}`;
}

/** The migration of one step (the difference from the step before), or null when the schema did not change. */
export function renderKnexStep(prev: DemoStep | null, step: DemoStep, style: Style = 'compact'): string | null {
  const body = migrationBody(prev, step, style);
  return body.length === 0 ? null : migrationFile(body, style);
}

const KNEXFILE = `// Knex configuration of the co-op's lending register.
const path = require('path');

module.exports = {
  client: 'pg',
  connection: process.env.DATABASE_URL,
  migrations: {
    directory: path.join(__dirname, 'migrations'),
  },
};
`;

/**
 * The demo story as Knex migrations: a knexfile and one new migration per step; the
 * `reformat` step re-indents the first migration (no schema change), the `broken` step adds a
 * migration with a syntax error that the next step fixes.
 */
export function renderKnexDemo(story: DemoStory): DemoCommitFiles[] {
  const out: DemoCommitFiles[] = [];
  let prev: DemoStep | null = null;
  let first: { path: string; step: DemoStep } | null = null;
  let broken: string | null = null;
  story.steps.forEach((step, i) => {
    const files: Record<string, string | null> = {};
    if (i === 0) {
      files['knexfile.js'] = KNEXFILE;
      files['package.json'] = '{\n  "name": "tool-coop",\n  "private": true,\n  "dependencies": {\n    "knex": "^3.1.0",\n    "pg": "^8.11.0"\n  }\n}\n';
      files['README.md'] = `# ${story.title}\n\nDemo data for schema-strata (invented).\n`;
    }
    if (step.variant === 'reformat' && first) {
      files[first.path] = renderKnexStep(null, first.step, 'spread')!;
    } else if (step.variant === 'broken') {
      broken = `migrations/${stamp(step.date)}_${slug(step.message)}.js`;
      files[broken] = [
        'exports.up = async function (knex) {',
        "  await knex.schema.createTable('fees', (t) => {",
        "    t.increments('id');",
        "    t.integer('loan_id').notNullable().references('id').inTable('loans'",
        '  });',
        '};',
        '',
      ].join('\n');
    } else {
      const text = renderKnexStep(prev, step);
      if (text) {
        const path = broken ?? `migrations/${stamp(step.date)}_${slug(step.message)}.js`;
        files[path] = text;
        broken = null;
        if (!first) first = { path, step };
      }
    }
    if (step.variant !== 'broken') prev = step;
    out.push({ files });
  });
  return out;
}
