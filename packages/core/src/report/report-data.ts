import type { ChangeKind } from '../changes/kinds.js';
import type { TopologyClass } from '../analysis/graph/topology-class.js';
import type { ActivityBand } from '../analysis/lifecycle/activity-band.js';
import type { Analysis, ContingencyAnalysis, TableMeasures } from '../analysis/types.js';
import type { InterchangeDocument } from '../interchange/document.js';
import { LEFT_OUT } from './palette.js';

/** A table's category in the report's colours: its topology class, or `left out` when a filter left it out. */
export type ReportCategory = TopologyClass | typeof LEFT_OUT;

export interface Headline {
  versions: number;
  firstDate: string;
  lastDate: string;
  /** Days from the first version's committer date to the last one's. */
  spanDays: number;
  tablesEver: number;
  /** Tables present at the last version. */
  tablesToday: number;
  /** Tables whose last spell ended before the last version. */
  removed: number;
  countedUpdates: number;
  changes: number;
  columnsToday: number;
  foreignKeysToday: number;
}

/** One point of the growth curve (only points where a series moves are kept; lines are drawn as steps). */
export interface GrowthPoint {
  version: number;
  /** Committer time in milliseconds since 1970 (UTC). */
  time: number;
  tables: number;
  columns: number;
  foreignKeys: number;
}

/** One row of the lifetime chart. */
export interface LifetimeRow {
  id: string;
  label: string;
  category: ReportCategory;
  /** Order of the row: by birth version, then by id. */
  order: number;
  birth: number;
  countedUpdates: number;
  /** Spells as [first version, end) with the end one past the last version alive. */
  spans: Array<{ from: number; to: number; alive: boolean }>;
  /** Versions with counted updates of this table, and how many at each. */
  updates: Array<{ version: number; count: number }>;
}

export interface GraphNode {
  id: string;
  label: string;
  category: TopologyClass;
  countedUpdates: number;
  inDegree: number;
  outDegree: number;
  selfReferences: number;
  alive: boolean;
}

/** An edge of the drawn graph: the foreign keys from one table to another, merged (self-references are not drawn). */
export interface GraphLink {
  source: string;
  target: string;
  foreignKeys: number;
  alive: boolean;
}

export interface ChangedTable {
  id: string;
  label: string;
  category: ReportCategory;
  countedUpdates: number;
  band: ActivityBand | null;
  birthGroup: string;
  lifetimeVersions: number;
  lifetimeDays: number;
  removed: boolean;
  /** Counted updates by kind (only kinds that occurred). */
  byKind: Array<{ kind: ChangeKind; count: number }>;
}

export interface DiagnosticSummary {
  code: string;
  severity: string;
  /** Diagnostics with this code over all versions (and the run). */
  count: number;
  /** Versions that reported it. */
  versions: number;
  /** The first one, as an example. */
  example: string;
}

export interface CounterSummary {
  name: string;
  /** Value at the last version. */
  last: number;
  max: number;
  /** Versions at which it was above 0. */
  versionsAboveZero: number;
}

export interface Coverage {
  statuses: Array<{ status: string; versions: number }>;
  carried: Array<{ version: number; commit: string; subject: string }>;
  counters: CounterSummary[];
  diagnostics: DiagnosticSummary[];
  /** Diagnostics whose code says something was not resolved (decorators, references...). */
  unresolved: number;
  danglingForeignKeys: number;
  excludedTables: Array<{ id: string; reason: string }>;
}

export interface ReportData {
  title: string;
  source: { repository: string; ref: string; head: string; adapter: string; generator: string };
  options: { counted: ChangeKind[]; highAbove: number; bandBy: string; alpha: number };
  headline: Headline;
  growth: GrowthPoint[];
  lifetimes: LifetimeRow[];
  lastVersion: number;
  graph: { nodes: GraphNode[]; links: GraphLink[] };
  contingency: Array<{ id: string; title: string; analysis: ContingencyAnalysis }>;
  readings: string[];
  caution: string;
  topChanged: ChangedTable[];
  coverage: Coverage;
}

const DAY_MS = 86_400_000;

const categoryOf = (t: TableMeasures): ReportCategory => (t.graph ? t.graph.class : LEFT_OUT);

const labelOf = (t: TableMeasures): string => (t.namespace ? `${t.namespace}.${t.name}` : t.name);

