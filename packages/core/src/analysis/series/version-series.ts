import type { Change, ChangeKind } from '../../changes/kinds.js';
import type { VersionStatus } from '../../history/engine.js';
import type { Table } from '../../model/types.js';
import type { Timeline } from '../input/timeline.js';
import { emptyKindCounts, type KindCounts } from '../lifecycle/counted-updates.js';
import { EdgeCache, type GraphScope } from '../graph/edges.js';
import type { ClassCounts } from '../graph/version-classes.js';

/** One point of the growth curve. */
export interface VersionPoint {
  index: number;
  commit: string;
  date: string;
  status: VersionStatus;
  /** Tables in the measures. */
  tables: number;
  columns: number;
  /** Kept foreign keys of those tables whose target is in the measures or never existed. */
  foreignKeys: number;
  /** Changes at this version to tables in the measures, by kind. */
  changes: KindCounts;
  countedUpdates: number;
  /** Tables in each topology class in this version's graph. */
  classes: ClassCounts;
}

/**
 * The per-version series: tables, columns and foreign keys at every version, the changes by kind
 * and the counted updates seen at it, and the tables of each topology class (from `versionClasses`).
 */
export function versionSeries(timeline: Timeline, scope: GraphScope, counted: readonly ChangeKind[], classes: readonly ClassCounts[]): VersionPoint[] {
  const byVersion = new Map<number, Change[]>();
  for (const c of timeline.changes) {
    if (!scope.included.has(c.table)) continue;
    const list = byVersion.get(c.version) ?? [];
    list.push(c);
    byVersion.set(c.version, list);
  }
  const isCounted = new Set(counted);
  const cache = new EdgeCache(scope);
  const sizes = new WeakMap<Table, number>();
  let prev: { key: string; tables: number; columns: number; foreignKeys: number } | null = null;
  return timeline.versions.map((v, i) => {
    let sums = prev && prev.key === v.key ? prev : null;
    if (!sums) {
      let tables = 0;
      let columns = 0;
      let foreignKeys = 0;
      for (const t of v.tables) {
        if (!scope.included.has(t.id)) continue;
        tables++;
        columns += t.columns.length;
        let n = sizes.get(t);
        if (n === undefined) {
          const e = cache.of(t);
          sizes.set(t, (n = e.edges.length + e.dangling.length));
        }
        foreignKeys += n;
      }
      sums = { key: v.key, tables, columns, foreignKeys };
    }
    prev = sums;
    const changes = emptyKindCounts();
    let countedUpdates = 0;
    for (const c of byVersion.get(v.index) ?? []) {
      changes[c.kind]++;
      if (isCounted.has(c.kind)) countedUpdates++;
    }
    return {
      index: v.index,
      commit: v.commit,
      date: v.date,
      status: v.status,
      tables: sums.tables,
      columns: sums.columns,
      foreignKeys: sums.foreignKeys,
      changes,
      countedUpdates,
      classes: classes[i]!,
    };
  });
}
