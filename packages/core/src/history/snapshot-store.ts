import { canonicalJson, canonicalOrder, contentHash, hexListJson, isHex, snapshotHashOfJson, tableMeaning, tableStorageKey, viewsJson } from '../model/canonical.js';
import { findNearby, type NearbyWalk } from '../util/nearby.js';
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

/** Only the origins of an adapter's table (its content being known). */
function originsOf(t: { origin?: Origin; columns: Column[] }): TableOrigins {
  const out: TableOrigins = {};
  if (t.origin) out.o = t.origin;
  let any = false;
  const c = t.columns.map((col) => {
    if (col.origin) any = true;
    return col.origin ?? null;
  });
  if (any) out.c = c;
  return out;
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

/**
 * Origins of a snapshot's tables in a compact form for the disk cache: the distinct files, and
 * per table `[file index, line, ...column entries]`, where a column entry is a line in the
 * table's file, 0 for no origin, or `[file index, line]` for a column declared elsewhere.
 * A table with no origin has file index -1.
 */
export interface PackedOrigins {
  f: string[];
  /** 0 for a table whose origins were not kept (see `packOrigins`). */
  t: Array<Array<number | [number, number]> | 0>;
}

/** Pack the origins of a snapshot's tables; with `keep`, only those of the tables it marks (the others 0). */
export function packOrigins(all: TableOrigins[], keep?: readonly boolean[]): PackedOrigins {
  const files: string[] = [];
  const index = new Map<string, number>();
  const fi = (f: string): number => {
    let i = index.get(f);
    if (i === undefined) {
      i = files.length;
      files.push(f);
      index.set(f, i);
    }
    return i;
  };
  const t = all.map((o, i) => {
    if (keep && !keep[i]) return 0 as const;
    const own = o.o ? fi(o.o.file) : -1;
    const row: Array<number | [number, number]> = [own, o.o?.line ?? 0];
    for (const c of o.c ?? []) {
      if (!c) row.push(0);
      else if (own >= 0 && c.file === o.o!.file) row.push(c.line ?? 0);
      else row.push([fi(c.file), c.line ?? 0]);
    }
    return row;
  });
  return { f: files, t };
}

/** Whether the packed origins hold those of table `i`. */
export function hasPackedOrigins(p: PackedOrigins, i: number): boolean {
  return p.t[i] !== 0;
}

export function unpackOrigins(p: PackedOrigins, i: number): TableOrigins {
  const row = p.t[i];
  if (!row) return {};
  const [own, line, ...cols] = row as [number, number, ...Array<number | [number, number]>];
  const out: TableOrigins = {};
  if (own >= 0) out.o = line ? { file: p.f[own]!, line } : { file: p.f[own]! };
  if (cols.length > 0) {
    out.c = cols.map((c) => {
      if (Array.isArray(c)) return c[1] ? { file: p.f[c[0]]!, line: c[1] } : { file: p.f[c[0]]! };
      if (c === 0 || own < 0) return null;
      return { file: p.f[own]!, line: c };
    });
  }
  return out;
}

/** An adapter's table as interned: its id, its stored table and its origins. */
interface InputEntry {
  id: string;
  st: StoredTable;
  origins: TableOrigins;
}

/** Entries in id order, and where each entry of the input went in it. */
interface IdOrder {
  sorted: InputEntry[];
  /** `rank[i]`: the place in `sorted` of the input's entry i. */
  rank: number[];
  /** Whether no two entries share an id (then the order is the only one, and can be built on). */
  unique: boolean;
}

const byId = (a: InputEntry, b: InputEntry): number => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0);

/**
 * The entries of an input in id order. When the last input's ids were unique, the entries found
 * at their place in it (`from`, see `fromInput`) keep their order from there, got by their ranks
 * there without comparing ids, and only the others (new tables, mostly) are sorted and put in
 * place by binary search: the cost of a version that changes a few tables of many is a copy, not
 * a sort. Otherwise (the first input, or one whose ids repeat) a stable sort, as every input had.
 */
