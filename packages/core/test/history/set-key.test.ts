import { describe, expect, it } from 'vitest';
import { SetKeys, unpaired } from '../../src/history/set-key.js';

function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a * 1664525 + 1013904223) >>> 0;
    return a / 4294967296;
  };
}

describe('SetKeys', () => {
  it('keys each list as a fresh instance keys it, whatever came before and in any order', () => {
    const rnd = rng(7);
    const keys = new SetKeys();
    const blobs = new Map<string, number>();
    let files = ['a.js', 'b.js', 'c.js'];
    for (let round = 0; round < 300; round++) {
      const r = rnd();
      const name = `m${Math.floor(rnd() * 40)}.js`;
      if (r < 0.4 && !files.includes(name)) files = [...files, name].sort();
      else if (r < 0.6) blobs.set(files[Math.floor(rnd() * files.length)]!, round);
      else if (r < 0.7 && files.length > 1) files = files.filter((_, i) => i !== Math.floor(rnd() * files.length));
      const refs = files.map((p) => keys.ref(p, `blob-${p}-${blobs.get(p) ?? 0}`));
      // sometimes out of order, which only makes the walk pair fewer members
      const list = rnd() < 0.2 ? [...refs].reverse() : refs;
      const extra = rnd() < 0.2 ? ['stale\u0000x'] : [];
      const fresh = new SetKeys().key(list.map((f) => ({ ...f })), extra);
      expect(keys.key(list, extra), `round ${round}`).toBe(fresh);
    }
  });

  it('gives equal sets equal keys and different sets different keys', () => {
    const k = new SetKeys();
    const a = k.ref('x.js', '1');
    const b = k.ref('y.js', '2');
    expect(k.key([a, b])).toBe(new SetKeys().key([b, a]));
    expect(k.key([a])).not.toBe(k.key([a, b]));
    expect(k.key([a, b], ['missing\u0000z'])).not.toBe(k.key([a, b]));
  });
});

describe('unpaired', () => {
  it('gives the members of the next sorted list that the last one did not have', () => {
    const k = new SetKeys();
    const [a, b, c] = [k.ref('a.js', '1'), k.ref('b.js', '1'), k.ref('c.js', '1')];
    const b2 = k.ref('b.js', '2');
    const d = k.ref('d.js', '1');
    expect(unpaired([a, b, c], [a, b2, c, d])).toEqual([b2, d]);
    expect(unpaired([a, c], [a, b2, c])).toEqual([b2]);
    expect(unpaired([], [a, c])).toEqual([a, c]);
    expect(unpaired([a, b, c], [c])).toEqual([]);
  });
});
