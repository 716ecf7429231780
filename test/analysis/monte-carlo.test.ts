// The Monte Carlo form of the exact test draws tables with the observed margins row by row, each
// row's cells a multivariate hypergeometric draw made column by column (`hypergeometric`, by
// inversion from the mode). Checked: the sampler's draws against the hypergeometric probabilities
// themselves (a chi-square goodness-of-fit over the support, and the mean of a large case against
// m k / N), and the Monte Carlo p-values against R's fisher.test on the reference tables
// (test/fixtures/analysis/r-reference.ts) within four standard errors; and a table of 20,000
// observations, which the former sampler (a shuffle of all n per draw) made slow.
import { describe, expect, test } from 'vitest';
import { chiSquareUpperTail, fisherExactTest } from '@schema-strata/core';
import { hypergeometric } from '../../packages/core/src/analysis/stats/fisher-exact.js';
import { logFactorials } from '../../packages/core/src/analysis/stats/distributions.js';
import { SeededRandom } from '../../packages/core/src/analysis/stats/random.js';
import { AGRESTI, R } from '../fixtures/analysis/r-reference.js';

const pmf = (lf: Float64Array, total: number, k: number, m: number, x: number): number =>
  Math.exp(lf[k]! - lf[x]! - lf[k - x]! + lf[total - k]! - lf[m - x]! - lf[total - k - m + x]! - lf[total]! + lf[m]! + lf[total - m]!);

describe('the hypergeometric sampler', () => {
  for (const [total, k, m] of [[10, 4, 5], [30, 12, 9], [60, 50, 20], [40, 3, 30], [25, 20, 22]] as const) {
    test(`draws match the probabilities: population ${total}, ${k} successes, samples of ${m}`, () => {
      const lf = logFactorials(total);
      const rng = new SeededRandom(11);
      const draws = 40_000;
      const lo = Math.max(0, m - (total - k));
      const hi = Math.min(k, m);
      const seen = new Array<number>(hi - lo + 1).fill(0);
      for (let d = 0; d < draws; d++) {
        const x = hypergeometric(rng, lf, total, k, m);
        expect(x >= lo && x <= hi).toBe(true);
        seen[x - lo]!++;
      }
      // goodness of fit, cells with an expected count under 5 pooled into their neighbour
      let stat = 0;
      let cells = 0;
      let o = 0;
      let e = 0;
      for (let x = lo; x <= hi; x++) {
        o += seen[x - lo]!;
        e += draws * pmf(lf, total, k, m, x);
        if (e >= 5 || x === hi) {
          stat += ((o - e) * (o - e)) / e;
          cells++;
          o = 0;
          e = 0;
        }
      }
      if (cells > 1) expect(chiSquareUpperTail(stat, cells - 1)).toBeGreaterThan(1e-4);
    });
  }

  test('the mean of a large case: population 100,000, 30,000 successes, samples of 40,000', () => {
    const lf = logFactorials(100_000);
    const rng = new SeededRandom(3);
    const draws = 20_000;
    let sum = 0;
    for (let d = 0; d < draws; d++) sum += hypergeometric(rng, lf, 100_000, 30_000, 40_000);
    const mean = 40_000 * 0.3;
    const variance = 40_000 * 0.3 * 0.7 * (60_000 / 99_999);
    expect(Math.abs(sum / draws - mean)).toBeLessThan(4 * Math.sqrt(variance / draws));
  });
});

describe('the Monte Carlo exact test against R', () => {
  const birth = [[3, 0], [0, 5], [2, 2], [3, 1]];
  const band = [[1, 2, 0], [2, 3, 0], [3, 1, 0], [1, 2, 1]];
  const small = [[3, 1, 0], [1, 3, 2]];
  for (const [name, table, want] of [['birth', birth, R.fisher.birth], ['band', band, R.fisher.band], ['small', small, R.fisher.small], ['agresti', AGRESTI.counts, R.fisher.agresti]] as const) {
    test(name, () => {
      const draws = 50_000;
      const r = fisherExactTest(table as number[][], { limit: 10, draws, seed: 5 });
      if (!r.computable) throw new Error(r.reason);
      expect(r.method).toBe('monte-carlo');
      const se = Math.sqrt((want * (1 - want)) / draws);
      expect(Math.abs(r.pValue - want)).toBeLessThan(4 * se + 1 / draws);
    });
  }

  test('a table of 20,000 observations', () => {
    const independent = [[2000, 3000, 1000], [4000, 6000, 2000], [400, 600, 200], [200, 300, 300]];
    const r = fisherExactTest(independent, { limit: 1000, draws: 20_000, seed: 1 });
    if (!r.computable) throw new Error(r.reason);
    expect(r.method).toBe('monte-carlo');
    // the last row departs from independence (chi-square about 292 on 6 degrees of freedom): no draw is as extreme
    expect(r.hits).toBe(0);
    const even = [[2000, 3000, 1000], [4000, 6000, 2000], [400, 600, 200], [200, 300, 100]];
    const q = fisherExactTest(even, { limit: 1000, draws: 20_000, seed: 1 });
    if (!q.computable) throw new Error(q.reason);
    // margins exactly proportional: the observed table is the most probable one, almost every draw is as extreme
    expect(q.pValue).toBeGreaterThan(0.99);
  });
});
