import { describe, expect, test } from 'vitest';
import { createRequire } from 'node:module';
import { chiSquareTest, chiSquareUpperTail, cramersV, fisherExactTest, kruskalWallis, spearman } from '@schema-strata/core';
import { AGRESTI, R } from '../fixtures/analysis/r-reference.js';

const require = createRequire(import.meta.url);
// @stdlib's own implementations, a second outside reference where it has the test
const chi2test = require('@stdlib/stats-chi2test') as (x: number[][], opts?: { correct?: boolean }) => { statistic: number; pValue: number; df: number };
const kruskalTest = require('@stdlib/stats-kruskal-test') as (...groups: number[][]) => { statistic: number; pValue: number; df: number };

const close = (got: number, want: number, rel = 1e-9): void => {
  const scale = Math.max(Math.abs(want), Number.MIN_VALUE);
  expect(Math.abs(got - want) / scale, `${got} vs ${want}`).toBeLessThanOrEqual(rel);
};
const opts = { limit: 10_000_000, draws: 20_000, seed: 7 };
const birth = [[3, 0], [0, 5], [2, 2], [3, 1]];
const band = [[1, 2, 0], [2, 3, 0], [3, 1, 0], [1, 2, 1]];
const tea = [[3, 1], [1, 3]];
const small = [[3, 1, 0], [1, 3, 2]];
const deg = [5, 7, 1, 3, 1, 0, 0, 0, 2, 1, 1, 2, 2, 2, 1, 2];
const upd = [2, 7, 0, 5, 0, 1, 0, 1, 2, 0, 1, 0, 2, 0, 0, 1];

describe('chi-square test (R chisq.test(correct = FALSE), @stdlib chi2test)', () => {
  for (const [name, table, ref] of [['birth', birth, R.chisq.birth], ['band', band, R.chisq.band], ['agresti', AGRESTI.counts, R.chisq.agresti], ['small', small, R.chisq.small]] as const) {
    test(name, () => {
      const r = chiSquareTest(table as number[][]);
      if (!r.computable) throw new Error(r.reason);
      close(r.statistic, ref.statistic);
      expect(r.df).toBe(ref.df);
      close(r.pValue, ref.p);
      const s = chi2test(table as number[][], { correct: false });
      close(r.statistic, s.statistic, 1e-12);
      close(r.pValue, s.pValue, 1e-9);
    });
  }
  test('the worked example of the textbook: X^2 = 30.07 on 2 df (Agresti 2007, Table 2.5)', () => {
    const r = chiSquareTest(AGRESTI.counts);
    expect(r.computable && Number(r.statistic.toFixed(2))).toBe(AGRESTI.bookChiSquare);
    expect(r.computable && r.pValue).toBeLessThan(0.001);
  });
  test('critical values of a standard table at 0.05: 3.841 (1 df), 7.815 (3 df), values rounded to 3 decimals', () => {
    close(chiSquareUpperTail(3.841, 1), R.chisqTail.at3841df1);
    close(chiSquareUpperTail(7.815, 3), R.chisqTail.at7815df3);
    // the rounded table value lies within half a unit of the third decimal of the 0.05 point
    expect(chiSquareUpperTail(3.8405, 1)).toBeGreaterThan(0.05);
    expect(chiSquareUpperTail(3.8415, 1)).toBeLessThan(0.05);
    expect(chiSquareUpperTail(7.8145, 3)).toBeGreaterThan(0.05);
    expect(chiSquareUpperTail(7.8155, 3)).toBeLessThan(0.05);
  });
  test('not computable, never NaN', () => {
    expect(chiSquareTest([[1, 2, 3]])).toEqual({ computable: false, reason: expect.stringContaining('one row') });
    expect(chiSquareTest([[1], [2]])).toEqual({ computable: false, reason: expect.stringContaining('one column') });
    expect(chiSquareTest([[0, 0], [0, 0]])).toEqual({ computable: false, reason: 'no observations' });
  });
});

