import { CHANGE_KINDS, type Change, type ChangeKind } from '../../changes/kinds.js';

/** Number of changes of every kind (all kinds present, zeros included, in the canonical order). */
export type KindCounts = Record<ChangeKind, number>;

export function emptyKindCounts(): KindCounts {
  return Object.fromEntries(CHANGE_KINDS.map((k) => [k, 0])) as KindCounts;
}

/**
 * Changes by kind of every table, and its counted updates: the changes of the counted kinds.
 * Changes happen between consecutive versions of a table's life, so the columns a table is born
 * with are never updates (they come with its `table-added`).
 */
export function changeCountsByTable(changes: readonly Change[], counted: readonly ChangeKind[]): Map<string, { byKind: KindCounts; counted: number }> {
  const isCounted = new Set<ChangeKind>(counted);
  const out = new Map<string, { byKind: KindCounts; counted: number }>();
  for (const c of changes) {
    let e = out.get(c.table);
    if (!e) out.set(c.table, (e = { byKind: emptyKindCounts(), counted: 0 }));
    e.byKind[c.kind]++;
    if (isCounted.has(c.kind)) e.counted++;
  }
  return out;
}