/** The data of the report, from a document and its analysis. A pure function. */
export function reportData(doc: InterchangeDocument, analysis: Analysis, options: { topChanged?: number; title?: string } = {}): ReportData {
  const last = analysis.versions[analysis.versions.length - 1]!;
  const lastVersion = last.index;
  const counted = new Set(analysis.options.count);

  // ---- counted updates by table and version
  const updates = new Map<string, Map<number, number>>();
  for (const c of doc.changes) {
    if (!counted.has(c.kind)) continue;
    let m = updates.get(c.table);
    if (!m) updates.set(c.table, (m = new Map()));
    m.set(c.version, (m.get(c.version) ?? 0) + 1);
  }

  // ---- lifetimes: ordered by birth, then id
  const ordered = [...analysis.tables].sort((a, b) => a.birth.version - b.birth.version || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
  const lifetimes: LifetimeRow[] = ordered.map((t, i) => ({
    id: t.id,
    label: labelOf(t),
    category: categoryOf(t),
    order: i,
    birth: t.birth.version,
    countedUpdates: t.countedUpdates,
    spans: t.spells.map((s) => ({ from: s.born, to: s.removed ?? lastVersion + 1, alive: s.removed === null })),
    updates: [...(updates.get(t.id) ?? new Map<number, number>()).entries()].sort((a, b) => a[0] - b[0]).map(([version, count]) => ({ version, count })),
  }));

  // ---- growth: keep the points where a series moves, and the last one
  const growth: GrowthPoint[] = [];
  for (let i = 0; i < analysis.versions.length; i++) {
    const v = analysis.versions[i]!;
    const prev = growth[growth.length - 1];
    const isLast = i === analysis.versions.length - 1;
    if (prev && !isLast && prev.tables === v.tables && prev.columns === v.columns && prev.foreignKeys === v.foreignKeys) continue;
    growth.push({ version: v.index, time: Date.parse(v.date), tables: v.tables, columns: v.columns, foreignKeys: v.foreignKeys });
  }

  // ---- the drawn graph: parallel foreign keys merged, self-references left out (reported on the node)
  const alive = new Set(analysis.tables.filter((t) => t.removal === null).map((t) => t.id));
  const nodes: GraphNode[] = analysis.tables
    .filter((t) => t.graph)
    .map((t) => ({
      id: t.id,
      label: labelOf(t),
      category: t.graph!.class,
      countedUpdates: t.countedUpdates,
      inDegree: t.graph!.inDegree,
      outDegree: t.graph!.outDegree,
      selfReferences: t.graph!.selfReferences,
      alive: alive.has(t.id),
    }));
  const linkMap = new Map<string, GraphLink>();
  for (const e of analysis.graph.edges) {
    if (e.source === e.target) continue;
    const key = `${e.source}\u0000${e.target}`;
    const aliveNow = e.versions.some(([, to]) => to === lastVersion);
    const l = linkMap.get(key);
    if (l) {
      l.foreignKeys++;
      l.alive ||= aliveNow;
    } else linkMap.set(key, { source: e.source, target: e.target, foreignKeys: 1, alive: aliveNow });
  }
  const links = [...linkMap.keys()].sort().map((k) => linkMap.get(k)!);

  // ---- most changed tables
  const top = options.topChanged ?? 15;
  const topChanged: ChangedTable[] = [...analysis.tables]
    .filter((t) => t.countedUpdates > 0)
    .sort((a, b) => b.countedUpdates - a.countedUpdates || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0))
    .slice(0, top)
    .map((t) => ({
      id: t.id,
      label: labelOf(t),
      category: categoryOf(t),
      countedUpdates: t.countedUpdates,
      band: t.activityBand,
      birthGroup: t.birthGroup,
      lifetimeVersions: t.lifetime.versions,
      lifetimeDays: t.lifetime.days,
      removed: t.removal !== null,
      byKind: analysis.options.count.filter((k) => (t.changes[k] ?? 0) > 0).map((k) => ({ kind: k, count: t.changes[k] })),
    }));

  const st = analysis.statistics;
  const firstDate = doc.summary.firstDate;
  const lastDate = doc.summary.lastDate;
  return {
    title: options.title ?? titleOf(doc.source.repository),
    source: {
      repository: doc.source.repository,
      ref: doc.source.ref,
      head: doc.source.head,
      adapter: `${doc.source.adapter.name} ${doc.source.adapter.version}`,
      generator: `${doc.generator.name} ${doc.generator.version}`,
    },
    options: { counted: [...analysis.options.count], highAbove: analysis.options.highAbove, bandBy: analysis.options.bandBy, alpha: analysis.options.alpha },
    headline: {
      versions: analysis.summary.versions,
      firstDate,
      lastDate,
      spanDays: Math.max(0, (Date.parse(lastDate) - Date.parse(firstDate)) / DAY_MS),
      tablesEver: analysis.summary.tables,
      tablesToday: alive.size,
      removed: analysis.summary.tables - alive.size,
      countedUpdates: analysis.summary.countedUpdates,
      changes: doc.changes.length,
      columnsToday: last.columns,
      foreignKeysToday: last.foreignKeys,
    },
    growth,
    lifetimes,
    lastVersion,
    graph: { nodes, links },
    contingency: [
      { id: 'class-by-birth-group', title: 'Topology class by birth group', analysis: st.classByBirthGroup },
      { id: 'class-by-activity-band', title: 'Topology class by activity band', analysis: st.classByActivityBand },
    ],
    readings: [st.degreeVersusUpdates.reading, st.updatesByClass.reading],
    caution: st.caution,
    topChanged,
    coverage: coverageOf(doc, analysis),
  };
}

