// Canonical JSON is built by concatenation, and compared in place by canonicalEqual. Both are
// checked against the first form of canonicalJson (kept here as the reference: keys filtered,
// sorted, then map and join), over random values: nested objects and arrays, keys set in any
// order, undefined properties and elements, holes, NaN, -0, unicode and quotes in keys and
// strings. The hashes in every interchange file depend on these strings staying the same.
import { describe, expect, it } from 'vitest';
import { canonicalEqual, canonicalJson } from '../../src/model/canonical.js';

function reference(value: unknown): string {
  if (value === null || typeof value !== 'object') return JSON.stringify(value);
  if (Array.isArray(value)) return `[${value.map((v) => (v === undefined ? 'null' : reference(v))).join(',')}]`;
  const obj = value as Record<string, unknown>;
  const keys = Object.keys(obj).filter((k) => obj[k] !== undefined).sort();
  return `{${keys.map((k) => `${JSON.stringify(k)}:${reference(obj[k])}`).join(',')}}`;
}

function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

const KEYS = ['kind', 'name', 'length', 'of', 'values', 'a', 'B', 'é', 'x"y', '10', '2', 'nullable'];
const PRIMS: unknown[] = [0, -0, 1, 2.5, NaN, Infinity, -3, '', 'text', 'quo"te\n', 'ü', true, false, null, undefined];

function randomValue(rnd: () => number, depth: number): unknown {
  const r = rnd();
  if (depth <= 0 || r < 0.4) return PRIMS[Math.floor(rnd() * PRIMS.length)];
  if (r < 0.7) {
    const n = Math.floor(rnd() * 4);
    const xs: unknown[] = [];
    for (let i = 0; i < n; i++) xs.push(randomValue(rnd, depth - 1));
    if (rnd() < 0.1) xs.length += 2; // holes at the end
    if (rnd() < 0.1 && xs.length > 0) delete xs[0]; // a hole at the start
    return xs;
  }
  const o: Record<string, unknown> = {};
  const n = Math.floor(rnd() * 5);
  for (let i = 0; i < n; i++) o[KEYS[Math.floor(rnd() * KEYS.length)]!] = randomValue(rnd, depth - 1);
  return o;
}

/** The same value with its objects' keys set in another order (and some undefined ones added). */
function reordered(v: unknown, rnd: () => number): unknown {
  if (v === null || typeof v !== 'object') return v;
  if (Array.isArray(v)) {
    const out = new Array(v.length);
    for (let i = 0; i < v.length; i++) if (i in v) out[i] = reordered(v[i], rnd);
    return out;
  }
  const o = v as Record<string, unknown>;
  const keys = Object.keys(o).sort(() => rnd() - 0.5);
  const out: Record<string, unknown> = {};
  if (rnd() < 0.3) out.extra = undefined;
  for (const k of keys) out[k] = reordered(o[k], rnd);
  return out;
}

/** A slight change somewhere in the value (often none at all: the same text). */
function nudged(v: unknown, rnd: () => number): unknown {
  if (v === null || typeof v !== 'object') return rnd() < 0.3 ? PRIMS[Math.floor(rnd() * PRIMS.length)] : v;
  if (Array.isArray(v)) {
    const out = v.slice();
    if (out.length > 0) {
      const i = Math.floor(rnd() * out.length);
      out[i] = nudged(out[i], rnd);
    } else if (rnd() < 0.3) out.push(null);
    return out;
  }
  const o = { ...(v as Record<string, unknown>) };
  const keys = Object.keys(o);
  if (keys.length > 0 && rnd() < 0.7) {
    const k = keys[Math.floor(rnd() * keys.length)]!;
    o[k] = nudged(o[k], rnd);
  } else o[KEYS[Math.floor(rnd() * KEYS.length)]!] = PRIMS[Math.floor(rnd() * PRIMS.length)];
  return o;
}

describe('canonical JSON by concatenation', () => {
  it('gives the strings of the first form, over random values', () => {
    const rnd = lcg(11);
    const shapes = { array: 0, object: 0, hole: 0 };
    for (let i = 0; i < 5000; i++) {
      const v = randomValue(rnd, 4);
      if (Array.isArray(v)) {
        shapes.array++;
        if (v.length > Object.keys(v).length) shapes.hole++;
      } else if (v !== null && typeof v === 'object') shapes.object++;
      expect(canonicalJson(v)).toBe(reference(v));
      expect(canonicalJson(reordered(v, rnd))).toBe(reference(v));
    }
    expect(shapes.array).toBeGreaterThan(500);
    expect(shapes.object).toBeGreaterThan(500);
    expect(shapes.hole).toBeGreaterThan(20);
  });
});

describe('canonical equality in place', () => {
  it('says equal exactly when the first form gives equal strings', () => {
    const rnd = lcg(23);
    let equal = 0;
    let unequal = 0;
    for (let i = 0; i < 5000; i++) {
      const a = randomValue(rnd, 4);
      const b = rnd() < 0.5 ? reordered(a, rnd) : nudged(reordered(a, rnd), rnd);
      const want = reference(a) === reference(b);
      if (want) equal++;
      else unequal++;
      expect(canonicalEqual(a, b), `${reference(a)} vs ${reference(b)}`).toBe(want);
      expect(canonicalEqual(b, a)).toBe(want);
    }
    expect(equal).toBeGreaterThan(1000);
    expect(unequal).toBeGreaterThan(1000);
  });

  it('sees an undefined property as absent, and an undefined element as null', () => {
    expect(canonicalEqual({ kind: 'string', length: undefined }, { kind: 'string' })).toBe(true);
    expect(canonicalEqual({ kind: 'string', length: 10 }, { kind: 'string' })).toBe(false);
    expect(canonicalEqual([undefined], [null])).toBe(true);
    expect(canonicalEqual([1, 2], [1, 2, 3])).toBe(false);
    expect(canonicalEqual({ a: [] }, { a: {} })).toBe(false);
  });
});
