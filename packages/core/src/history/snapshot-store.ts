import { canonicalJson, canonicalOrder, contentHash, snapshotHashOf, tableMeaning, viewMeaning } from '../model/canonical.js';
import type { Column, Origin, SnapshotInput, Table, ViewRef } from '../model/types.js';

/** A table as stored once per run: without origins, with its two hashes. */
export interface StoredTable {
  /** Identity in storage: canonical JSON with columns in declaration order, origins left out. */
  hash: string;
  /** Meaning: as `hash` but with columns sorted by name; equal meaning means no change. */
  meaningHash: string;
  table: Table;
}

/** A snapshot of one version as the run keeps it: interned tables, no origins. */
export interface BuiltSnapshot {
  /** Storage hash (from the tables' storage hashes and the views). */
  hash: string;
  /** Meaning hash: two versions with the same meaning hash have the same schema. */
  meaningHash: string;
  tables: StoredTable[];
  views: ViewRef[];
}

/** Where a table and its columns were declared, in one version (compact, JSON-serialisable). */
export interface TableOrigins {
  o?: Origin;
  /** One entry per column, in the stored column order. */
  c?: Array<Origin | null>;
}

function stripTable(t: Table): { table: Table; origins: TableOrigins } {
  const cols: Column[] = [];
  const c: Array<Origin | null> = [];
  let anyColumnOrigin = false;
  for (const col of t.columns) {
    const { origin, ...rest } = col;
    cols.push(rest);
    c.push(origin ?? null);
    if (origin) anyColumnOrigin = true;
  }
  const { origin, ...rest } = t;
  const table: Table = { ...rest, columns: cols };
  const origins: TableOrigins = {};
  if (origin) origins.o = origin;
  if (anyColumnOrigin) origins.c = c;
  return { table, origins };
}

/** Put origins back on a stored table (for output and for `show`). */
export function withOrigins(t: Table, origins: TableOrigins | undefined): Table {
  if (!origins) return t;
  const out: Table = { ...t };
  if (origins.o) out.origin = origins.o;
  if (origins.c) {
    out.columns = t.columns.map((col, i) => {
      const o = origins.c![i];
      return o ? { ...col, origin: o } : col;
    });
  }
  return out;
}

/** Interns tables by storage hash and builds snapshots from adapter output or from the cache. */
export class SnapshotStore {
  private readonly tables = new Map<string, StoredTable>();
  /** Stored tables by the adapter's input object (see `fromInput`). */
  private readonly byInput = new WeakMap<object, { id: string; st: StoredTable; origins: TableOrigins }>();

  get size(): number {
    return this.tables.size;
  }

  getTable(hash: string): StoredTable | undefined {
    return this.tables.get(hash);
  }

  /** Add a stored table (from the cache) whose storage hash is known. */
  internKnown(hash: string, table: Table): StoredTable {
    let st = this.tables.get(hash);
    if (!st) {
      st = { hash, meaningHash: contentHash(canonicalJson(tableMeaning(table))), table };
      this.tables.set(hash, st);
    }
    return st;
  }

  private intern(table: Table): { st: StoredTable; isNew: boolean } {
    const text = canonicalJson(table);
    const hash = contentHash(text);
    const existing = this.tables.get(hash);
    if (existing) return { st: existing, isNew: false };
    const st: StoredTable = { hash, meaningHash: contentHash(canonicalJson(tableMeaning(table))), table };
    this.tables.set(hash, st);
    return { st, isNew: true };
  }

  /**
   * Canonicalise an adapter's snapshot and intern its tables. Returns the snapshot, the origins
   * of each table (aligned with `snapshot.tables`) and the tables that were new to the store.
   */
  fromInput(input: SnapshotInput): { snapshot: BuiltSnapshot; origins: TableOrigins[]; newTables: StoredTable[] } {
    // an adapter that hands back the same table object as in an earlier version (an incremental
    // assembly) gets its stored table without canonicalising and hashing it again
    const entries: Array<{ id: string; st: StoredTable; origins: TableOrigins }> = [];
    const newTables: StoredTable[] = [];
    for (const t of input.tables) {
      let e = this.byInput.get(t);
      if (!e) {
        const canon = canonicalOrder({ tables: [t] }).tables[0]!;
        const { table, origins: o } = stripTable(canon);
        const { st, isNew } = this.intern(table);
        if (isNew) newTables.push(st);
        e = { id: canon.id, st, origins: o };
        this.byInput.set(t, e);
      }
      entries.push(e);
    }
    entries.sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
    const stored = entries.map((e) => e.st);
    const origins = entries.map((e) => e.origins);
    const views = canonicalOrder({ tables: [], ...(input.views ? { views: input.views } : {}) }).views.map(({ origin: _o, ...v }) => v);
    return { snapshot: this.assembleSnapshot(stored, views), origins, newTables };
  }

  assembleSnapshot(tables: StoredTable[], views: ViewRef[]): BuiltSnapshot {
    return {
      hash: snapshotHashOf(tables.map((t) => t.hash), views),
      meaningHash: contentHash(canonicalJson({ tables: tables.map((t) => t.meaningHash), views: views.map(viewMeaning) })),
      tables,
      views,
    };
  }
}

/** A full Snapshot (tables with origins) for display. */
export function materialise(s: BuiltSnapshot, origins?: TableOrigins[]): { tables: Table[]; views: ViewRef[]; hash: string } {
  return {
    hash: s.hash,
    views: s.views,
    tables: s.tables.map((st, i) => withOrigins(st.table, origins?.[i])),
  };
}
