import { chiSquareUpperTail } from './distributions.js';
import { averageRanks, tieSizes } from './ranks.js';
import { notComputable, type ChiSquareReferred, type NotComputable } from './result.js';

/** `statistic` is H with the tie correction. */
export type KruskalWallisResult =
  | NotComputable
  | (ChiSquareReferred & {
      n: number;
      /** Groups with observations: their size and mean rank. */
      groups: Array<{ label: string; n: number; meanRank: number }>;
      /** Groups without observations, left out. */
      droppedGroups: string[];
    });

/**
 * The Kruskal-Wallis rank-sum test: H = (12 / (n (n+1)) sum R_g^2 / n_g - 3 (n+1)) divided by the
 * tie correction 1 - sum (t^3 - t) / (n^3 - n), referred to the chi-square distribution with
 * k - 1 degrees of freedom (as R's `kruskal.test`). Empty groups are left out and reported.
 */
export function kruskalWallis(groups: ReadonlyArray<{ label: string; values: readonly number[] }>): KruskalWallisResult {
  const used = groups.filter((g) => g.values.length > 0);
  const droppedGroups = groups.filter((g) => g.values.length === 0).map((g) => g.label);
  if (used.length < 2) return notComputable(`${used.length === 0 ? 'no group has' : 'only one group has'} observations; the test needs at least two`);
  const all = used.flatMap((g) => g.values);
  const n = all.length;
  const ranks = averageRanks(all);
  const correction = 1 - tieSizes(all).reduce((a, t) => a + t ** 3 - t, 0) / (n ** 3 - n);
  if (!(correction > 0)) return notComputable('every observation has the same value');
  let k = 0;
  let sum = 0;
  const out: Array<{ label: string; n: number; meanRank: number }> = [];
  for (const g of used) {
    let rs = 0;
    for (let q = 0; q < g.values.length; q++) rs += ranks[k++]!;
    sum += (rs * rs) / g.values.length;
    out.push({ label: g.label, n: g.values.length, meanRank: rs / g.values.length });
  }
  const statistic = ((12 * sum) / (n * (n + 1)) - 3 * (n + 1)) / correction;
  const df = used.length - 1;
  return { computable: true, statistic, df, pValue: chiSquareUpperTail(statistic, df), n, groups: out, droppedGroups };
}
