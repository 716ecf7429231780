import { chiSquareUpperTail } from './distributions.js';
import { accurateSum, notComputable, type ChiSquareReferred, type NotComputable } from './result.js';

/** `statistic` is Pearson's X^2, without continuity correction. */
export type ChiSquareResult =
  | NotComputable
  | (ChiSquareReferred & {
      /** Cells whose expected count is below 5, and all cells: the common rule of thumb is that the chi-square approximation is doubtful when more than a fifth are. */
      smallExpected: number;
      cells: number;
    });

/**
 * Pearson's chi-square test of independence on a table of counts (no all-zero rows or columns):
 * X^2 = sum (O - E)^2 / E with E = row total x column total / n, (r-1)(c-1) degrees of freedom,
 * p from the upper tail of the chi-square distribution. No continuity correction, also for 2x2
 * tables (as R's `chisq.test(x, correct = FALSE)`).
 */
export function chiSquareTest(counts: readonly (readonly number[])[]): ChiSquareResult {
  const r = counts.length;
  const c = r > 0 ? counts[0]!.length : 0;
  const n = accurateSum(counts.flat());
  if (n === 0) return notComputable('no observations');
  if (r < 2) return notComputable(`only one row has observations; the test needs at least two`);
  if (c < 2) return notComputable(`only one column has observations; the test needs at least two`);
  const rowT = counts.map((row) => accurateSum(row));
  const colT = counts[0]!.map((_, j) => accurateSum(counts.map((row) => row[j]!)));
  if (rowT.some((x) => x === 0) || colT.some((x) => x === 0)) return notComputable('a row or column has no observations (drop it first)');
  const terms: number[] = [];
  let small = 0;
  for (let i = 0; i < r; i++) {
    for (let j = 0; j < c; j++) {
      const e = (rowT[i]! * colT[j]!) / n;
      if (e < 5) small++;
      const d = counts[i]![j]! - e;
      terms.push((d * d) / e);
    }
  }
  const statistic = accurateSum(terms);
  const df = (r - 1) * (c - 1);
  return { computable: true, statistic, df, pValue: chiSquareUpperTail(statistic, df), smallExpected: small, cells: r * c };
}
