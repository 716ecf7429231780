import { describe, expect, it } from 'vitest';
import { activityBandOf } from '../../../src/analysis/lifecycle/activity-band.js';
import { birthGroupOf, initialCutoff } from '../../../src/analysis/lifecycle/birth-group.js';
import { lifetimeOf, ratesOf } from '../../../src/analysis/lifecycle/lifetime.js';
import type { Timeline } from '../../../src/analysis/input/timeline.js';

const timeline = (dates: string[]): Timeline => ({
  versions: dates.map((date, index) => ({ index, commit: String(index).padStart(40, '0'), date, time: Date.parse(date), status: 'ok', tables: [], key: String(index) })),
  changes: [],
});

describe('lifetime', () => {
  const tl = timeline(['2024-01-01T00:00:00Z', '2024-01-11T00:00:00Z', '2024-03-01T00:00:00Z', '2024-02-01T00:00:00Z']);
  it('runs from the birth version to the removal version (excluded) or to the last version (included)', () => {
    expect(lifetimeOf([{ born: 0, removed: 2 }], tl)).toEqual({ versions: 2, days: 60 });
    expect(lifetimeOf([{ born: 1, removed: null }], tl)).toEqual({ versions: 3, days: 21 });
  });
  it('sums the spells of a table removed and added again', () => {
    expect(lifetimeOf([{ born: 0, removed: 1 }, { born: 2, removed: null }], tl)).toEqual({ versions: 3, days: 10 + 0 });
  });
  it('committer dates out of order never give less than zero days', () => {
    expect(lifetimeOf([{ born: 2, removed: 3 }], tl)).toEqual({ versions: 1, days: 0 });
  });
  it('per-year rates need 30 days of life', () => {
    expect(ratesOf(3, { versions: 4, days: 29.9 })).toEqual({ perVersion: 0.75, perYear: null });
    expect(ratesOf(3, { versions: 4, days: 365.25 })).toEqual({ perVersion: 0.75, perYear: 3 });
  });
});

describe('birth group', () => {
  const tl = timeline(['2024-01-01T10:00:00Z', '2024-01-05T23:00:00Z', '2024-01-06T00:00:00Z']);
  it('version 0, the first N versions, a date (a bare day counts whole), a version', () => {
    expect(initialCutoff({ kind: 'version0' }, tl)).toBe(0);
    expect(initialCutoff({ kind: 'versions', count: 2 }, tl)).toBe(1);
    expect(initialCutoff({ kind: 'versions', count: 9 }, tl)).toBe(2);
    expect(initialCutoff({ kind: 'date', date: '2024-01-05' }, tl)).toBe(1);
    expect(initialCutoff({ kind: 'date', date: '2023-12-31' }, tl)).toBe(-1);
    expect(initialCutoff({ kind: 'commit', commit: 'x', version: 1 }, tl)).toBe(1);
    expect([birthGroupOf(1, 1), birthGroupOf(2, 1)]).toEqual(['initial', 'later']);
  });
});

describe('activity band', () => {
  it('unchanged at 0, low from 1 to T, high above T', () => {
    const r = { perVersion: 0, perYear: 0 };
    expect([0, 1, 5, 6].map((n) => activityBandOf(n, r, 'total', 5).band)).toEqual(['unchanged', 'low', 'low', 'high']);
  });
  it('by rate: the rate is compared with T; no per-year rate, no band', () => {
    expect(activityBandOf(10, { perVersion: 0.5, perYear: 2 }, 'per-year', 1).band).toBe('high');
    expect(activityBandOf(10, { perVersion: 0.5, perYear: 2 }, 'per-version', 1).band).toBe('low');
    expect(activityBandOf(1, { perVersion: 1, perYear: null }, 'per-year', 5)).toEqual({ band: null, value: null });
    expect(activityBandOf(0, { perVersion: 0, perYear: null }, 'per-year', 5).band).toBe('unchanged');
  });
});
