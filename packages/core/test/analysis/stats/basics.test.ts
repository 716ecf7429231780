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
  it('the seeded generator repeats itself, draws in [0, 1), and is the reference Mersenne Twister', () => {
    const a = new SeededRandom(42);
    const b = new SeededRandom(42);
    const xs = Array.from({ length: 5 }, () => a.uniform());
    expect(Array.from({ length: 5 }, () => b.uniform())).toEqual(xs);
    expect(xs.every((x) => x >= 0 && x < 1)).toBe(true);
    // the first two 53-bit doubles of MT19937 seeded with 5489 (init_genrand, genrand_res53), as
    // MATLAB's `rng default; rand(1, 2)` and numpy's `RandomState(5489).random_sample(2)` give
    // them: 0.8147236863931789, 0.9057919370756192 (values recalled from those programs)
    const ref = new SeededRandom(5489);
    expect([ref.uniform(), ref.uniform()]).toEqual([0.8147236863931789, 0.9057919370756192]);
  });
  it('p-values in words', () => {
    expect([formatP(0.0293), formatP(0.000295), formatP(0)]).toEqual(['0.0293', '2.95e-4', '0']);
  });
});
