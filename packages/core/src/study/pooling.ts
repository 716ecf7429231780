import { statisticsOf } from '../analysis/analyze.js';
import { TOPOLOGY_CLASSES, type TopologyClass } from '../analysis/graph/topology-class.js';
import { ACTIVITY_BANDS, type ActivityBand } from '../analysis/lifecycle/activity-band.js';
import { BIRTH_GROUPS, type BirthGroup } from '../analysis/lifecycle/birth-group.js';
import type { AnalysisOptions } from '../analysis/options.js';
import { CAUTION, formatP } from '../analysis/stats/reading.js';
import type { Analysis, ContingencyAnalysis, Statistics, TableMeasures } from '../analysis/types.js';
import type { InterchangeDocument } from '../interchange/document.js';
import { cochranMantelHaenszel, type StratifiedResult } from './stratified.js';

/** The analysis options of a study: those of every project, with the rename detection asked for. */
export type StudyOptions = AnalysisOptions & { renames: 'stated' | 'heuristic' };

/** One project's row of the study: what it is, and how its tables fall into the classes, groups and bands. */
export interface ProjectRow {
  project: string;
  repository: string;
  head: string;
  adapter: string;
  versions: number;
  firstDate: string;
  lastDate: string;
  /** Tables that ever existed, and those in the measures (the units of the statistics). */
  tables: number;
  included: number;
  countedUpdates: number;
  /** Tables in the measures by topology class (history graph), and as percent of `included` (null when 0). */
  classes: Record<TopologyClass, number>;
  classShares: Record<TopologyClass, number | null>;
  birthGroups: Record<BirthGroup, number>;
  activityBands: Record<ActivityBand, number>;
}

/** The stratified test of one pair of variables across the projects, with a reading. */
export type StratifiedTest = StratifiedResult & { reading: string };

/** The pooled analysis of a study (the `analysis` of study.json). */
export interface StudyAnalysis {
  /** The analysis options every project was analysed with, and the rename detection asked for. */
  options: StudyOptions;
  /** One row per project, in corpus order: the projects side by side. */
  projects: ProjectRow[];
  /** Each project's own statistics (its contingency tables and tests). */
  perProject: Array<{ project: string; statistics: Statistics }>;
  /** All projects' tables taken together as one sample (table ids prefixed by `project/`). */
  pooled: { units: number; classes: Record<TopologyClass, number>; classShares: Record<TopologyClass, number | null>; statistics: Statistics };
  /** The association tested within projects and combined (Cochran-Mantel-Haenszel), projects as strata. */
  stratified: { classByBirthGroup: StratifiedTest; classByActivityBand: StratifiedTest };
  caution: string;
}

/** A project of the study with its interchange document and analysis. */
export interface StudyProject {
  label: string;
  doc: InterchangeDocument;
  analysis: Analysis;
}

const zeros = <K extends string>(keys: readonly K[]): Record<K, number> => Object.fromEntries(keys.map((k) => [k, 0])) as Record<K, number>;

function sharesOf(counts: Record<TopologyClass, number>, total: number): Record<TopologyClass, number | null> {
  return Object.fromEntries(TOPOLOGY_CLASSES.map((c) => [c, total === 0 ? null : (100 * counts[c]) / total])) as Record<TopologyClass, number | null>;
}

function projectRow(p: StudyProject): ProjectRow {
  const a = p.analysis;
  const units = a.tables.filter((t) => t.included);
  const classes = zeros(TOPOLOGY_CLASSES);
  for (const t of units) classes[t.graph!.class]++;
  return {
    project: p.label,
    repository: p.doc.source.repository,
    head: p.doc.source.head,
    adapter: p.doc.source.adapter.name,
    versions: a.summary.versions,
    firstDate: p.doc.summary.firstDate,
    lastDate: p.doc.summary.lastDate,
    tables: a.summary.tables,
    included: a.summary.included,
    countedUpdates: a.summary.countedUpdates,
    classes,
    classShares: sharesOf(classes, units.length),
    birthGroups: { ...a.summary.birthGroups },
    activityBands: { ...a.summary.activityBands },
  };
}

function stratifiedReading(subject: string, r: StratifiedResult, alpha: number): string {
  const used = r.strata.filter((s) => s.used).length;
  const left = r.strata.filter((s) => !s.used).map((s) => s.label);
  const leftText = left.length ? ` ${left.length} project${left.length === 1 ? '' : 's'} left out (under two tables: ${left.join(', ')}).` : '';
  if (!r.computable) return `${subject}, within projects: the Cochran-Mantel-Haenszel test is not computable (${r.reason}).${leftText}`;
  const verdict = r.pValue < alpha ? `an association within projects at the ${alpha} level` : `no association within projects shown at the ${alpha} level`;
  const or = r.form === '2x2xK' && r.commonOddsRatio !== undefined && r.commonOddsRatio !== null ? `; common odds ratio ${r.commonOddsRatio.toFixed(3)}` : '';
  const dropped = [...r.droppedRows, ...r.droppedColumns];
  return (
    `${subject}, within projects: Cochran-Mantel-Haenszel M^2 = ${r.statistic.toFixed(3)} with ${r.df} degree${r.df === 1 ? '' : 's'} of freedom ` +
    `over ${used} project${used === 1 ? '' : 's'}, p = ${formatP(r.pValue)}${or}: ${verdict}.` +
    `${dropped.length ? ` Left out as empty in every project: ${dropped.join(', ')}.` : ''}${leftText}`
  );
}

function stratify(subject: string, per: ReadonlyArray<{ project: string; c: ContingencyAnalysis }>, columns: readonly string[], alpha: number): StratifiedTest {
  const r = cochranMantelHaenszel(
    per.map((p) => ({ label: p.project, counts: p.c.table.counts })),
    TOPOLOGY_CLASSES,
    columns,
  );
  return { ...r, reading: stratifiedReading(subject, r, alpha) };
}

/**
 * The study analysis of analysed projects: a row per project (class counts and shares, birth
 * groups, activity bands), each project's own statistics, the statistics of all their tables
 * pooled as one sample, and the stratified test of class by birth group and of class by
 * activity band with projects as strata. A pure function of its input; `options` must be
 * those every project was analysed with (the statistics' settings: alpha, the exact test).
 */
export function analyseStudy(projects: readonly StudyProject[], options: StudyOptions): StudyAnalysis {
  const rows = projects.map(projectRow);
  const perProject = projects.map((p) => ({ project: p.label, statistics: p.analysis.statistics }));
  const units: TableMeasures[] = projects.flatMap((p) =>
    p.analysis.tables.filter((t) => t.included).map((t) => ({ ...t, id: `${p.label}/${t.id}` })),
  );
  const classes = zeros(TOPOLOGY_CLASSES);
  for (const t of units) classes[t.graph!.class]++;
  const alpha = options.alpha;
  return {
    options,
    projects: rows,
    perProject,
    pooled: { units: units.length, classes, classShares: sharesOf(classes, units.length), statistics: statisticsOf(units, options) },
    stratified: {
      classByBirthGroup: stratify('Topology class and birth group', perProject.map((p) => ({ project: p.project, c: p.statistics.classByBirthGroup })), BIRTH_GROUPS, alpha),
      classByActivityBand: stratify('Topology class and activity band', perProject.map((p) => ({ project: p.project, c: p.statistics.classByActivityBand })), ACTIVITY_BANDS, alpha),
    },
    caution: `${CAUTION} Pooled tests treat the tables of all projects as one sample; the stratified test compares tables within each project only.`,
  };
}
