import { TOPOLOGY_CLASSES } from '../analysis/graph/topology-class.js';
import { formatP } from '../analysis/stats/reading.js';
import { contingencyText, type TextStyle } from '../analysis/text/analysis-text.js';
import type { ContingencyAnalysis } from '../analysis/types.js';
import { alignRows } from '../cli/format.js';
import type { RepositoryOutcome } from './runner.js';
import type { StudyDocument } from './study-document.js';

const plain: TextStyle = { bold: (s) => s, dim: (s) => s };

/** What became of the repositories of a run: counts, then each failure with its reason. */
export function formatRunSummary(outcomes: readonly RepositoryOutcome[], output: string): string {
  const n = (s: RepositoryOutcome['status']): number => outcomes.filter((o) => o.status === s).length;
  const failed = outcomes.filter((o) => o.status === 'failed');
  const lines = [
    `study of ${outcomes.length} repositor${outcomes.length === 1 ? 'y' : 'ies'}: ${n('extracted')} extracted, ${n('unchanged')} unchanged since the last run, ${failed.length} failed; results in ${output}`,
  ];
  if (failed.length > 0) {
    lines.push(`failed (${failed.length}):`);
    for (const o of failed) lines.push(`  ${o.label}: ${o.reason ?? 'unknown reason'}${o.earlier ? ' (failed the same way in the last run; --retry-failed runs it again)' : ''}`);
  }
  return lines.join('\n') + '\n';
}

const pct = (x: number | null): string => (x === null ? '-' : `${x.toFixed(1)}%`);
const p = (r: { computable: boolean; pValue?: number }): string => (r.computable ? formatP(r.pValue!) : '-');
const v = (c: ContingencyAnalysis): string => (c.cramersV.computable ? c.cramersV.value.toFixed(3) : '-');

/**
 * The study as text for a terminal: the projects side by side (class counts and shares), each
 * project's tests in one row, the pooled contingency tables with their tests, the stratified
 * tests, and the caution that association is not causation.
 */
export function studyText(study: StudyDocument, style: TextStyle = plain): string {
  const a = study.analysis;
  if (!a) return 'No project could be analysed, so there is nothing to pool.\n';
  const out: string[] = [];
  const done = a.projects.length;
  out.push(style.bold(`Study of ${done} project${done === 1 ? '' : 's'}: ${a.pooled.units} tables in the measures`), '');

  out.push(style.bold('Topology classes by project (tables in the measures; count and share)'));
  const w = String(a.pooled.units).length;
  const cell = (n: number, share: number | null): string => `${String(n).padStart(w)} ${pct(share).padStart(6)}`;
  const shareRows: string[][] = [['project', 'versions', 'tables', ...TOPOLOGY_CLASSES, 'initial', 'later']];
  for (const r of a.projects) {
    shareRows.push([r.project, String(r.versions), String(r.included), ...TOPOLOGY_CLASSES.map((c) => cell(r.classes[c], r.classShares[c])), String(r.birthGroups.initial), String(r.birthGroups.later)]);
  }
  const pooledBirth = a.pooled.statistics.classByBirthGroup.table;
  shareRows.push(['pooled', '', String(a.pooled.units), ...TOPOLOGY_CLASSES.map((c) => cell(a.pooled.classes[c], a.pooled.classShares[c])), String(pooledBirth.columnTotals[0] ?? 0), String(pooledBirth.columnTotals[1] ?? 0)]);
  out.push(...alignRows(shareRows, '  '), '');

  out.push(style.bold('Tests per project (p-values; - where not computable)'));
  const testRows: string[][] = [['project', 'class x birth: chi-sq', 'exact', "V", 'class x band: chi-sq', 'exact', 'V', 'Spearman rho', 'p', 'Kruskal-Wallis p']];
  const row = (name: string, s: (typeof a.perProject)[number]['statistics']): string[] => [
    name,
    p(s.classByBirthGroup.chiSquare),
    p(s.classByBirthGroup.exact),
    v(s.classByBirthGroup),
    p(s.classByActivityBand.chiSquare),
    p(s.classByActivityBand.exact),
    v(s.classByActivityBand),
    s.degreeVersusUpdates.computable ? s.degreeVersusUpdates.rho.toFixed(3) : '-',
    p(s.degreeVersusUpdates),
    p(s.updatesByClass),
  ];
  for (const pp of a.perProject) testRows.push(row(pp.project, pp.statistics));
  testRows.push(row('pooled', a.pooled.statistics));
  out.push(...alignRows(testRows, '  '), '');

  const st = a.pooled.statistics;
  out.push(...contingencyText('Pooled: topology class by birth group', st.classByBirthGroup, style), '');
  out.push(...contingencyText('Pooled: topology class by activity band', st.classByActivityBand, style), '');
  out.push(style.bold('Pooled: degree and updates'), `  ${st.degreeVersusUpdates.reading}`, `  ${st.updatesByClass.reading}`, '');
  out.push(style.bold('Within projects (stratified by project)'), `  ${a.stratified.classByBirthGroup.reading}`, `  ${a.stratified.classByActivityBand.reading}`, '');
  out.push(style.bold('Caution'), `  ${a.caution}`, '');
  return out.join('\n');
}