function idOrder(entries: InputEntry[], from: readonly number[], last: IdOrder | null): IdOrder {
  const n = entries.length;
  const rank: number[] = new Array(n);
  if (last && last.unique) {
    // the entries found in the last input, in its order (a subsequence of an order without ties)
    const slots: number[] = new Array(last.sorted.length).fill(-1);
    const others: number[] = [];
    for (let i = 0; i < n; i++) {
      const p = from[i]!;
      if (p >= 0) slots[last.rank[p]!] = i;
      else others.push(i);
    }
    const kept: number[] = [];
    for (const i of slots) if (i >= 0) kept.push(i);
    others.sort((a, b) => byId(entries[a]!, entries[b]!));
    const sorted: InputEntry[] = [];
    let unique = true;
    let k = 0;
    for (let o = 0; o < others.length && unique; o++) {
      const e = entries[others[o]!]!;
      if (o > 0 && entries[others[o - 1]!]!.id === e.id) unique = false;
      // the first kept entry whose id is not below this one's
      let lo = k;
      let hi = kept.length;
      while (lo < hi) {
        const mid = (lo + hi) >> 1;
        if (entries[kept[mid]!]!.id < e.id) lo = mid + 1;
        else hi = mid;
      }
      if (lo < kept.length && entries[kept[lo]!]!.id === e.id) unique = false;
      for (; k < lo; k++) {
        rank[kept[k]!] = sorted.length;
        sorted.push(entries[kept[k]!]!);
      }
      rank[others[o]!] = sorted.length;
      sorted.push(e);
    }
    if (unique) {
      for (; k < kept.length; k++) {
        rank[kept[k]!] = sorted.length;
        sorted.push(entries[kept[k]!]!);
      }
      return { sorted, rank, unique };
    }
  }
  const idx = Array.from({ length: n }, (_, i) => i);
  // (adapters that keep their tables by id hand them over in order: checked, not sorted again)
  let ordered = true;
  for (let i = 1; i < n && ordered; i++) ordered = entries[i - 1]!.id < entries[i]!.id;
  if (!ordered) idx.sort((a, b) => byId(entries[a]!, entries[b]!) || a - b);
  const sorted = idx.map((i) => entries[i]!);
  let unique = true;
  for (let i = 1; i < n && unique; i++) unique = sorted[i - 1]!.id !== sorted[i]!.id;
  idx.forEach((i, r) => (rank[i] = r));
  return { sorted, rank, unique };
}

/** Interns tables by storage hash and builds snapshots from adapter output or from the cache. */
export class SnapshotStore {
  private readonly tables = new Map<string, StoredTable>();
  /** Stored tables by the adapter's content key (see SnapshotInput). */
  private readonly byContentKey = new Map<string, StoredTable>();
  /** Stored tables by the adapter's input object (see `fromInput`). */
  private readonly byInput = new WeakMap<object, InputEntry>();
  /** The last input's tables and their entries (in the input's order), with their id order (see `idOrder`). */
  private lastInput: ({ tables: readonly object[]; entries: InputEntry[] } & IdOrder) | null = null;
  /** Whether every stored table's hashes are hex digits (those of `contentHash` are). */
  private hexHashes = true;

  get size(): number {
    return this.tables.size;
  }

  getTable(hash: string): StoredTable | undefined {
    return this.tables.get(hash);
  }

  /** Add a stored table (from the cache) whose storage hash, and perhaps meaning hash, is known. */
  internKnown(hash: string, table: Table, meaningHash?: string): StoredTable {
    let st = this.tables.get(hash);
    if (!st) {
      st = { hash, meaningHash: meaningHash ?? contentHash(canonicalJson(tableMeaning(table))), table };
      // (a hash from elsewhere than `contentHash`, as a damaged cache could hold: see `assembleSnapshot`)
      if (!isHex(st.hash) || !isHex(st.meaningHash)) this.hexHashes = false;
      this.tables.set(hash, st);
    }
    return st;
  }

