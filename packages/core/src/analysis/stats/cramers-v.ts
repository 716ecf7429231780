import { notComputable, type NotComputable } from './result.js';

export type CramersVResult =
  | NotComputable
  | {
      computable: true;
      /** sqrt(X^2 / (n (min(r, c) - 1))). */
      value: number;
      /** Bergsma's bias-corrected V, or why it cannot be computed. */
      biasCorrected: { computable: true; value: number } | NotComputable;
    };

/**
 * Cramer's V of an r x c table from its chi-square statistic: V = sqrt(X^2 / (n (k - 1))) with
 * k = min(r, c); and the bias-corrected value (Bergsma 2013, "A bias-correction for Cramer's V
 * and Tschuprow's T", Journal of the Korean Statistical Society 42: 323-328):
 * phi2 = max(0, X^2/n - (r-1)(c-1)/(n-1)), r~ = r - (r-1)^2/(n-1), c~ = c - (c-1)^2/(n-1),
 * V~ = sqrt(phi2 / min(r~ - 1, c~ - 1)).
 */
export function cramersV(statistic: number, n: number, rows: number, columns: number): CramersVResult {
  const k = Math.min(rows, columns);
  if (n === 0) return notComputable('no observations');
  if (k < 2) return notComputable('the table needs at least two rows and two columns with observations');
  const value = Math.sqrt(statistic / (n * (k - 1)));
  let biasCorrected: { computable: true; value: number } | NotComputable;
  if (n < 2) biasCorrected = notComputable('the bias correction needs at least two observations');
  else {
    const phi2 = Math.max(0, statistic / n - ((rows - 1) * (columns - 1)) / (n - 1));
    const rt = rows - (rows - 1) ** 2 / (n - 1);
    const ct = columns - (columns - 1) ** 2 / (n - 1);
    const den = Math.min(rt - 1, ct - 1);
    biasCorrected = den > 0 ? { computable: true, value: Math.sqrt(phi2 / den) } : notComputable('too few observations for the bias correction');
  }
  return { computable: true, value, biasCorrected };
}
