import { MultiDirectedGraph } from 'graphology';
import type { Timeline } from '../input/timeline.js';
import { RangeBuilder, type VersionRange } from '../ranges.js';
import { EdgeCache, type GraphScope } from './edges.js';

export interface HistoryNodeAttributes {
  /** Physical name at the last version that had the table. */
  name: string;
  kind: 'table' | 'implicit-join';
  /** Versions in which the table existed. */
  versions: VersionRange[];
}

export interface HistoryEdgeAttributes {
  /** Referencing columns (physical names at the last version that had the foreign key). */
  columns: string[];
  referencedColumns: string[];
  /** Versions in which the foreign key existed with this target. */
  versions: VersionRange[];
  /** Enforcements it had (`database`, `orm`). */
  enforcement: Array<'database' | 'orm'>;
}

/** A foreign key to a table that never existed in any snapshot: reported, kept out of the degrees. */
export interface DanglingForeignKey {
  table: string;
  columns: string[];
  referencedTable: string;
  versions: VersionRange[];
}

export type HistoryGraph = MultiDirectedGraph<HistoryNodeAttributes, HistoryEdgeAttributes>;

/**
 * The history graph: every table that ever existed (and is in the measures) as a node, every
 * foreign key that ever existed as a directed edge from the referencing table to the referenced
 * one, keyed by its identity (table, ordered columns) and target; nodes and edges keep the
 * versions in which they existed. Parallel foreign keys are parallel edges and self-references
 * are loops here; the degrees merge the one and leave out the other.
 */
export function buildHistoryGraph(
  timeline: Timeline,
  nodes: ReadonlyMap<string, { name: string; kind: 'table' | 'implicit-join'; versions: VersionRange[] }>,
  scope: GraphScope,
): { graph: HistoryGraph; dangling: DanglingForeignKey[] } {
  const graph: HistoryGraph = new MultiDirectedGraph({ allowSelfLoops: true });
  for (const [id, n] of nodes) if (scope.included.has(id)) graph.addNode(id, { name: n.name, kind: n.kind, versions: n.versions });
  const cache = new EdgeCache(scope);
  const edges = new Map<string, { attrs: HistoryEdgeAttributes; range: RangeBuilder; source: string; target: string }>();
  const dangling = new Map<string, { d: DanglingForeignKey; range: RangeBuilder }>();
  /** The ranges of a table's edges, by table object (an unchanged table is the same object). */
  const rangesOf = new WeakMap<object, RangeBuilder[]>();
  const recordsOf = (t: Parameters<EdgeCache['of']>[0]): RangeBuilder[] => {
    let out = rangesOf.get(t);
    if (out) return out;
    out = [];
    const got = cache.of(t);
    for (const e of got.edges) {
      let rec = edges.get(e.key);
      if (!rec) {
        const range = new RangeBuilder();
        rec = { attrs: { columns: e.columns, referencedColumns: e.fk.referencedColumns, versions: range.ranges, enforcement: [] }, range, source: e.source, target: e.target };
        edges.set(e.key, rec);
      }
      rec.attrs.columns = e.columns;
      rec.attrs.referencedColumns = e.fk.referencedColumns;
      if (!rec.attrs.enforcement.includes(e.fk.enforcement)) rec.attrs.enforcement.push(e.fk.enforcement);
      out.push(rec.range);
    }
    for (const e of got.dangling) {
      let rec = dangling.get(e.key);
      if (!rec) {
        const range = new RangeBuilder();
        rec = { d: { table: e.source, columns: e.columns, referencedTable: e.target, versions: range.ranges }, range };
        dangling.set(e.key, rec);
      }
      rec.d.columns = e.columns;
      out.push(rec.range);
    }
    rangesOf.set(t, out);
    return out;
  };
  let active: RangeBuilder[] = [];
  let prevKey: string | null = null;
  for (const v of timeline.versions) {
    if (v.key !== prevKey) {
      prevKey = v.key;
      active = [];
      for (const t of v.tables) for (const r of recordsOf(t)) active.push(r);
    }
    for (const r of active) r.mark(v.index);
  }
  for (const key of [...edges.keys()].sort()) {
    const rec = edges.get(key)!;
    rec.attrs.enforcement.sort();
    graph.addEdgeWithKey(key, rec.source, rec.target, rec.attrs);
  }
  return { graph, dangling: [...dangling.keys()].sort().map((k) => dangling.get(k)!.d) };
}
