import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { extractHistory, type ScriptedCommit } from '@schema-strata/core';
import { typeormAdapter } from '@schema-strata/adapter-typeorm';
import { runAdapter, writeWithTrees } from './harness.js';

/**
 * The run's assembly takes over what did not change from version to version; at every version
 * it must give exactly what a fresh assembly of that version's files gives. A seeded random
 * history of related entities, a shared base class, an enum file and a custom decorator,
 * with every kind of edit (columns, key types and names, table names, relations, base class,
 * enum values, files added and removed).
 */

function rng(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s * 1664525 + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

interface EntityState { table?: string; pk: 'int' | 'uuid' | 'code'; cols: number; length: number; target: number; jt: boolean; alive: boolean }

const N = 16;
const cls = (i: number): string => `Thing${i}`;
const path = (i: number): string => `src/thing${i}.ts`;

function entity(i: number, st: EntityState[]): string {
  const s = st[i]!;
  const t = s.target >= 0 && st[s.target]!.alive ? s.target : -1;
  const lines = [
    "import { Column, Entity, JoinTable, ManyToMany, ManyToOne, PrimaryColumn, PrimaryGeneratedColumn } from 'typeorm';",
    "import { Row } from './row';",
    "import { Kind } from './kind';",
    "import { Code } from './code';",
    ...(t >= 0 ? [`import { ${cls(t)} } from './thing${t}';`] : []),
    '',
    `@Entity(${s.table ? `'${s.table}'` : ''})`,
    `export class ${cls(i)} extends Row {`,
    s.pk === 'int' ? '  @PrimaryGeneratedColumn()\n  id: number;' : s.pk === 'uuid' ? "  @PrimaryGeneratedColumn('uuid')\n  id: string;" : '  @PrimaryColumn({ length: 12 })\n  id: string;',
    `  @Column({ length: ${s.length} })\n  label: string;`,
    "  @Column({ type: 'enum', enum: Kind, default: Kind.A })\n  kind: Kind;",
    '  @Code()\n  code: string;',
  ];
  for (let c = 0; c < s.cols; c++) lines.push(`  @Column({ nullable: true })\n  extra${c}: number;`);
  if (t >= 0) lines.push(`  @ManyToOne(() => ${cls(t)}, { onDelete: 'CASCADE' })\n  parent: ${cls(t)};`);
  if (t >= 0 && s.jt) lines.push(`  @ManyToMany(() => ${cls(t)})\n  @JoinTable()\n  links: ${cls(t)}[];`);
  lines.push('}', '');
  return lines.join('\n');
}

function history(): ScriptedCommit[] {
  const rand = rng(7);
  const st: EntityState[] = Array.from({ length: N }, (_, i) => ({ pk: 'int', cols: 1, length: 40, target: i > 0 ? Math.floor(rand() * i) : -1, jt: rand() < 0.3, alive: true }));
  let kinds = ['a', 'b'];
  let base = 0;
  let codeLength = 8;
  const kindFile = (): string => `export enum Kind {\n${kinds.map((k) => `  ${k.toUpperCase()} = '${k}',`).join('\n')}\n}\n`;
  const rowFile = (): string => `import { Column } from 'typeorm';\n\nexport abstract class Row {\n${Array.from({ length: base }, (_, k) => `  @Column({ default: ${k} })\n  common${k}: number;\n`).join('\n')}}\n`;
  const codeFile = (): string => `import { Column } from 'typeorm';\n\nexport function Code() {\n  return Column({ type: 'varchar', length: ${codeLength} });\n}\n`;
  const all = (): Record<string, string | null> => {
    const f: Record<string, string | null> = {};
    for (let i = 0; i < N; i++) f[path(i)] = st[i]!.alive ? entity(i, st) : null;
    return f;
  };
  const commits: ScriptedCommit[] = [{ date: '2024-01-01T10:00:00+00:00', message: 'start', files: { 'src/row.ts': rowFile(), 'src/kind.ts': kindFile(), 'src/code.ts': codeFile(), ...all() } }];
  for (let k = 1; k < 70; k++) {
    const i = Math.floor(rand() * N);
    const s = st[i]!;
    const r = rand();
    let extra: Record<string, string | null> = {};
    if (r < 0.3) s.cols++;
    else if (r < 0.4) s.length = 20 + Math.floor(rand() * 100);
    else if (r < 0.5) s.pk = (['int', 'uuid', 'code'] as const)[Math.floor(rand() * 3)]!;
    else if (r < 0.58) s.table = s.table ? undefined : `table_${i}_${k}`;
    else if (r < 0.66) s.target = i > 0 ? Math.floor(rand() * i) : -1;
    else if (r < 0.72) s.jt = !s.jt;
    else if (r < 0.78) {
      base++;
      extra = { 'src/row.ts': rowFile() };
    } else if (r < 0.84) {
      kinds = [...kinds, `k${k}`];
      extra = { 'src/kind.ts': kindFile() };
    } else if (r < 0.9) {
      codeLength++;
      extra = { 'src/code.ts': codeFile() };
    } else if (i > 0) s.alive = !s.alive;
    commits.push({ date: new Date(Date.UTC(2024, 0, 1, 10 + k)).toISOString().replace('.000Z', '+00:00'), message: `edit ${k}`, files: { ...all(), ...extra } });
  }
  return commits;
}

/** Check every version of a run against a fresh assembly of that version's files. */
async function checkAgainstFresh(commits: ScriptedCommit[], minVersions: number): Promise<void> {
  const repo = mkdtempSync(join(tmpdir(), 'strata-typeorm-incremental-'));
  dirs.push(repo);
  const { trees } = await writeWithTrees(repo, commits);
  const h = await extractHistory({ repo, adapter: typeormAdapter });
  const canon = (t: object): string =>
    JSON.stringify(t, (k, v) => (k === 'origin' || k === 'id' ? undefined : v && typeof v === 'object' && Array.isArray(v) && (k === 'foreignKeys' || k === 'uniques') ? [...v].map((x) => JSON.stringify(x)).sort() : v));
  expect(h.versions.length).toBeGreaterThanOrEqual(minVersions);
  for (const v of h.versions) {
    const fresh = await runAdapter(trees.get(v.commit)!);
    const ours = h.snapshots.get(v.snapshot!)!.tables.map((t) => canon(t.table)).sort();
    expect(ours, `version ${v.index} (${v.subject})`).toEqual(fresh.snapshot!.tables.map(canon).sort());
    const codes = (list: Array<{ code: string; message: string }>): string[] => list.map((d) => `${d.code} ${d.message}`).sort();
    expect(codes(v.diagnostics.filter((d) => d.code.startsWith('typeorm/')))).toEqual(codes(fresh.diagnostics.filter((d) => d.code.startsWith('typeorm/'))));
  }
}

/** A single-table parent whose own files stay the same while the entity it references changes. */
function singleTableHistory(): ScriptedCommit[] {
  const shed = (key: string): string =>
    `import { Entity, PrimaryColumn, PrimaryGeneratedColumn, Column } from 'typeorm';\n\n@Entity()\nexport class Shed {\n  ${key}\n  @Column()\n  name: string;\n}\n`;
  const tool = [
    "import { ChildEntity, Column, Entity, ManyToOne, PrimaryGeneratedColumn, TableInheritance } from 'typeorm';",
    "import { Shed } from './shed';",
    '',
    "@Entity()\n@TableInheritance({ column: { type: 'varchar', name: 'kind' } })",
    'export class Tool {\n  @PrimaryGeneratedColumn()\n  id: number;\n  @Column()\n  name: string;\n  @ManyToOne(() => Shed)\n  shed: Shed;\n}',
    '',
    '@ChildEntity()\nexport class PowerTool extends Tool {\n  @Column()\n  voltage: number;\n}',
    '',
  ].join('\n');
  return [
    { date: '2024-02-01T10:00:00+00:00', message: 'tools in sheds', files: { 'src/shed.ts': shed('@PrimaryGeneratedColumn()\n  id: number;'), 'src/tool.ts': tool } },
    { date: '2024-02-02T10:00:00+00:00', message: 'sheds keyed by code', files: { 'src/shed.ts': shed('@PrimaryColumn({ length: 12 })\n  id: string;') } },
    { date: '2024-02-03T10:00:00+00:00', message: 'sheds keyed by uuid', files: { 'src/shed.ts': shed("@PrimaryGeneratedColumn('uuid')\n  id: string;") } },
  ];
}

const dirs: string[] = [];
afterAll(() => {
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

describe('the assembly of a run', () => {
  it('gives at every version what a fresh assembly gives', async () => {
    await checkAgainstFresh(history(), 41);
  }, 120_000);

  it('keeps the children of a single-table parent that is built again for the entity it references', async () => {
    await checkAgainstFresh(singleTableHistory(), 3);
  }, 60_000);
});
