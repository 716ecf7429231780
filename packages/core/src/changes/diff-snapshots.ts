import type { Table } from '../model/types.js';
import type { Change } from './kinds.js';
import { columnRenames, diffTable, sortChanges, type DiffContext } from './diff-tables.js';

/** The minimum a diff needs of a snapshot: its tables, each with a meaning hash when known. */
export interface DiffableSnapshot {
  tables: ReadonlyArray<{ table: Table; meaningHash?: string }>;
}

/**
 * Changes from one snapshot to the next, as seen at `version`. Tables are matched by their
 * stable id; a table whose meaning hash did not change is skipped without a look at its columns.
 */
export function diffSnapshots(version: number, before: DiffableSnapshot | null, after: DiffableSnapshot): Change[] {
  // the common case: the same tables in the same order (snapshots are kept sorted by id), only
  // some of them changed; no maps needed
  if (before && before.tables.length === after.tables.length && before.tables.every((b, i) => b.table.id === after.tables[i]!.table.id)) {
    const changed: Array<[Table, Table]> = [];
    const ctx: DiffContext = { renamesByTable: new Map() };
    for (let i = 0; i < after.tables.length; i++) {
      const b = before.tables[i]!;
      const a = after.tables[i]!;
      if (b.table === a.table || (b.meaningHash !== undefined && b.meaningHash === a.meaningHash)) continue;
      changed.push([b.table, a.table]);
      const r = columnRenames(b.table, a.table);
      if (r.size > 0) ctx.renamesByTable.set(a.table.id, r);
    }
    if (changed.length === 0) return [];
    const changes: Change[] = [];
    for (const [b, a] of changed) changes.push(...diffTable(version, b, a, ctx));
    return sortChanges(changes);
  }
  const prev = new Map<string, { table: Table; meaningHash?: string }>();
  if (before) for (const t of before.tables) prev.set(t.table.id, t);
  const next = new Map<string, { table: Table; meaningHash?: string }>();
  for (const t of after.tables) next.set(t.table.id, t);

  const changes: Change[] = [];
  const changed: Array<[Table, Table]> = [];
  const ctx: DiffContext = { renamesByTable: new Map() };
  for (const [id, a] of next) {
    const b = prev.get(id);
    if (!b) {
      changes.push({ version, kind: 'table-added', table: id, after: `${a.table.columns.length} columns` });
      continue;
    }
    if (b.meaningHash !== undefined && b.meaningHash === a.meaningHash) continue;
    if (b.table === a.table) continue;
    changed.push([b.table, a.table]);
    const r = columnRenames(b.table, a.table);
    if (r.size > 0) ctx.renamesByTable.set(id, r);
  }
  for (const [id, b] of prev) {
    if (!next.has(id)) changes.push({ version, kind: 'table-removed', table: id, before: `${b.table.columns.length} columns` });
  }
  for (const [b, a] of changed) changes.push(...diffTable(version, b, a, ctx));
  return sortChanges(changes);
}
