import { describe, expect, it } from 'vitest';
import { chiSquareTest } from '../../src/analysis/stats/chi-square.js';
import { cochranMantelHaenszel, type StratifiedResult } from '../../src/study/stratified.js';

// Reference values: R 4.2.2 (Debian r-base-core), stats::mantelhaen.test, printed with
// sprintf("%.17g"). Arrays are written here row by row per stratum; R's array() fills column by
// column, so each R call below gives the same tables.
const close = (actual: number, expected: number, rel = 1e-9): void => {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(rel * Math.abs(expected));
};
const computed = (r: StratifiedResult) => {
  if (!r.computable) throw new Error(`not computable: ${r.reason}`);
  return r;
};
const strata = (...tables: number[][][]) => tables.map((counts, k) => ({ label: `s${k + 1}`, counts }));

describe('Cochran-Mantel-Haenszel test, checked against R mantelhaen.test', () => {
  it('2 x 2 x 5: penicillin and rabbits (Agresti 1990, pp. 231-237; the example of R\'s help page)', () => {
    // Rabbits <- array(c(0, 0, 6, 5, 3, 0, 3, 6, 6, 2, 0, 4, 5, 6, 1, 0, 2, 5, 0, 0), dim = c(2, 2, 5))
    const rabbits = strata([[0, 6], [0, 5]], [[3, 3], [0, 6]], [[6, 0], [2, 4]], [[5, 1], [6, 0]], [[2, 0], [5, 0]]);
    const r = computed(cochranMantelHaenszel(rabbits, ['none', '1.5h'], ['cured', 'died']));
    expect(r.form).toBe('2x2xK');
    expect(r.df).toBe(1);
    // mantelhaen.test(Rabbits, correct = FALSE): 5.6571428571428575, p 0.017384420352066179
    close(r.statistic, 5.6571428571428575);
    close(r.pValue, 0.017384420352066179);
    // mantelhaen.test(Rabbits): 3.9285714285714288, p 0.047472255142918106 (the help page: "p = 0.047")
    close(r.continuityCorrected!.statistic, 3.9285714285714288);
    close(r.continuityCorrected!.pValue, 0.047472255142918106);
    // estimate: 7
    close(r.commonOddsRatio!, 7);
  });

  it('2 x 2 x 6: UC Berkeley admissions (R datasets::UCBAdmissions)', () => {
    // UCBAdmissions[, , k] for k = 1..6, Admit x Gender
    const ucb = strata(
      [[512, 89], [313, 19]], [[353, 17], [207, 8]], [[120, 202], [205, 391]],
      [[138, 131], [279, 244]], [[53, 94], [138, 299]], [[22, 24], [351, 317]],
    );
    const r = computed(cochranMantelHaenszel(ucb, ['admitted', 'rejected'], ['male', 'female']));
    // mantelhaen.test(UCBAdmissions, correct = FALSE): 1.5246066604434356, p 0.21692369705551837
    close(r.statistic, 1.5246066604434356);
    close(r.pValue, 0.21692369705551837);
    // mantelhaen.test(UCBAdmissions): 1.4269462285866883, p 0.23226346281704827; estimate 0.90469682825862308
    close(r.continuityCorrected!.statistic, 1.4269462285866883);
    close(r.continuityCorrected!.pValue, 0.23226346281704827);
    close(r.commonOddsRatio!, 0.90469682825862308);
  });

  it('4 x 4 x 2: job satisfaction by income, stratified by gender (Agresti 2002, Table 7.8 and p. 297)', () => {
    // Satisfaction <- array(c(1, 2, 0, 0, 3, 3, 1, 2, 11, 17, 8, 4, 2, 3, 5, 2,
    //                         1, 0, 0, 0, 1, 3, 0, 1, 2, 5, 7, 9, 1, 1, 3, 6), dim = c(4, 4, 2))
    const sat = strata(
      [[1, 3, 11, 2], [2, 3, 17, 3], [0, 1, 8, 5], [0, 2, 4, 2]],
      [[1, 1, 2, 1], [0, 3, 5, 1], [0, 0, 7, 3], [0, 1, 9, 6]],
    );
    const r = computed(cochranMantelHaenszel(sat, ['<5000', '5000-15000', '15000-25000', '>25000'], ['VD', 'LS', 'MS', 'VS']));
    expect(r.form).toBe('IxJxK');
    expect(r.df).toBe(9);
    // mantelhaen.test(Satisfaction): M^2 = 10.200088757768636, df 9, p 0.33453118339782123
    // (Agresti reports 10.2001 with p = 0.33)
    close(r.statistic, 10.200088757768636);
    close(r.pValue, 0.33453118339782123);
  });

  // Our own shapes: topology class (isolated, source, sink, intermediate) by birth group and by
  // activity band, in three projects of the tool-lending scenario (invented counts).
  // mk <- function(...) { l <- list(...); a <- array(0, dim = c(nrow(l[[1]]), ncol(l[[1]]), length(l))); for (k in seq_along(l)) a[, , k] <- l[[k]]; a }
  const CLASSES = ['isolated', 'source', 'sink', 'intermediate'];
  it('4 x 2 x 3: class by birth group', () => {
    // mantelhaen.test(mk(matrix(c(3,5, 2,4, 6,1, 4,2), nrow = 4, byrow = TRUE), matrix(c(1,6, 3,3, 5,2, 2,1), nrow = 4, byrow = TRUE),
    //                    matrix(c(2,2, 1,5, 4,0, 3,3), nrow = 4, byrow = TRUE))): 12.606519853996872, df 3, p 0.0055696172875940395
    const r = computed(cochranMantelHaenszel(strata([[3, 5], [2, 4], [6, 1], [4, 2]], [[1, 6], [3, 3], [5, 2], [2, 1]], [[2, 2], [1, 5], [4, 0], [3, 3]]), CLASSES, ['initial', 'later']));
    expect(r.df).toBe(3);
    close(r.statistic, 12.606519853996872);
    close(r.pValue, 0.0055696172875940395);
  });

  it('4 x 3 x 3: class by activity band', () => {
    // mantelhaen.test(mk(matrix(c(4,3,1, 1,4,1, 2,3,2, 0,2,4), nrow = 4, byrow = TRUE), matrix(c(5,2,0, 2,3,1, 1,4,2, 0,1,2), nrow = 4, byrow = TRUE),
    //                    matrix(c(3,1,0, 0,4,2, 1,2,1, 0,3,3), nrow = 4, byrow = TRUE))): 23.649754879882902, df 6, p 0.00060566138463495351
    const r = computed(cochranMantelHaenszel(strata([[4, 3, 1], [1, 4, 1], [2, 3, 2], [0, 2, 4]], [[5, 2, 0], [2, 3, 1], [1, 4, 2], [0, 1, 2]], [[3, 1, 0], [0, 4, 2], [1, 2, 1], [0, 3, 3]]), CLASSES, ['unchanged', 'low', 'high']));
    expect(r.df).toBe(6);
    close(r.statistic, 23.649754879882902);
    close(r.pValue, 0.00060566138463495351);
  });

  it('leaves out a level empty in every stratum and a stratum with under two observations, and says so', () => {
    // the `high` column is empty, and a third project has one table only:
    // mantelhaen.test(mk(matrix(c(4,3, 1,4, 2,3, 0,2), nrow = 4, byrow = TRUE), matrix(c(5,2, 2,3, 1,4, 0,1), nrow = 4, byrow = TRUE))):
    // 5.8512960475453752, df 3, p 0.1190734375310291
    const r = computed(
      cochranMantelHaenszel(
        [
          { label: 'north', counts: [[4, 3, 0], [1, 4, 0], [2, 3, 0], [0, 2, 0]] },
          { label: 'south', counts: [[5, 2, 0], [2, 3, 0], [1, 4, 0], [0, 1, 0]] },
          { label: 'tiny', counts: [[0, 0, 0], [1, 0, 0], [0, 0, 0], [0, 0, 0]] },
        ],
        CLASSES,
        ['unchanged', 'low', 'high'],
      ),
    );
    expect(r.columns).toEqual(['unchanged', 'low']);
    expect(r.droppedColumns).toEqual(['high']);
    expect(r.strata).toEqual([
      { label: 'north', n: 19, used: true },
      { label: 'south', n: 18, used: true },
      { label: 'tiny', n: 1, used: false, reason: 'a single observation' },
    ]);
    close(r.statistic, 5.8512960475453752);
    close(r.pValue, 0.1190734375310291);
  });

  it('2 x 2 x 3 after dropping two classes: the Mantel-Haenszel form with its odds ratio', () => {
    // two <- mk(matrix(c(3,5, 6,1), nrow = 2, byrow = TRUE), matrix(c(1,6, 5,2), nrow = 2, byrow = TRUE), matrix(c(2,2, 4,0), nrow = 2, byrow = TRUE))
    // mantelhaen.test(two, correct = FALSE): 9.9669138619509408, p 0.0015937841690536443; estimate 0.06666666666666668
    // mantelhaen.test(two): 7.9986214109146214, p 0.0046812977723267235
    const r = computed(cochranMantelHaenszel(strata([[3, 5], [0, 0], [6, 1], [0, 0]], [[1, 6], [0, 0], [5, 2], [0, 0]], [[2, 2], [0, 0], [4, 0], [0, 0]]), CLASSES, ['initial', 'later']));
    expect(r.form).toBe('2x2xK');
    expect(r.rows).toEqual(['isolated', 'sink']);
    expect(r.droppedRows).toEqual(['source', 'intermediate']);
    close(r.statistic, 9.9669138619509408);
    close(r.pValue, 0.0015937841690536443);
    close(r.continuityCorrected!.statistic, 7.9986214109146214);
    close(r.continuityCorrected!.pValue, 0.0046812977723267235);
    close(r.commonOddsRatio!, 0.06666666666666668);
  });

  it('with one stratum, M^2 = (n - 1) / n times Pearson\'s chi-square (a known identity, from memory; chi-square by the project\'s own test, itself checked against R)', () => {
    const t = [[3, 5], [2, 4], [6, 1], [4, 2]];
    const r = computed(cochranMantelHaenszel(strata(t), CLASSES, ['initial', 'later']));
    const x2 = chiSquareTest(t);
    if (!x2.computable) throw new Error('chi-square not computable');
    // R: chisq.test(matrix(c(3,5, 2,4, 6,1, 4,2), nrow = 4, byrow = TRUE), correct = FALSE)$statistic = 5.1348214285714295
    close(x2.statistic, 5.1348214285714295);
    // n = 27
    close(r.statistic, (26 / 27) * x2.statistic);
  });

  it('is not computable, with the reason, when a variable has a single level or no stratum has data', () => {
    const one = cochranMantelHaenszel(strata([[3, 0], [2, 0]], [[1, 0], [4, 0]]), ['a', 'b'], ['x', 'y']);
    expect(one).toMatchObject({ computable: false, reason: 'only one column (x) has observations; the test needs at least two' });
    const none = cochranMantelHaenszel(strata([[1, 0], [0, 0]], [[0, 0], [0, 0]]), ['a', 'b'], ['x', 'y']);
    expect(none).toMatchObject({ computable: false, reason: 'no stratum has two or more observations' });
    // every stratum has only one row filled: the rows never vary within a stratum
    const singular = cochranMantelHaenszel(strata([[3, 2], [0, 0]], [[0, 0], [1, 4]]), ['a', 'b'], ['x', 'y']);
    expect(singular.computable).toBe(false);
    if (!singular.computable) expect(singular.reason).toContain('singular');
  });
});