describe('Fisher-Freeman-Halton exact test (R fisher.test)', () => {
  test("Fisher's tea-tasting table [[3,1],[1,3]]: one-sided 17/70, two-sided 34/70 (from memory, confirmed by R)", () => {
    const two = fisherExactTest(tea, opts);
    const greater = fisherExactTest(tea, { ...opts, alternative: 'greater' });
    if (!two.computable || !greater.computable) throw new Error('not computable');
    close(two.pValue, 34 / 70, 1e-12);
    close(greater.pValue, 17 / 70, 1e-12);
    close(two.pValue, R.fisher.teaTwoSided);
    close(greater.pValue, R.fisher.teaGreater);
    expect(two.method).toBe('exact');
    expect(two.tables).toBe(5);
  });
  for (const [name, table, ref] of [['birth', birth, R.fisher.birth], ['band', band, R.fisher.band], ['small', small, R.fisher.small], ['agresti (2x3 textbook example)', AGRESTI.counts, R.fisher.agresti]] as const) {
    test(name, () => {
      const r = fisherExactTest(table as number[][], opts);
      if (!r.computable) throw new Error(r.reason);
      expect(r.method).toBe('exact');
      close(r.pValue, ref);
    });
  }
  test('above the limit: Monte Carlo with the seed and draws reported, near the exact value, and the same bytes twice', () => {
    const mc = fisherExactTest(band, { limit: 10, draws: 20_000, seed: 7 });
    if (!mc.computable) throw new Error(mc.reason);
    expect(mc).toMatchObject({ method: 'monte-carlo', draws: 20_000, seed: 7, limit: 10 });
    expect(mc.pValue).toBe((1 + mc.hits!) / 20_001);
    // four standard errors of a proportion near 0.76 from 20,000 draws: 4 * sqrt(0.76 * 0.24 / 20000) = 0.012
    expect(Math.abs(mc.pValue - R.fisher.band)).toBeLessThan(0.012);
    expect(fisherExactTest(band, { limit: 10, draws: 20_000, seed: 7 })).toEqual(mc);
    expect(fisherExactTest(band, { limit: 10, draws: 20_000, seed: 8 }).computable).toBe(true);
  });
  test('one-sided alternatives only for 2x2; empty rows are the caller\'s to drop', () => {
    expect(fisherExactTest(band, { ...opts, alternative: 'greater' }).computable).toBe(false);
    expect(fisherExactTest([[1, 0], [0, 0]], opts).computable).toBe(false);
  });
});

describe("Cramer's V (vcd::assocstats; Bergsma's correction by its formula in R)", () => {
  test('birth, band, agresti', () => {
    const v = (t: number[][]) => {
      const c = chiSquareTest(t);
      if (!c.computable) throw new Error(c.reason);
      return cramersV(c.statistic, t.flat().reduce((a, b) => a + b, 0), t.length, t[0]!.length);
    };
    const b = v(birth);
    const a = v(AGRESTI.counts);
    const d = v(band);
    if (!b.computable || !a.computable || !d.computable || !b.biasCorrected.computable || !a.biasCorrected.computable) throw new Error('not computable');
    close(b.value, R.cramersV.birth);
    close(b.biasCorrected.value, R.cramersV.birthCorrected);
    close(a.value, R.cramersV.agresti);
    close(a.biasCorrected.value, R.cramersV.agrestiCorrected);
    close(d.value, R.cramersV.band);
  });
});

describe("Spearman's rank correlation (R cor.test(method = 'spearman'))", () => {
  test('fixture, with ties: t approximation', () => {
    const r = spearman(deg, upd);
    if (!r.computable) throw new Error(r.reason);
    expect(r).toMatchObject({ method: 't-approximation', ties: true, n: 16 });
    close(r.rho, R.spearman.fixture.rho);
    close(r.S, R.spearman.fixture.S);
    close(r.pValue, R.spearman.fixture.p);
  });
  test('7 and 9 pairs without ties: exact, as R', () => {
    for (const c of [R.spearman.n7, R.spearman.n9]) {
      const r = spearman(c.x, c.y);
      if (!r.computable) throw new Error(r.reason);
      expect(r.method).toBe('exact');
      close(r.rho, c.rho);
      close(r.S, c.S);
      close(r.pValue, c.p);
    }
  });
  test('not computable below 3 pairs or without variation', () => {
    expect(spearman([1, 2], [2, 1]).computable).toBe(false);
    expect(spearman([1, 1, 1, 1], [1, 2, 3, 4])).toEqual({ computable: false, reason: expect.stringContaining('same value') });
  });
});

describe('Kruskal-Wallis test (R kruskal.test, @stdlib kruskal-test)', () => {
  test('fixture groups', () => {
    const groups = [[1, 0, 1], [2, 0, 2, 0, 1], [0, 0, 0, 1], [2, 7, 5, 0]];
    const r = kruskalWallis(groups.map((values, i) => ({ label: `g${i}`, values })));
    if (!r.computable) throw new Error(r.reason);
    close(r.statistic, R.kruskal.fixture.statistic);
    expect(r.df).toBe(R.kruskal.fixture.df);
    close(r.pValue, R.kruskal.fixture.p);
    const s = kruskalTest(...groups);
    close(r.statistic, s.statistic, 1e-12);
    close(r.pValue, s.pValue);
  });
  test('empty groups dropped and reported; one group or all equal: not computable', () => {
    const r = kruskalWallis([{ label: 'a', values: [1, 2] }, { label: 'b', values: [] }, { label: 'c', values: [3, 4] }]);
    expect(r.computable && r.droppedGroups).toEqual(['b']);
    expect(r.computable && r.df).toBe(1);
    expect(kruskalWallis([{ label: 'a', values: [1, 2] }, { label: 'b', values: [] }]).computable).toBe(false);
    expect(kruskalWallis([{ label: 'a', values: [1, 1] }, { label: 'b', values: [1] }])).toEqual({ computable: false, reason: 'every observation has the same value' });
  });
});
