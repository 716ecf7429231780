import type { Table } from '../../model/types.js';
import type { Timeline } from '../input/timeline.js';

/** One spell of a table's life: from the version it was (re)born to the version it was removed at (excluded). */
export interface Spell {
  born: number;
  /** Index of the version at which the table is gone; null while it lives at the last version. */
  removed: number | null;
}

/** Where a table that ever existed was present. */
export interface Presence {
  id: string;
  spells: Spell[];
  /** The table at its first birth. */
  first: Table;
  /** The table at the last version that had it. */
  last: Table;
  /** Every physical name it had (qualified by namespace). */
  names: Set<string>;
}

const qualified = (t: Table): string => (t.namespace ? `${t.namespace}.${t.name}` : t.name);

/** The spells of every table that ever existed, by stable id (sorted by id). One pass over the versions. */
export function presenceOf(timeline: Timeline): Map<string, Presence> {
  const all = new Map<string, Presence>();
  let prevKey: string | null = null;
  let prevIds = new Set<string>();
  for (const v of timeline.versions) {
    if (v.key === prevKey) continue;
    prevKey = v.key;
    const ids = new Set<string>();
    for (const t of v.tables) {
      ids.add(t.id);
      let p = all.get(t.id);
      if (!p) {
        p = { id: t.id, spells: [], first: t, last: t, names: new Set([qualified(t)]) };
        all.set(t.id, p);
      }
      if (!prevIds.has(t.id)) p.spells.push({ born: v.index, removed: null });
      if (p.last !== t) {
        p.last = t;
        p.names.add(qualified(t));
      }
    }
    for (const id of prevIds) {
      if (!ids.has(id)) {
        const p = all.get(id)!;
        p.spells[p.spells.length - 1]!.removed = v.index;
      }
    }
    prevIds = ids;
  }
  return new Map([...all.entries()].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)));
}
