import type { InterchangeDocument } from '../../interchange/document.js';
import type { ContingencyAnalysis, Analysis } from '../types.js';

export interface TextStyle {
  bold(s: string): string;
  dim(s: string): string;
}

const plain: TextStyle = { bold: (s) => s, dim: (s) => s };

/** Lay out rows as aligned columns; columns listed in `right` are right-aligned. */
function align(rows: string[][], right: ReadonlySet<number> = new Set(), indent = '  '): string[] {
  const widths: number[] = [];
  for (const r of rows) r.forEach((c, i) => (widths[i] = Math.max(widths[i] ?? 0, c.length)));
  return rows.map((r) => indent + r.map((c, i) => (right.has(i) ? c.padStart(widths[i]!) : i === r.length - 1 ? c : c.padEnd(widths[i]!))).join('  ').trimEnd());
}

const pct = (x: number | null): string => (x === null ? '-' : `${x.toFixed(1)}%`);
const num = (x: number, d = 1): string => x.toFixed(d);
const day = (iso: string): string => iso.slice(0, 10);

export function contingencyText(title: string, c: ContingencyAnalysis, style: TextStyle): string[] {
  const t = c.table;
  const out = [style.bold(`${title} (${t.total} tables; count, row %, expected count)`)];
  const rows: string[][] = [[t.rowVariable, ...t.columns, 'total']];
  t.rows.forEach((r, i) => {
    rows.push([r, ...t.columns.map((_, j) => `${t.counts[i]![j]}  ${pct(t.rowPercent[i]![j]!).padStart(6)}  (${num(t.expected[i]![j]!, 2)})`), String(t.rowTotals[i])]);
  });
  rows.push(['total', ...t.columnTotals.map((n, j) => `${n}  ${pct(t.total ? (100 * n) / t.total : null).padStart(6)}`), String(t.total)]);
  out.push(...align(rows, new Set(t.columns.map((_, j) => j + 1).concat([t.columns.length + 1]))));
  if (c.leftOut.length > 0) out.push(style.dim(`  not in this table: ${c.leftOut.map((l) => l.table).join(', ')} (${c.leftOut[0]!.reason})`));
  out.push('', ...c.reading.map((s) => `  ${s}`));
  return out;
}

/**
 * The analysis as text for a terminal: a summary line, the tables with their measures, the
 * growth curve, the contingency tables with percentages and expected counts, every test's
 * result in a sentence, and the caution that association is not causation.
 */
export function analysisText(doc: InterchangeDocument, a: Analysis, style: TextStyle = plain, opts: { growthPoints?: number } = {}): string {
  const o = a.options;
  const out: string[] = [];
  const s = a.summary;
  const first = a.versions[0]!;
  const last = a.versions[a.versions.length - 1]!;
  out.push(
    style.bold(`Analysis of ${doc.source.repository} at ${doc.source.ref} (${doc.source.adapter.name})`),
    `${s.versions} versions from ${day(first.date)} to ${day(last.date)}; ${s.tables} tables ever existed, ${s.included} in the measures` +
      `${s.excluded ? ` (${s.excluded} left out)` : ''}; ${s.changes} changes, ${s.countedUpdates} of them counted updates.`,
    style.dim(
      `Counted updates: ${o.count.join(', ')}. Activity bands: unchanged 0, low 1 to ${o.highAbove}, high above ${o.highAbove}` +
        `${o.bandBy === 'total' ? '' : ` (${o.bandBy} rate)`}. Initial: born at version ${o.initialCutoff <= 0 ? '0' : `0 to ${o.initialCutoff}`}.` +
        `${o.renames === 'heuristic' ? ` Renames: heuristic (${a.renames.length} found).` : ''}`,
    ),
    '',
  );

  out.push(style.bold('Tables'));
  const rows: string[][] = [['table', 'born', 'removed', 'group', 'versions', 'days', 'columns', 'updates', 'per year', 'band', 'in', 'out', 'class', 'class changes']];
  for (const t of a.tables) {
    const g = t.graph;
    rows.push([
      t.id,
      String(t.birth.version),
      t.removal ? String(t.removal.version) : '-',
      t.birthGroup,
      String(t.lifetime.versions),
      num(t.lifetime.days),
      `${t.columns.atBirth}->${t.columns.atEnd}`,
      String(t.countedUpdates),
      t.updatesPerYear === null ? '-' : num(t.updatesPerYear, 2),
      t.activityBand ?? '-',
      g ? String(g.inDegree) : '-',
      g ? String(g.outDegree) : '-',
      g ? g.class : `(left out: ${t.excludedBecause})`,
      g ? String(g.classChanges) : '',
    ]);
  }
  out.push(...align(rows, new Set([1, 2, 4, 5, 7, 8, 10, 11, 13])));
  const selfRefs = a.tables.filter((t) => t.graph && t.graph.selfReferences > 0).map((t) => t.id);
  const parallel = a.tables.flatMap((t) => (t.graph?.references ?? []).filter((r) => r.foreignKeys > 1).map((r) => `${t.id} -> ${r.table} (${r.foreignKeys})`));
  if (selfRefs.length) out.push(style.dim(`  self-references (not counted in the degrees): ${selfRefs.join(', ')}`));
  if (parallel.length) out.push(style.dim(`  parallel foreign keys (counted once): ${parallel.join(', ')}`));
  if (a.graph.dangling.length) out.push(style.dim(`  foreign keys to tables that never existed (left out of the degrees): ${a.graph.dangling.map((d) => `${d.table}(${d.columns.join(',')}) -> ${d.referencedTable}`).join(', ')}`));
  out.push('');

  out.push(style.bold('Growth'));
  const n = a.versions.length;
  const points = Math.min(n, opts.growthPoints ?? 12);
  const picks = new Set<number>();
  for (let i = 0; i < points; i++) picks.add(Math.round((i * (n - 1)) / Math.max(1, points - 1)));
  const g: string[][] = [['version', 'date', 'tables', 'columns', 'FKs', 'changes', 'updates', 'isolated', 'source', 'sink', 'intermediate']];
  for (const i of [...picks].sort((x, y) => x - y)) {
    const v = a.versions[i]!;
    const changes = Object.values(v.changes).reduce((x, y) => x + y, 0);
    g.push([String(v.index), day(v.date), String(v.tables), String(v.columns), String(v.foreignKeys), String(changes), String(v.countedUpdates), String(v.classes.isolated), String(v.classes.source), String(v.classes.sink), String(v.classes.intermediate)]);
  }
  out.push(...align(g, new Set([0, 2, 3, 4, 5, 6, 7, 8, 9, 10])));
  if (points < n) out.push(style.dim(`  (${points} of ${n} versions; every version is in --json and versions.csv)`));
  out.push('');

  const st = a.statistics;
  out.push(...contingencyText('Topology class by birth group', st.classByBirthGroup, style), '');
  out.push(...contingencyText('Topology class by activity band', st.classByActivityBand, style), '');
  out.push(style.bold('Degree and updates'), `  ${st.degreeVersusUpdates.reading}`, `  ${st.updatesByClass.reading}`, '');
  out.push(style.bold('Caution'), `  ${st.caution}`, '');
  return out.join('\n');
}