/** The last part of the repository path as typed, for the title. */
function titleOf(repository: string): string {
  const parts = repository.replace(/\\/g, '/').replace(/\/+$/, '').split('/');
  const name = parts[parts.length - 1] || repository;
  return name === '.' || name === '' ? 'repository' : name;
}

function coverageOf(doc: InterchangeDocument, analysis: Analysis): Coverage {
  const statuses = Object.entries(doc.summary.statuses)
    .sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0))
    .map(([status, versions]) => ({ status, versions }));
  const carried = doc.versions.filter((v) => v.status === 'carried').map((v) => ({ version: v.index, commit: v.commit, subject: v.subject }));

  const counters = new Map<string, CounterSummary>();
  for (const v of doc.versions) {
    for (const [name, value] of Object.entries(v.counters ?? {})) {
      let c = counters.get(name);
      if (!c) counters.set(name, (c = { name, last: 0, max: 0, versionsAboveZero: 0 }));
      c.max = Math.max(c.max, value);
      if (value > 0) c.versionsAboveZero++;
    }
  }
  const lastCounters = doc.versions[doc.versions.length - 1]?.counters ?? {};
  for (const c of counters.values()) c.last = lastCounters[c.name] ?? 0;

  const byCode = new Map<string, DiagnosticSummary & { seen: Set<number> }>();
  const add = (d: { code: string; severity: string; message: string; file?: string; line?: number }, version: number): void => {
    const key = `${d.code}\u0000${d.severity}`;
    let s = byCode.get(key);
    if (!s) {
      const where = d.file ? `${d.file}${d.line ? `:${d.line}` : ''}: ` : '';
      byCode.set(key, (s = { code: d.code, severity: d.severity, count: 0, versions: 0, example: `${where}${d.message}`, seen: new Set() }));
    }
    s.count++;
    if (version >= 0 && !s.seen.has(version)) {
      s.seen.add(version);
      s.versions++;
    }
  };
  for (const v of doc.versions) for (const d of v.diagnostics) add(d, v.index);
  for (const d of doc.diagnostics) add(d, -1);
  const diagnostics = [...byCode.values()]
    .sort((a, b) => b.count - a.count || (a.code < b.code ? -1 : a.code > b.code ? 1 : 0) || (a.severity < b.severity ? -1 : 1))
    .map(({ seen: _seen, ...d }) => d);
  return {
    statuses,
    carried,
    counters: [...counters.values()].sort((a, b) => (a.name < b.name ? -1 : 1)),
    diagnostics,
    unresolved: diagnostics.filter((d) => /unresolved/i.test(d.code)).reduce((n, d) => n + d.count, 0),
    danglingForeignKeys: analysis.graph.dangling.length,
    excludedTables: analysis.tables.filter((t) => !t.included).map((t) => ({ id: t.id, reason: t.excludedBecause ?? '' })),
  };
}
