import { describe, expect, it } from 'vitest';
import { crossTabulate, testedCounts } from '../../../src/analysis/stats/contingency.js';
import { averageRanks, tieSizes } from '../../../src/analysis/stats/ranks.js';
import { accurateSum } from '../../../src/analysis/stats/result.js';
import { SeededRandom } from '../../../src/analysis/stats/random.js';
import { formatP } from '../../../src/analysis/stats/reading.js';

describe('statistics helpers', () => {
  it('average ranks as R rank(): ties share the mean rank', () => {
    expect(averageRanks([10, 20, 10, 30, 20, 10])).toEqual([2, 4.5, 2, 6, 4.5, 2]);
    expect(tieSizes([1, 1, 2, 3, 3, 3])).toEqual([2, 3]);
  });
  it('cross-tabulation keeps the order given, drops all-zero rows and columns for the tests, and never divides by zero', () => {
    const t = crossTabulate([['a', 'x'], ['a', 'y'], ['c', 'x']], ['a', 'b', 'c'], ['x', 'y', 'z'], { rows: 'r', columns: 'c' });
    expect(t.counts).toEqual([[1, 1, 0], [0, 0, 0], [1, 0, 0]]);
    expect([t.droppedRows, t.droppedColumns]).toEqual([['b'], ['z']]);
    expect(testedCounts(t)).toEqual([[1, 1], [1, 0]]);
    expect(t.rowPercent[1]).toEqual([null, null, null]);
    expect(t.expected[0]).toEqual([(2 * 2) / 3, (2 * 1) / 3, 0]);
  });
  it('compensated sums keep small terms', () => {
    expect(accurateSum([1e16, 1, -1e16])).toBe(1);
  });
  it('the seeded generator repeats itself and draws without modulo bias', () => {
    const a = new SeededRandom(42);
    const b = new SeededRandom(42);
    const xs = Array.from({ length: 5 }, () => a.below(6));
    expect(Array.from({ length: 5 }, () => b.below(6))).toEqual(xs);
    expect(xs.every((x) => x >= 0 && x < 6)).toBe(true);
  });
  it('p-values in words', () => {
    expect([formatP(0.0293), formatP(0.000295), formatP(0)]).toEqual(['0.0293', '2.95e-4', '0']);
  });
});
