import type { RenameMode } from '../changes/rename-heuristic.js';
import type { InterchangeDocument } from '../interchange/document.js';
import { exclusionReason } from './filters/table-filter.js';
import { degreesOf } from './graph/degrees.js';
import type { GraphScope } from './graph/edges.js';
import { buildHistoryGraph } from './graph/history-graph.js';
import { TOPOLOGY_CLASSES, topologyClassOf, type TopologyClass } from './graph/topology-class.js';
import { classChangesOf, versionClasses, type ClassCounts } from './graph/version-classes.js';
import { timelineOf, type Timeline } from './input/timeline.js';
import { applyRenames } from './input/renames.js';
import { ACTIVITY_BANDS, activityBandOf, type ActivityBand } from './lifecycle/activity-band.js';
import { BIRTH_GROUPS, birthGroupOf, initialCutoff, type BirthGroup } from './lifecycle/birth-group.js';
import { changeCountsByTable, emptyKindCounts } from './lifecycle/counted-updates.js';
import { lifetimeOf, ratesOf } from './lifecycle/lifetime.js';
import { presenceOf } from './lifecycle/presence.js';
import { resolveAnalysisOptions, type AnalysisOptions } from './options.js';
import type { VersionRange } from './ranges.js';
import { versionSeries } from './series/version-series.js';
import { chiSquareTest } from './stats/chi-square.js';
import { crossTabulate, testedCounts } from './stats/contingency.js';
import { cramersV } from './stats/cramers-v.js';
import { fisherExactTest } from './stats/fisher-exact.js';
import { kruskalWallis } from './stats/kruskal-wallis.js';
import { CAUTION, chiSquareReading, cramersVReading, exactReading, kruskalReading, spearmanReading } from './stats/reading.js';
import { spearman } from './stats/spearman.js';
import type { Analysis, ContingencyAnalysis, HeuristicRename, Statistics, TableMeasures } from './types.js';

const ref = (timeline: Timeline, index: number) => {
  const v = timeline.versions[index]!;
  return { version: v.index, commit: v.commit, date: v.date };
};

/**
 * Every measure and statistic of a timeline (see docs/measures.md for the definitions). A pure
 * function: the same timeline and options give the same result.
 */
export function analyzeTimeline(timeline: Timeline, partial: Partial<AnalysisOptions> = {}): Analysis {
  const options = resolveAnalysisOptions(partial);
  if (timeline.versions.length === 0) throw new Error('analyzeTimeline: no versions');
  const last = timeline.versions[timeline.versions.length - 1]!.index;
  const presence = presenceOf(timeline);

  // ---- filters
  const excluded = new Map<string, string>();
  for (const p of presence.values()) {
    const reason = exclusionReason({ id: p.id, names: p.names, kind: p.last.kind }, options);
    if (reason) excluded.set(p.id, reason);
  }
  const existed = new Set(presence.keys());
  const included = new Set([...existed].filter((id) => !excluded.has(id)));
  const scope: GraphScope = { included, existed, options };

  // ---- graphs
  const nodes = new Map<string, { name: string; kind: 'table' | 'implicit-join'; versions: VersionRange[] }>();
  for (const p of presence.values()) {
    nodes.set(p.id, {
      name: p.last.name,
      kind: p.last.kind,
      versions: p.spells.map((s) => [s.born, (s.removed ?? last + 1) - 1] as VersionRange),
    });
  }
  const { graph, dangling } = buildHistoryGraph(timeline, nodes, scope);
  const perVersion = versionClasses(timeline, scope);

  // ---- lifecycles
  const counts = changeCountsByTable(timeline.changes, options.count);
  const cutoff = initialCutoff(options.initial, timeline);
  const tables: TableMeasures[] = [];
  for (const p of presence.values()) {
    const lifetime = lifetimeOf(p.spells, timeline);
    const c = counts.get(p.id) ?? { byKind: emptyKindCounts(), counted: 0 };
    const rates = ratesOf(c.counted, lifetime);
    const band = activityBandOf(c.counted, rates, options.bandBy, options.highAbove);
    const lastSpell = p.spells[p.spells.length - 1]!;
    const isIn = included.has(p.id);
    let graphMeasures: TableMeasures['graph'] = null;
    if (isIn) {
      const d = degreesOf(graph, p.id);
      const runs = perVersion.runs.get(p.id) ?? [];
      graphMeasures = {
        inDegree: d.inDegree,
        outDegree: d.outDegree,
        degree: d.inDegree + d.outDegree,
        selfReferences: d.selfReferences,
        references: d.references,
        referencedBy: d.referencedBy,
        class: topologyClassOf(d.inDegree, d.outDegree),
        classes: runs,
        classChanges: classChangesOf(runs),
      };
    }
    const formerNames = [...p.names].filter((n) => n !== (p.last.namespace ? `${p.last.namespace}.${p.last.name}` : p.last.name));
    const t: TableMeasures = {
      id: p.id,
      name: p.last.name,
      ...(p.last.namespace ? { namespace: p.last.namespace } : {}),
      ...(p.last.ormName ? { ormName: p.last.ormName } : {}),
      kind: p.last.kind,
      ...(formerNames.length > 0 ? { formerNames: formerNames.sort() } : {}),
      included: isIn,
      ...(isIn ? {} : { excludedBecause: excluded.get(p.id)! }),
      birth: ref(timeline, p.spells[0]!.born),
      removal: lastSpell.removed === null ? null : ref(timeline, lastSpell.removed),
      spells: p.spells,
      birthGroup: birthGroupOf(p.spells[0]!.born, cutoff),
      lifetime,
      columns: { atBirth: p.first.columns.length, atEnd: p.last.columns.length },
      changes: c.byKind,
      countedUpdates: c.counted,
      updatesPerVersion: rates.perVersion,
      updatesPerYear: rates.perYear,
      activityBand: band.band,
      graph: graphMeasures,
    };
    tables.push(t);
  }

  const series = versionSeries(timeline, scope, options.count, perVersion.counts);
  const units = tables.filter((t) => t.included);
  const statistics = statisticsOf(units, options);

  const classes = Object.fromEntries(TOPOLOGY_CLASSES.map((k) => [k, 0])) as ClassCounts;
  const birthGroups = Object.fromEntries(BIRTH_GROUPS.map((k) => [k, 0])) as Record<BirthGroup, number>;
  const activityBands = Object.fromEntries(ACTIVITY_BANDS.map((k) => [k, 0])) as Record<ActivityBand, number>;
  for (const t of units) {
    classes[t.graph!.class]++;
    birthGroups[t.birthGroup]++;
    if (t.activityBand) activityBands[t.activityBand]++;
  }
  const renames: HeuristicRename[] = timeline.changes
    .filter((c) => c.basis === 'heuristic' && (c.kind === 'table-renamed' || c.kind === 'column-renamed'))
    .map((c) => ({
      version: c.version,
      kind: c.kind === 'table-renamed' ? ('table' as const) : ('column' as const),
      table: c.table,
      from: c.before ?? '',
      to: c.after ?? '',
      evidence: c.evidence ?? '',
    }));
  return {
    options: { ...options, renames: renames.length > 0 ? 'heuristic' : 'stated', initialCutoff: cutoff },
    summary: {
      versions: timeline.versions.length,
      tables: tables.length,
      included: units.length,
      excluded: tables.length - units.length,
      changes: timeline.changes.filter((c) => included.has(c.table)).length,
      countedUpdates: units.reduce((n, t) => n + t.countedUpdates, 0),
      classes,
      birthGroups,
      activityBands,
    },
    tables,
    graph: {
      nodes: graph.order,
      edges: graph.mapEdges((key, attrs, source, target) => ({ key, source, target, ...attrs })),
      dangling,
    },
    versions: series,
    renames,
    statistics,
  };
}

