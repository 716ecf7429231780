import { columnKey } from '../../changes/diff-tables.js';
import type { ForeignKey, Table } from '../../model/types.js';
import type { AnalysisOptions } from '../options.js';
import { keepsForeignKey } from '../filters/table-filter.js';

/** A foreign key of a table as an edge: its identity, its end points and its columns. */
export interface FkEdge {
  /** Identity of the edge: source, target and the referencing columns' keys. */
  key: string;
  source: string;
  target: string;
  /** Referencing columns (physical names, as in this version). */
  columns: string[];
  fk: ForeignKey;
}

/** Which tables are in the graphs, and which tables ever existed. */
export interface GraphScope {
  /** Stable ids of the tables in the measures (not excluded). */
  included: ReadonlySet<string>;
  /** Stable ids of every table that ever existed. */
  existed: ReadonlySet<string>;
  options: Pick<AnalysisOptions, 'excludeOrmForeignKeys'>;
}

/** Key of an edge: `source -> target (k1,k2)`, the columns by their stable keys. */
export function edgeKey(source: string, target: string, columnKeys: readonly string[]): string {
  return `${source} -> ${target} (${columnKeys.join(',')})`;
}

/**
 * The edges of one table (kept foreign keys whose source is in the measures), cached by table
 * object: a table that did not change between versions is the same object. Edges to a table that
 * never existed come out with `dangling` true; edges to an excluded table are left out.
 */
export class EdgeCache {
  private readonly cache = new WeakMap<Table, { edges: FkEdge[]; dangling: FkEdge[] }>();
  constructor(private readonly scope: GraphScope) {}

  of(t: Table): { edges: FkEdge[]; dangling: FkEdge[] } {
    let hit = this.cache.get(t);
    if (hit) return hit;
    hit = { edges: [], dangling: [] };
    if (this.scope.included.has(t.id)) {
      const keys = new Map(t.columns.map((c) => [c.name, columnKey(c)]));
      for (const fk of t.foreignKeys) {
        if (!keepsForeignKey(fk, this.scope.options)) continue;
        const target = fk.referencedTable;
        const e: FkEdge = { key: edgeKey(t.id, target, fk.columns.map((c) => keys.get(c) ?? c)), source: t.id, target, columns: fk.columns, fk };
        if (!this.scope.existed.has(target)) hit.dangling.push(e);
        else if (this.scope.included.has(target)) hit.edges.push(e);
      }
    }
    this.cache.set(t, hit);
    return hit;
  }
}
