import { DirectedGraph, MultiDirectedGraph } from 'graphology';
import type { Table } from '../../model/types.js';
import type { Timeline } from '../input/timeline.js';
import { EdgeCache, type GraphScope } from './edges.js';
import { TOPOLOGY_CLASSES, topologyClassOf, type TopologyClass } from './topology-class.js';

/** A run of consecutive versions of a table's life in one topology class (both ends included). */
export interface ClassRun {
  from: number;
  to: number;
  class: TopologyClass;
}

export type ClassCounts = Record<TopologyClass, number>;

const emptyCounts = (): ClassCounts => Object.fromEntries(TOPOLOGY_CLASSES.map((c) => [c, 0])) as ClassCounts;

/**
 * The topology class of every table in every version of its life, from the foreign-key graph of
 * each version: a simple directed graph (graphology) of the tables present, with an edge where a
 * table references another present table (parallel foreign keys merged, self-references left
 * out). The graph is carried from version to version and changed only where tables changed.
 */
export function versionClasses(timeline: Timeline, scope: GraphScope): { runs: Map<string, ClassRun[]>; counts: ClassCounts[] } {
  const g = new DirectedGraph<Record<string, never>, { foreignKeys: number }>({ allowSelfLoops: false });
  const cache = new EdgeCache(scope);
  const desired = new Map<string, Map<string, number>>();
  const reverse = new Map<string, Set<string>>();
  const runs = new Map<string, ClassRun[]>();
  const counts: ClassCounts[] = [];
  let prevTables = new Map<string, Table>();
  let prevKey: string | null = null;

  const setEdges = (id: string, t: Table): void => {
    const next = new Map<string, number>();
    for (const e of cache.of(t).edges) if (e.target !== id) next.set(e.target, (next.get(e.target) ?? 0) + 1);
    const old = desired.get(id);
    if (old) {
      for (const target of old.keys()) {
        if (next.has(target)) continue;
        reverse.get(target)?.delete(id);
        if (g.hasEdge(id, target)) g.dropEdge(id, target);
      }
    }
    for (const [target, n] of next) {
      let r = reverse.get(target);
      if (!r) reverse.set(target, (r = new Set()));
      r.add(id);
      if (g.hasNode(target)) g.mergeEdge(id, target, { foreignKeys: n });
    }
    desired.set(id, next);
  };

  for (const v of timeline.versions) {
    if (v.key === prevKey) {
      for (const id of prevTables.keys()) runs.get(id)![runs.get(id)!.length - 1]!.to = v.index;
      counts.push({ ...counts[counts.length - 1]! });
      continue;
    }
    prevKey = v.key;
    const cur = new Map<string, Table>();
    for (const t of v.tables) if (scope.included.has(t.id)) cur.set(t.id, t);
    for (const id of prevTables.keys()) {
      if (cur.has(id)) continue;
      g.dropNode(id);
      for (const target of desired.get(id)?.keys() ?? []) reverse.get(target)?.delete(id);
      desired.delete(id);
    }
    const added: string[] = [];
    for (const id of cur.keys()) {
      if (!prevTables.has(id)) {
        g.addNode(id);
        added.push(id);
      }
    }
    for (const [id, t] of cur) if (prevTables.get(id) !== t) setEdges(id, t);
    for (const id of added) {
      for (const s of reverse.get(id) ?? []) {
        const n = desired.get(s)?.get(id);
        if (n && g.hasNode(s)) g.mergeEdge(s, id, { foreignKeys: n });
      }
    }
    const c = emptyCounts();
    for (const id of cur.keys()) {
      const cls = topologyClassOf(g.inDegree(id), g.outDegree(id));
      c[cls]++;
      let list = runs.get(id);
      if (!list) runs.set(id, (list = []));
      const last = list[list.length - 1];
      if (last && last.to === v.index - 1 && last.class === cls) last.to = v.index;
      else list.push({ from: v.index, to: v.index, class: cls });
    }
    counts.push(c);
    prevTables = cur;
  }
  return { runs, counts };
}

/** Number of changes of class over a table's life: class runs that follow another run of the same spell. */
export function classChangesOf(runs: readonly ClassRun[]): number {
  let n = 0;
  for (let i = 1; i < runs.length; i++) if (runs[i]!.from === runs[i - 1]!.to + 1) n++;
  return n;
}

/**
 * The foreign-key graph of one version as a graphology multigraph: the tables present (in the
 * measures) as nodes, every kept foreign key between present tables as an edge (parallel ones and
 * self-references included, keyed by their identity).
 */
export function versionGraph(timeline: Timeline, index: number, scope: GraphScope): MultiDirectedGraph<{ name: string; kind: string }, { columns: string[] }> {
  const v = timeline.versions[index];
  if (!v) throw new RangeError(`no version ${index}`);
  const g = new MultiDirectedGraph<{ name: string; kind: string }, { columns: string[] }>({ allowSelfLoops: true });
  const present = v.tables.filter((t) => scope.included.has(t.id));
  for (const t of present) g.addNode(t.id, { name: t.name, kind: t.kind });
  const cache = new EdgeCache(scope);
  for (const t of present) for (const e of cache.of(t).edges) if (g.hasNode(e.target)) g.addEdgeWithKey(e.key, e.source, e.target, { columns: e.columns });
  return g;
}