function contingencyAnalysis(
  subject: string,
  units: ReadonlyArray<readonly [string, string]>,
  rows: readonly string[],
  columns: readonly string[],
  names: { rows: string; columns: string },
  leftOut: Array<{ table: string; reason: string }>,
  options: AnalysisOptions,
): ContingencyAnalysis {
  const table = crossTabulate(units, rows, columns, names);
  const tested = testedCounts(table);
  const chiSquare = chiSquareTest(tested);
  const exact = fisherExactTest(tested, options.exact);
  const v = chiSquare.computable ? cramersV(chiSquare.statistic, table.total, tested.length, tested[0]!.length) : chiSquare;
  const reading = [chiSquareReading(subject, chiSquare, options.alpha), exactReading(subject, exact, options.alpha), cramersVReading(subject, v)];
  if (table.droppedRows.length + table.droppedColumns.length > 0) {
    reading.unshift(`${subject}: left out of the tests as empty: ${[...table.droppedRows, ...table.droppedColumns].join(', ')}.`);
  }
  return { table, leftOut, chiSquare, exact, cramersV: v, reading };
}

/** The statistics over the tables in the measures, each classified on the history graph. */
export function statisticsOf(units: readonly TableMeasures[], options: AnalysisOptions): Statistics {
  const cls = (t: TableMeasures): TopologyClass => t.graph!.class;
  const byBirth = contingencyAnalysis(
    'Topology class and birth group',
    units.map((t) => [cls(t), t.birthGroup] as const),
    TOPOLOGY_CLASSES, BIRTH_GROUPS, { rows: 'topology class', columns: 'birth group' }, [], options,
  );
  const banded = units.filter((t) => t.activityBand !== null);
  const byBand = contingencyAnalysis(
    'Topology class and activity band',
    banded.map((t) => [cls(t), t.activityBand!] as const),
    TOPOLOGY_CLASSES, ACTIVITY_BANDS, { rows: 'topology class', columns: 'activity band' },
    units.filter((t) => t.activityBand === null).map((t) => ({ table: t.id, reason: `no ${options.bandBy} rate (under 30 days of life)` })),
    options,
  );
  const sp = spearman(units.map((t) => t.graph!.degree), units.map((t) => t.countedUpdates));
  const kw = kruskalWallis(TOPOLOGY_CLASSES.map((c) => ({ label: c, values: units.filter((t) => cls(t) === c).map((t) => t.countedUpdates) })));
  return {
    units: units.length,
    alpha: options.alpha,
    classByBirthGroup: byBirth,
    classByActivityBand: byBand,
    degreeVersusUpdates: { ...sp, reading: spearmanReading(sp, options.alpha) },
    updatesByClass: { ...kw, reading: kruskalReading(kw, options.alpha) },
    caution: CAUTION,
  };
}

/**
 * Analyse an interchange document. With `renames`, the changes are first recomputed with that
 * rename detection (see `applyRenames`), and the document with those changes is returned beside.
 */
export function analyzeDocument(
  doc: InterchangeDocument,
  options: Partial<AnalysisOptions> = {},
  renames?: { mode: RenameMode; threshold?: number },
): Analysis {
  const d = renames ? applyRenames(doc, renames.mode, renames.threshold).doc : doc;
  return analyzeTimeline(timelineOf(d), options);
}
