// The snapshot store finds the tables of an adapter's input that stood at the same place in the
// last input by comparing objects, and skips the order check for pairs the last input had in
// order. Checked against a new store for every input (which finds nothing and checks every
// pair): the same snapshot hashes, tables, order and origins, over a random sequence of inputs
// that keep, replace, insert, drop and reorder tables (and hand over two tables of one id), and with an adapter that hands over the
// same array again after changing it in place.
import { describe, expect, it } from 'vitest';
import { SnapshotStore } from '../../packages/core/src/history/snapshot-store.js';
import type { SnapshotInput, Table } from '../../packages/core/src/model/types.js';

/** A small deterministic generator (a linear congruential one; enough for shuffling test inputs). */
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

function table(name: string, variant: number, line: number): Table {
  return {
    id: name,
    name,
    kind: 'table',
    columns: [
      { name: 'id', type: { kind: 'integer' }, nativeType: 'integer', nullable: false, origin: { file: `db/${name}.js`, line } },
      { name: `c${variant}`, type: { kind: 'string', length: 10 + variant }, nativeType: 'varchar', nullable: true },
    ],
    primaryKey: ['id'],
    foreignKeys: [],
    uniques: [],
    origin: { file: `db/${name}.js`, line },
  };
}

const view = (store: SnapshotStore, input: SnapshotInput) => {
  const r = store.fromInput(input);
  return { hash: r.snapshot.hash, meaning: r.snapshot.meaningHash, tables: r.snapshot.tables.map((t) => t.hash), origins: r.origins };
};

describe('the snapshot store', () => {
  it('gives what a new store gives, whatever the last input was', () => {
    const rnd = lcg(7);
    const names = Array.from({ length: 40 }, (_, i) => `t${String(i).padStart(2, '0')}`);
    let current: Table[] = names.slice(0, 10).map((n) => table(n, 0, 1));
    const store = new SnapshotStore();
    let sorted = 0;
    let twice = 0;
    for (let step = 0; step < 400; step++) {
      const next = [...current];
      const r = rnd();
      if (r < 0.3 && next.length > 0) {
        // a table changed: a new object in its place
        const k = Math.floor(rnd() * next.length);
        next[k] = table(next[k]!.name, step, step);
      } else if (r < 0.5) {
        // a table added, in order or at the end
        const free = names.filter((n) => !next.some((t) => t.name === n));
        if (free.length > 0) {
          const t = table(free[Math.floor(rnd() * free.length)]!, step, 1);
          if (rnd() < 0.5) next.push(t);
          else next.splice(Math.floor(rnd() * (next.length + 1)), 0, t);
        }
      } else if (r < 0.65 && next.length > 1) {
        next.splice(Math.floor(rnd() * next.length), 1 + Math.floor(rnd() * 2));
      } else if (r < 0.75) {
        // the same tables, in another order
        for (let k = next.length - 1; k > 0; k--) {
          const m = Math.floor(rnd() * (k + 1));
          [next[k], next[m]] = [next[m]!, next[k]!];
        }
      } else if (r < 0.85) {
        next.sort((a, b) => (a.id < b.id ? -1 : 1));
        sorted++;
      } else if (r < 0.9 && next.length > 0) {
        // an adapter's slip: a second table with an id already there (kept in input order)
        const k = Math.floor(rnd() * next.length);
        next.splice(Math.floor(rnd() * (next.length + 1)), 0, table(next[k]!.name, step + 1000, step));
        twice++;
      } else if (r < 0.95) {
        // ids unique again
        const seen = new Set<string>();
        for (let k = next.length - 1; k >= 0; k--) {
          if (seen.has(next[k]!.id)) next.splice(k, 1);
          else seen.add(next[k]!.id);
        }
      }
      current = next;
      expect(view(store, { tables: current }), `step ${step}`).toEqual(view(new SnapshotStore(), { tables: current }));
    }
    expect(sorted).toBeGreaterThan(10);
    expect(twice).toBeGreaterThan(10);
  });

  it('is not misled by an array handed over again after a change in place', () => {
    const store = new SnapshotStore();
    const tables = ['a', 'b', 'c', 'd'].map((n) => table(n, 0, 1));
    const first = view(store, { tables });
    expect(first).toEqual(view(new SnapshotStore(), { tables }));
    // the same array: one table replaced, two swapped
    tables[1] = table('b', 1, 5);
    [tables[2], tables[3]] = [tables[3]!, tables[2]!];
    const second = view(store, { tables });
    expect(second).toEqual(view(new SnapshotStore(), { tables }));
    expect(second.hash).not.toBe(first.hash);
  });
});
