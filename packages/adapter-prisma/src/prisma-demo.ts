import type { DemoColumn, DemoCommitFiles, DemoStep, DemoStory, DemoTable } from '@schema-strata/core/extract';

const ACTION = { cascade: 'Cascade', restrict: 'Restrict', 'set null': 'SetNull' } as const;

function fieldType(c: DemoColumn): { type: string; attrs: string[] } {
  const attrs: string[] = [];
  let type: string;
  switch (c.type) {
    case 'serial':
      type = 'Int';
      attrs.push('@default(autoincrement())');
      break;
    case 'int':
      type = 'Int';
      break;
    case 'string':
      type = 'String';
      if (c.length) attrs.push(`@db.VarChar(${c.length})`);
      break;
    case 'text':
      type = 'String';
      break;
    case 'boolean':
      type = 'Boolean';
      break;
    case 'date':
      type = 'DateTime';
      attrs.push('@db.Date');
      break;
    case 'datetime':
      type = 'DateTime';
      break;
    case 'decimal':
      type = 'Decimal';
      attrs.push(`@db.Decimal(${c.precision ?? 10}, ${c.scale ?? 2})`);
      break;
    case 'enum':
      type = c.enum!;
      break;
  }
  if (c.default !== undefined) attrs.unshift(c.default === 'now' ? '@default(now())' : `@default(${String(c.default)})`);
  return { type, attrs };
}

function relationName(t: DemoTable, target: string): string | undefined {
  // self-relations need a name; so do several relations between one pair of models
  return t.model === target ? `${t.model}Self` : undefined;
}

function renderModel(t: DemoTable, step: DemoStep, aligned: boolean): string {
  const rows: string[][] = [];
  const byName = new Map(t.columns.map((c) => [c.name, c]));
  const fieldOf = (name: string): string => byName.get(name)?.field ?? name;
  for (const c of t.columns) {
    const { type, attrs } = fieldType(c);
    const a: string[] = [];
    if (t.primaryKey.length === 1 && t.primaryKey[0] === c.name) a.push('@id');
    a.push(...attrs.filter((x) => x.startsWith('@default')));
    if (c.unique) a.push('@unique');
    if (c.field !== c.name) a.push(`@map("${c.name}")`);
    a.push(...attrs.filter((x) => !x.startsWith('@default')));
    rows.push([c.field, type + (c.nullable ? '?' : ''), a.join(' ')]);
  }
  for (const r of t.relations) {
    const optional = r.columns.some((n) => byName.get(n)?.nullable);
    const name = relationName(t, r.references);
    const args = [
      ...(name ? [`"${name}"`] : []),
      `fields: [${r.columns.map(fieldOf).join(', ')}]`,
      'references: [id]',
      ...(r.onDelete ? [`onDelete: ${ACTION[r.onDelete]}`] : []),
    ];
    rows.push([r.field, r.references + (optional ? '?' : ''), `@relation(${args.join(', ')})`]);
  }
  // back-relation fields of relations that point here
  for (const other of step.tables) {
    for (const r of other.relations) {
      if (r.references !== t.model) continue;
      const unique = r.columns.length === 1 && other.columns.find((c) => c.name === r.columns[0])?.unique;
      const name = relationName(other, r.references);
      rows.push([r.backField, other.model + (unique ? '?' : '[]'), name ? `@relation("${name}")` : '']);
    }
  }
  for (const m of t.manyToMany) rows.push([m.field, `${m.with}[]`, '']);
  for (const other of step.tables) for (const m of other.manyToMany) if (m.with === t.model) rows.push([m.backField, `${other.model}[]`, '']);

  const widths = [0, 0];
  for (const r of rows) {
    widths[0] = Math.max(widths[0]!, r[0]!.length);
    widths[1] = Math.max(widths[1]!, r[1]!.length);
  }
  const lines = rows.map((r) =>
    aligned ? `  ${r[0]!.padEnd(widths[0]!)} ${r[1]!.padEnd(widths[1]!)} ${r[2]}`.trimEnd() : `  ${r[0]} ${r[1]} ${r[2]}`.trimEnd(),
  );
  if (t.primaryKey.length > 1) lines.push('', `  @@id([${t.primaryKey.map(fieldOf).join(', ')}])`);
  lines.push(aligned ? '' : '', `  @@map("${t.table}")`);
  return `model ${t.model} {\n${lines.join('\n')}\n}\n`;
}

/** One step of the story as a Prisma schema file. */
export function renderPrismaStep(step: DemoStep): string {
  const aligned = step.variant !== 'reformat';
  const parts: string[] = [];
  parts.push('// Neighbourhood tool-lending cooperative\n');
  // an older-style datasource with a connection URL, as most real histories have
  parts.push(`datasource db {\n  provider = "postgresql"\n  url      = env("DATABASE_URL")\n}\n`);
  parts.push(`generator client {\n  provider = "prisma-client-js"\n}\n`);
  for (const e of step.enums) parts.push(`enum ${e.name} {\n${e.values.map((v) => `  ${v}`).join('\n')}\n}\n`);
  for (const t of step.tables) parts.push(renderModel(t, step, aligned));
  if (step.variant === 'broken') parts.push('model Fee {\n  id     Int @id @default(autoincrement())\n  loan   Loan @relation(fields: [loanId], references: [id]\n');
  return parts.join(aligned ? '\n' : '\n\n');
}

/** The demo story as Prisma schema files: one `prisma/schema.prisma`, rewritten at every step. */
export function renderPrismaDemo(story: DemoStory): DemoCommitFiles[] {
  return story.steps.map((s, i) => ({
    files: {
      'prisma/schema.prisma': renderPrismaStep(s),
      ...(i === 0 ? { 'README.md': `# ${story.title}\n\nDemo data for schema-strata (invented).\n`, 'package.json': '{\n  "name": "tool-coop",\n  "private": true\n}\n' } : {}),
    },
  }));
}
