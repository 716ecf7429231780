import { tTwoSidedTail } from './distributions.js';
import { averageRanks, tieSizes } from './ranks.js';
import { notComputable, type NotComputable } from './result.js';

/** Up to this many pairs without ties, the p-value is exact (every permutation of the ranks). */
export const SPEARMAN_EXACT_MAX_N = 9;

export type SpearmanResult =
  | NotComputable
  | {
      computable: true;
      n: number;
      /** Spearman's rho: Pearson's correlation of the (average) ranks. */
      rho: number;
      /** S = (n^3 - n)(1 - rho) / 6 (the sum of squared rank differences when there are no ties). */
      S: number;
      pValue: number;
      /** `exact`: all n! permutations (n <= 9, no ties); `t-approximation`: t = rho sqrt((n-2)/(1-rho^2)) on n-2 df. */
      method: 'exact' | 't-approximation';
      ties: boolean;
    };

function pearson(x: readonly number[], y: readonly number[]): number {
  const n = x.length;
  const mx = x.reduce((a, b) => a + b, 0) / n;
  const my = y.reduce((a, b) => a + b, 0) / n;
  let sxy = 0;
  let sxx = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    const dx = x[i]! - mx;
    const dy = y[i]! - my;
    sxy += dx * dy;
    sxx += dx * dx;
    syy += dy * dy;
  }
  return sxy / Math.sqrt(sxx * syy);
}

/** Two-sided exact p of S over all permutations of 1..n (as R's cor.test for small n without ties). */
function exactP(n: number, q: number): number {
  const perm = Array.from({ length: n }, (_, i) => i + 1);
  let le = 0;
  let ge = 0;
  let total = 0;
  const rq = Math.round(q);
  const visit = (): void => {
    let s = 0;
    for (let i = 0; i < n; i++) s += (i + 1 - perm[i]!) ** 2;
    total++;
    if (s <= rq) le++;
    if (s >= rq) ge++;
  };
  // Heap's algorithm
  const cnt = new Array<number>(n).fill(0);
  visit();
  let i = 0;
  while (i < n) {
    if (cnt[i]! < i) {
      const k = i % 2 === 0 ? 0 : cnt[i]!;
      [perm[k], perm[i]] = [perm[i]!, perm[k]!];
      visit();
      cnt[i]!++;
      i = 0;
    } else {
      cnt[i] = 0;
      i++;
    }
  }
  const p = q > (n ** 3 - n) / 6 ? ge / total : le / total;
  return Math.min(1, 2 * p);
}

/**
 * Spearman's rank correlation of x and y, two-sided. Ranks are average ranks; rho is Pearson's
 * correlation of the ranks. The p-value is exact for up to 9 pairs without ties, and otherwise
 * from Student's t with n - 2 degrees of freedom (R's `cor.test(x, y, method = "spearman")`
 * does the same with ties; without ties above 9 pairs R uses an Edgeworth series unless
 * `exact = FALSE`).
 */
export function spearman(x: readonly number[], y: readonly number[]): SpearmanResult {
  const n = x.length;
  if (n !== y.length) throw new Error('spearman: x and y differ in length');
  if (n < 3) return notComputable(`${n} pairs; the test needs at least 3`);
  const rx = averageRanks(x);
  const ry = averageRanks(y);
  if (x.every((v) => v === x[0])) return notComputable('the first variable has the same value for every table');
  if (y.every((v) => v === y[0])) return notComputable('the second variable has the same value for every table');
  const rho = Math.max(-1, Math.min(1, pearson(rx, ry)));
  const S = ((n ** 3 - n) * (1 - rho)) / 6;
  const ties = tieSizes(x).length > 0 || tieSizes(y).length > 0;
  if (!ties && n <= SPEARMAN_EXACT_MAX_N) {
    return { computable: true, n, rho, S, pValue: exactP(n, S), method: 'exact', ties };
  }
  const r2 = 1 - S / ((n ** 3 - n) / 6);
  const t = r2 / Math.sqrt((1 - r2 * r2) / (n - 2));
  return { computable: true, n, rho, S, pValue: Math.min(1, tTwoSidedTail(t, n - 2)), method: 't-approximation', ties };
}