  private intern(table: Table): { st: StoredTable; isNew: boolean } {
    const hash = contentHash(tableStorageKey(table));
    const existing = this.tables.get(hash);
    if (existing) return { st: existing, isNew: false };
    const st: StoredTable = { hash, meaningHash: contentHash(canonicalJson(tableMeaning(table))), table };
    this.tables.set(hash, st);
    return { st, isNew: true };
  }

  /**
   * Canonicalise an adapter's snapshot and intern its tables. Returns the snapshot, the origins
   * of each table (aligned with `snapshot.tables`) and the tables that were new to the store.
   * A table whose content key (SnapshotInput) was seen before is taken as stored, unnormalised.
   */
  fromInput(input: SnapshotInput): { snapshot: BuiltSnapshot; origins: TableOrigins[]; newTables: StoredTable[] } {
    // An adapter that hands back the same table object as in an earlier version (an incremental
    // assembly), or a table with a content key seen before, gets its stored table without
    // canonicalising and hashing it again.
    const entries: InputEntry[] = [];
    const newTables: StoredTable[] = [];
    const last = this.lastInput;
    // a table at the walk's point of the last input (or one past it) is found by a comparison;
    // `from[i]`: its position there (-1: found otherwise), so that its place in id order can be
    // taken from the last input's
    const from: number[] = new Array(input.tables.length);
    const at: NearbyWalk = { j: 0 };
    for (let i = 0; i < input.tables.length; i++) {
      const t = input.tables[i]!;
      const near = last ? findNearby(last.tables, at, t) : -1;
      from[i] = near;
      let e: InputEntry | undefined = near >= 0 ? last!.entries[near] : undefined;
      e ??= this.byInput.get(t);
      if (!e) {
        const contentKey = t.contentKey;
        const known = contentKey !== undefined ? this.byContentKey.get(contentKey) : undefined;
        if (known) {
          e = { id: known.table.id, st: known, origins: originsOf(t) };
        } else {
          const canon = canonicalOrder({ tables: [t] }).tables[0]!;
          const { table, origins: o } = stripTable(canon);
          delete (table as { contentKey?: string }).contentKey;
          const { st, isNew } = this.intern(table);
          if (isNew) newTables.push(st);
          if (contentKey !== undefined) this.byContentKey.set(contentKey, st);
          e = { id: canon.id, st, origins: o };
        }
        this.byInput.set(t, e);
      }
      entries.push(e);
    }
    // in id order: from the last input's order where it can be (see `idOrder`)
    const order = idOrder(entries, from, last);
    // (a copy: an adapter may hand over the same array again, changed)
    this.lastInput = { tables: input.tables.slice(), entries, ...order };
    const sorted = order.sorted;
    const views = canonicalOrder({ tables: [], ...(input.views ? { views: input.views } : {}) }).views.map(({ origin: _o, ...v }) => v);
    return {
      snapshot: this.assembleSnapshot(sorted.map((e) => e.st), views),
      origins: sorted.map((e) => e.origins),
      newTables,
    };
  }

  assembleSnapshot(tables: StoredTable[], views: ViewRef[]): BuiltSnapshot {
    const hashes: string[] = new Array(tables.length);
    const meanings: string[] = new Array(tables.length);
    for (let i = 0; i < tables.length; i++) {
      hashes[i] = tables[i]!.hash;
      meanings[i] = tables[i]!.meaningHash;
    }
    // the texts JSON.stringify writes for the lists, by a join while every hash is hex digits
    const listJson = this.hexHashes ? hexListJson : JSON.stringify;
    const v = viewsJson(views);
    return {
      hash: snapshotHashOfJson(listJson(hashes), v),
      meaningHash: snapshotHashOfJson(listJson(meanings), v),
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
