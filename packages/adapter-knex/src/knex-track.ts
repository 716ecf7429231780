/** What a map of the replayed schema must offer to be tracked (PMap and Map both do). */
export interface MapLike<V> extends Iterable<[string, V]> {
  get(key: string): V | undefined;
  has(key: string): boolean;
  set(key: string, value: V): unknown;
  delete(key: string): boolean;
}

/** Which keys of one map a migration read and wrote. */
export interface MapAccess {
  /** Keys whose presence or value the migration looked at (a delete counts: it tells whether the key was there). */
  readonly reads: ReadonlySet<string>;
  /** Keys the migration set or deleted. */
  readonly written: ReadonlySet<string>;
  /** The migration went through every entry (so it depends on all of them). */
  readonly all: boolean;
}

/**
 * One map of the replayed schema as one migration sees it: every read and write is recorded,
 * so that a later fold can tell whether the migration would do the same on another state, and
 * the map is copied on its first write only (an untouched map stays the same object).
 */
export class TrackedMap<V, M extends MapLike<V>> implements MapAccess {
  readonly reads = new Set<string>();
  readonly written = new Set<string>();
  all = false;
  private cur: M;
  private copied = false;

  constructor(
    base: M,
    private readonly copy: (m: M) => M,
  ) {
    this.cur = base;
  }

  get(key: string): V | undefined {
    this.reads.add(key);
    return this.cur.get(key);
  }

  has(key: string): boolean {
    this.reads.add(key);
    return this.cur.has(key);
  }

  set(key: string, value: V): this {
    this.writable().set(key, value);
    this.written.add(key);
    return this;
  }

  delete(key: string): boolean {
    this.reads.add(key);
    if (!this.cur.has(key)) return false;
    this.writable().delete(key);
    this.written.add(key);
    return true;
  }

  [Symbol.iterator](): Iterator<[string, V]> {
    this.all = true;
    return this.cur[Symbol.iterator]();
  }

  /** The keys whose values pass `test` (a read of every entry); through the map's own `keysWhere` when it has one. */
  keysWhere(test: (value: V) => boolean): string[] {
    this.all = true;
    const m = this.cur as M & { keysWhere?(test: (value: V) => boolean): string[] };
    if (m.keysWhere) return m.keysWhere(test);
    const out: string[] = [];
    for (const [k, v] of m) if (test(v)) out.push(k);
    return out;
  }

  /** The map after the migration (the base itself when nothing was written). */
  result(): M {
    return this.cur;
  }

  private writable(): M {
    if (!this.copied) {
      this.cur = this.copy(this.cur);
      this.copied = true;
    }
    return this.cur;
  }
}

/** Whether a migration with this access may be skipped over keys that changed: it read none of them. */
export function untouchedBy(access: MapAccess, changed: ReadonlySet<string>): boolean {
  if (changed.size === 0) return true;
  if (access.all) return false;
  for (const k of changed) if (access.reads.has(k)) return false;
  return true;
}
