import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import { chiSquareUpperTail } from '../analysis/stats/distributions.js';
import { notComputable, type NotComputable } from '../analysis/stats/result.js';

/** One stratum (one project) of a stratified test: its label and its I x J table of counts. */
export interface Stratum {
  label: string;
  counts: readonly (readonly number[])[];
}

/** The test across strata, or why it cannot be computed. */
export type StratifiedResult =
  | (NotComputable & { strata: StratumUse[] })
  | {
      computable: true;
      /** `2x2xK`: the Mantel-Haenszel test; `IxJxK`: its generalised form (the general-association statistic). */
      form: '2x2xK' | 'IxJxK';
      /** M^2, without continuity correction (as the other chi-square tests of the project). */
      statistic: number;
      df: number;
      pValue: number;
      /** 2x2xK only: with the continuity correction (|sum(a - E a)| - 1/2)^2 / sum Var a (applied when |sum(a - E a)| >= 1/2). */
      continuityCorrected?: { statistic: number; pValue: number };
      /** 2x2xK only: the Mantel-Haenszel estimate of the common odds ratio, null when its denominator is 0. */
      commonOddsRatio?: number | null;
      /** Row and column levels the test used (levels with no count in any used stratum are left out). */
      rows: string[];
      columns: string[];
      droppedRows: string[];
      droppedColumns: string[];
      strata: StratumUse[];
    };

/** Whether a stratum took part, with its number of observations. */
export interface StratumUse {
  label: string;
  n: number;
  used: boolean;
  reason?: string;
}

const sum = (xs: readonly number[]): number => xs.reduce((a, b) => a + b, 0);

/** Smallest singular value, relative to the largest, below which the covariance matrix is taken as singular. */
const SINGULAR_TOLERANCE = 1e-10;

/**
 * The Cochran-Mantel-Haenszel test of association between the rows and the columns of a table,
 * stratified by a third variable (here: the project), so that differences between projects in
 * how many tables fall in each row or column do not show up as an association.
 *
 * For a 2 x 2 x K table it is the Mantel-Haenszel test: M^2 = (sum_k (a_k - E a_k))^2 /
 * sum_k Var a_k with E a_k = r1 c1 / n and Var a_k = r1 r2 c1 c2 / (n^2 (n - 1)), one degree of
 * freedom. For I x J x K tables it is the generalised statistic for general association: with
 * n_k the vector of the first (I-1)(J-1) cells of stratum k, m_k its expectation under
 * conditional independence and V_k its covariance (hypergeometric),
 * M^2 = (sum (n_k - m_k))' (sum V_k)^-1 (sum (n_k - m_k)), with (I-1)(J-1) degrees of freedom.
 * Definitions after Agresti, Categorical Data Analysis (2nd ed., 2002), sections 6.3 and 7.5
 * (from memory); values checked against R's `mantelhaen.test` (see the tests).
 *
 * Strata with fewer than 2 observations carry no information and are left out, as are row
 * and column levels with no observation in the strata used; fewer than two levels left, or a
 * singular covariance, make the test not computable, with the reason.
 *
 * ```ts
 * cochranMantelHaenszel([{ label: 'north', counts: [[3, 5], [6, 1]] }, { label: 'south', counts: [[1, 6], [5, 2]] }], ['a', 'b'], ['x', 'y']);
 * ```
 */
export function cochranMantelHaenszel(strata: readonly Stratum[], rows: readonly string[], columns: readonly string[]): StratifiedResult {
  const uses: StratumUse[] = strata.map((s) => {
    const n = sum(s.counts.flat());
    return n < 2 ? { label: s.label, n, used: false, reason: n === 0 ? 'no observations' : 'a single observation' } : { label: s.label, n, used: true };
  });
  const used = strata.filter((_, k) => uses[k]!.used);
  if (used.length === 0) return { ...notComputable('no stratum has two or more observations'), strata: uses };
  const keepR = rows.map((_, i) => used.some((s) => sum(s.counts[i]!) > 0));
  const keepC = columns.map((_, j) => used.some((s) => s.counts.some((r) => r[j]! > 0)));
  const R = rows.filter((_, i) => keepR[i]);
  const C = columns.filter((_, j) => keepC[j]);
  const droppedRows = rows.filter((_, i) => !keepR[i]);
  const droppedColumns = columns.filter((_, j) => !keepC[j]);
  if (R.length < 2) return { ...notComputable(`only ${R.length === 1 ? `one row (${R[0]})` : 'no row'} has observations; the test needs at least two`), strata: uses };
  if (C.length < 2) return { ...notComputable(`only ${C.length === 1 ? `one column (${C[0]})` : 'no column'} has observations; the test needs at least two`), strata: uses };
  const tables = used.map((s) => s.counts.filter((_, i) => keepR[i]).map((r) => r.filter((_, j) => keepC[j])));
  const I = R.length;
  const J = C.length;
  const df = (I - 1) * (J - 1);
  const at = (i: number, j: number): number => j * (I - 1) + i;
  const dev = new Array<number>(df).fill(0);
  const V = Matrix.zeros(df, df);
  for (const f of tables) {
    const n = sum(f.flat());
    const rt = f.map((r) => sum(r));
    const ct = C.map((_, j) => sum(f.map((r) => r[j]!)));
    for (let j = 0; j < J - 1; j++) {
      for (let i = 0; i < I - 1; i++) {
        dev[at(i, j)]! += f[i]![j]! - (rt[i]! * ct[j]!) / n;
        for (let j2 = 0; j2 < J - 1; j2++) {
          for (let i2 = 0; i2 < I - 1; i2++) {
            const a = rt[i]! * ((i === i2 ? n : 0) - rt[i2]!);
            const b = ct[j]! * ((j === j2 ? n : 0) - ct[j2]!);
            V.set(at(i, j), at(i2, j2), V.get(at(i, j), at(i2, j2)) + (a * b) / (n * n * (n - 1)));
          }
        }
      }
    }
  }
  const svd = new SingularValueDecomposition(V, { autoTranspose: true });
  const s = svd.diagonal;
  if (!(s[0]! > 0) || s[s.length - 1]! <= SINGULAR_TOLERANCE * s[0]!) {
    return { ...notComputable('the covariance of the counts across strata is singular (some level varies in no stratum)'), strata: uses };
  }
  const x = svd.solve(Matrix.columnVector(dev)).to1DArray();
  const statistic = dev.reduce((acc, d, k) => acc + d * x[k]!, 0);
  const base = { computable: true as const, statistic, df, pValue: chiSquareUpperTail(statistic, df), rows: R, columns: C, droppedRows, droppedColumns, strata: uses };
  if (I === 2 && J === 2) {
    const delta = dev[0]!;
    const variance = V.get(0, 0);
    const yates = Math.abs(delta) >= 0.5 ? 0.5 : 0;
    const corrected = (Math.abs(delta) - yates) ** 2 / variance;
    let diag = 0;
    let off = 0;
    for (const f of tables) {
      const n = sum(f.flat());
      diag += (f[0]![0]! * f[1]![1]!) / n;
      off += (f[0]![1]! * f[1]![0]!) / n;
    }
    return {
      ...base,
      form: '2x2xK',
      statistic: delta ** 2 / variance,
      pValue: chiSquareUpperTail(delta ** 2 / variance, 1),
      continuityCorrected: { statistic: corrected, pValue: chiSquareUpperTail(corrected, 1) },
      commonOddsRatio: off === 0 ? null : diag / off,
    };
  }
  return { ...base, form: 'IxJxK' };
}
