/**
 * A map from strings that is cheap to fork: its entries live in a fixed number of buckets, and a
 * fork shares every bucket until it writes to it. The replay keeps the schema after each
 * migration; a fork per migration costs a copy of the bucket array, not of every table.
 */
export class PMap<V> implements Iterable<[string, V]> {
  private static readonly BUCKETS = 64;
  private readonly buckets: Array<Map<string, V> | undefined>;
  /** Buckets this map created or copied, and so may change. */
  private readonly own: boolean[];
  private count: number;

  constructor(from?: PMap<V>) {
    if (from) {
      this.buckets = from.buckets.slice();
      this.own = new Array<boolean>(PMap.BUCKETS).fill(false);
      this.count = from.count;
    } else {
      this.buckets = new Array<Map<string, V> | undefined>(PMap.BUCKETS);
      this.own = new Array<boolean>(PMap.BUCKETS).fill(true);
      this.count = 0;
    }
  }

  private static slot(key: string): number {
    let h = 2166136261;
    for (let i = 0; i < key.length; i++) h = Math.imul(h ^ key.charCodeAt(i), 16777619);
    return (h >>> 0) % PMap.BUCKETS;
  }

  private writable(i: number): Map<string, V> {
    let b = this.buckets[i];
    if (!this.own[i]) {
      b = new Map(b);
      this.buckets[i] = b;
      this.own[i] = true;
    } else if (!b) {
      b = new Map();
      this.buckets[i] = b;
    }
    return b;
  }

  get size(): number {
    return this.count;
  }

  get(key: string): V | undefined {
    return this.buckets[PMap.slot(key)]?.get(key);
  }

  has(key: string): boolean {
    return this.buckets[PMap.slot(key)]?.has(key) ?? false;
  }

  set(key: string, value: V): this {
    const b = this.writable(PMap.slot(key));
    if (!b.has(key)) this.count++;
    b.set(key, value);
    return this;
  }

  delete(key: string): boolean {
    const i = PMap.slot(key);
    if (!this.buckets[i]?.has(key)) return false;
    this.writable(i).delete(key);
    this.count--;
    return true;
  }

  *entries(): IterableIterator<[string, V]> {
    for (const b of this.buckets) if (b) yield* b;
  }

  *values(): IterableIterator<V> {
    for (const b of this.buckets) if (b) yield* b.values();
  }

  /** The values in an array (faster than iterating `values()`). */
  valueList(): V[] {
    const out: V[] = [];
    for (const b of this.buckets) if (b) for (const v of b.values()) out.push(v);
    return out;
  }

  /** The keys whose values pass `test`, without stepping a generator per entry. */
  keysWhere(test: (value: V) => boolean): string[] {
    const out: string[] = [];
    for (const b of this.buckets) if (b) b.forEach((v, k) => test(v) && out.push(k));
    return out;
  }

  [Symbol.iterator](): IterableIterator<[string, V]> {
    return this.entries();
  }
}
