// A snapshot's two hashes are SHA-256 (first 24 hex digits) of the JSON list of its tables'
// storage (or meaning) hashes, a bar, and the canonical JSON of its views (codebook: `snapshots`).
// The store writes the lists by a join instead of JSON.stringify, which gives the same text only
// while every hash is hex digits. Checked here against that definition written out with
// JSON.stringify and node:crypto, for random snapshots with and without views, and for a store
// that was given a hash of another form (as a damaged cache could hold), which must fall back.
import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { hexListJson, isHex, snapshotHashOf } from '../../src/model/canonical.js';
import { SnapshotStore } from '../../src/history/snapshot-store.js';
import type { Table, ViewRef } from '../../src/model/types.js';

const sha = (text: string): string => createHash('sha256').update(text).digest('hex').slice(0, 24);

/** The definition, with the views' canonical JSON written out (sorted keys, undefined left out). */
function defined(hashes: string[], views: ViewRef[]): string {
  const viewsJson = views.length
    ? JSON.stringify(views.map((v) => Object.fromEntries(Object.entries({ id: v.id, name: v.name, namespace: v.namespace, ormName: v.ormName }).filter(([, x]) => x !== undefined).sort(([a], [b]) => (a < b ? -1 : 1)))))
    : '';
  return sha(`${JSON.stringify(hashes)}|${viewsJson}`);
}

function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

function table(name: string, width: number): Table {
  return {
    id: name,
    name,
    kind: 'table',
    columns: Array.from({ length: width }, (_, i) => ({ name: `c${i}`, type: { kind: 'integer' as const }, nativeType: 'integer', nullable: i > 0 })),
    primaryKey: ['c0'],
    foreignKeys: [],
    uniques: [],
  };
}

describe('snapshot hashes', () => {
  it('hexListJson writes what JSON.stringify writes for lists of hex digits', () => {
    const rnd = lcg(3);
    for (let n = 0; n < 200; n++) {
      const list = Array.from({ length: Math.floor(rnd() * 6) }, () => sha(String(rnd())).slice(0, Math.floor(rnd() * 25)));
      expect(hexListJson(list)).toBe(JSON.stringify(list));
      expect(list.every(isHex)).toBe(true);
    }
    for (const s of ['"', 'a\\b', 'A', 'g', '\u0000', 'ab cd']) expect(isHex(s)).toBe(false);
    expect(snapshotHashOf(['"', 'ab'], [])).toBe(defined(['"', 'ab'], []));
  });

  it('the store hashes its snapshots as the definition says', () => {
    const rnd = lcg(11);
    const store = new SnapshotStore();
    const names = Array.from({ length: 30 }, (_, i) => `t${String(i).padStart(2, '0')}`);
    for (let step = 0; step < 150; step++) {
      const tables = names.filter(() => rnd() < 0.5).map((n) => table(n, 1 + Math.floor(rnd() * 4)));
      const views: ViewRef[] = rnd() < 0.3 ? [{ id: 'open_loans', name: 'open_loans', ...(rnd() < 0.5 ? { namespace: 'coop' } : {}) }] : [];
      const s = store.fromInput({ tables, views }).snapshot;
      expect(s.hash).toBe(defined(s.tables.map((t) => t.hash), s.views));
      expect(s.meaningHash).toBe(defined(s.tables.map((t) => t.meaningHash), s.views));
    }
  });

  it('falls back to JSON.stringify once a stored hash is not hex digits', () => {
    const store = new SnapshotStore();
    const odd = store.internKnown('tools"v1', table('tools', 2), 'meaning\\1');
    const plain = store.fromInput({ tables: [table('members', 3)] }).snapshot.tables[0]!;
    const s = store.assembleSnapshot([plain, odd], []);
    expect(s.hash).toBe(defined([plain.hash, odd.hash], []));
    expect(s.meaningHash).toBe(defined([plain.meaningHash, odd.meaningHash], []));
  });
});
