import { logFactorials } from './distributions.js';
import { SeededRandom } from './random.js';
import { Accumulator, notComputable, type NotComputable } from './result.js';

/** Relative tolerance of "no more probable than the observed table" (as R's fisher.test). */
export const RELATIVE_TOLERANCE = 1e-7;

export type ExactTestResult =
  | NotComputable
  | {
      computable: true;
      /** `exact`: every table with the observed margins was enumerated; `monte-carlo`: tables were drawn at random. */
      method: 'exact' | 'monte-carlo';
      alternative: 'two-sided' | 'greater' | 'less';
      pValue: number;
      /** Exact: the number of tables enumerated. */
      tables?: number;
      /** Monte Carlo: draws, the seed, and how many draws were no more probable than the observed table. */
      draws?: number;
      seed?: number;
      hits?: number;
      /** The enumeration limit in force. */
      limit: number;
    };

export interface ExactTestOptions {
  limit: number;
  draws: number;
  seed: number;
  /** One-sided alternatives are for 2x2 tables only: `greater` is P(X >= x) of the top-left cell. */
  alternative?: 'two-sided' | 'greater' | 'less';
}

class LimitReached extends Error {}

/**
 * Fisher's exact test, and its extension to r x c tables by Freeman and Halton. Under
 * independence with all margins fixed, a table has the hypergeometric probability
 * P = (prod r_i! prod c_j!) / (n! prod x_ij!). The two-sided p-value sums the probabilities of
 * every table with the observed margins that is no more probable than the observed one
 * (relative tolerance 1e-7). When there are more than `limit` such tables, `draws` tables are
 * drawn at random with the observed margins instead (each row's cells drawn from what is left of
 * the columns, with a seeded 32-bit Mersenne Twister) and p = (1 + hits) / (draws + 1).
 */
export function fisherExactTest(counts: readonly (readonly number[])[], opts: ExactTestOptions): ExactTestResult {
  const alternative = opts.alternative ?? 'two-sided';
  const r = counts.length;
  const c = r > 0 ? counts[0]!.length : 0;
  if (r < 2 || c < 2) return notComputable('the test needs at least two rows and two columns with observations');
  const rows = counts.map((row) => row.reduce((a, b) => a + b, 0));
  const cols = counts[0]!.map((_, j) => counts.reduce((a, row) => a + row[j]!, 0));
  if (rows.some((x) => x === 0) || cols.some((x) => x === 0)) return notComputable('a row or column has no observations (drop it first)');
  if (alternative !== 'two-sided' && (r !== 2 || c !== 2)) return notComputable('one-sided alternatives exist for 2x2 tables only');
  const n = rows.reduce((a, b) => a + b, 0);
  const lf = logFactorials(n);
  let logK = -lf[n]!;
  for (const x of rows) logK += lf[x]!;
  for (const x of cols) logK += lf[x]!;
  let obs = 0;
  for (const row of counts) for (const x of row) obs += lf[x]!;
  // tables are compared by S = sum ln x_ij!: P = exp(logK - S); "no more probable" is S >= S_obs - ln(1 + tol)
  const threshold = obs - Math.log1p(RELATIVE_TOLERANCE);

  if (alternative !== 'two-sided') {
    const a = counts[0]![0]!;
    const lo = Math.max(0, rows[0]! - cols[1]!);
    const hi = Math.min(rows[0]!, cols[0]!);
    const acc = new Accumulator();
    for (let x = lo; x <= hi; x++) {
      if (alternative === 'greater' ? x < a : x > a) continue;
      const s = lf[x]! + lf[rows[0]! - x]! + lf[cols[0]! - x]! + lf[rows[1]! - cols[0]! + x]!;
      acc.add(Math.exp(logK - s));
    }
    return { computable: true, method: 'exact', alternative, pValue: Math.min(1, acc.value), tables: hi - lo + 1, limit: opts.limit };
  }

  const exact = enumerate(rows, cols, lf, logK, threshold, opts.limit);
  if (exact) return { computable: true, method: 'exact', alternative, pValue: Math.min(1, exact.p), tables: exact.tables, limit: opts.limit };

  // Monte Carlo: each row in turn takes its margin from what is left of the columns, drawn without
  // replacement (a multivariate hypergeometric draw, made column by column); the same distribution
  // as shuffling the n observations and dealing them to the rows, at a cost that does not grow with n
  const rng = new SeededRandom(opts.seed);
  const left = new Int32Array(c);
  let hits = 0;
  for (let d = 0; d < opts.draws; d++) {
    left.set(cols);
    let s = 0;
    let total = n;
    for (let i = 0; i < r - 1; i++) {
      let need = rows[i]!;
      let pool = total;
      for (let j = 0; j < c - 1 && need > 0; j++) {
        const k = left[j]!;
        const x = hypergeometric(rng, lf, pool, k, need);
        s += lf[x]!;
        left[j] = k - x;
        need -= x;
        pool -= k;
      }
      // the rest of the row goes to the last column (and columns passed over once the row was full take 0)
      s += lf[need]!;
      left[c - 1]! -= need;
      total -= rows[i]!;
    }
    for (let j = 0; j < c; j++) s += lf[left[j]!]!;
    if (s >= threshold) hits++;
  }
  return {
    computable: true, method: 'monte-carlo', alternative, pValue: (1 + hits) / (opts.draws + 1),
    draws: opts.draws, seed: opts.seed, hits, limit: opts.limit,
  };
}

/**
 * One draw of the number of successes in a sample of `m` from a population of `total` with `k`
 * successes, by inversion: the probabilities are summed from the mode outwards, the larger
 * neighbour first (any fixed order of the support gives the same distribution), so a draw costs
 * in proportion to the spread of the distribution, not to its range.
 */
export function hypergeometric(rng: SeededRandom, lf: Float64Array, total: number, k: number, m: number): number {
  const lo = Math.max(0, m - (total - k));
  const hi = Math.min(k, m);
  if (lo === hi) return lo;
  const f = total - k;
  let mode = Math.floor(((m + 1) * (k + 1)) / (total + 2));
  if (mode < lo) mode = lo;
  if (mode > hi) mode = hi;
  const pm = Math.exp(lf[k]! - lf[mode]! - lf[k - mode]! + lf[f]! - lf[m - mode]! - lf[f - m + mode]! - lf[total]! + lf[m]! + lf[total - m]!);
  let u = rng.uniform() - pm;
  if (u < 0) return mode;
  let a = mode;
  let b = mode;
  let pa = pm;
  let pb = pm;
  for (;;) {
    const down = a > lo ? (pa * a * (f - m + a)) / ((k - a + 1) * (m - a + 1)) : -1;
    const up = b < hi ? (pb * (k - b) * (m - b)) / ((b + 1) * (f - m + b + 1)) : -1;
    if (down < 0 && up < 0) return mode; // rounding left a sliver of probability unassigned
    if (up >= down) {
      b++;
      pb = up;
      if ((u -= pb) < 0) return b;
    } else {
      a--;
      pa = down;
      if ((u -= pa) < 0) return a;
    }
  }
}

/**
 * Every table with the given margins, column by column (the last column follows from the row
 * margins left); null as soon as there are more than `limit`.
 */
function enumerate(rows: number[], cols: number[], lf: Float64Array, logK: number, threshold: number, limit: number): { p: number; tables: number } | null {
  const r = rows.length;
  const c = cols.length;
  const left = Int32Array.from(rows);
  const acc = new Accumulator();
  let tables = 0;
  const leaf = (s: number): void => {
    for (let i = 0; i < r; i++) s += lf[left[i]!]!;
    if (++tables > limit) throw new LimitReached();
    if (s >= threshold) acc.add(Math.exp(logK - s));
  };
  const fill = (j: number, i: number, remaining: number, s: number): void => {
    if (i === r - 1) {
      if (remaining > left[i]!) return;
      left[i]! -= remaining;
      if (j + 1 === c - 1) leaf(s + lf[remaining]!);
      else fill(j + 1, 0, cols[j + 1]!, s + lf[remaining]!);
      left[i]! += remaining;
      return;
    }
    let rest = 0;
    for (let q = i + 1; q < r; q++) rest += left[q]!;
    const lo = Math.max(0, remaining - rest);
    const hi = Math.min(remaining, left[i]!);
    for (let x = lo; x <= hi; x++) {
      left[i]! -= x;
      fill(j, i + 1, remaining - x, s + lf[x]!);
      left[i]! += x;
    }
  };
  try {
    if (c === 1) leaf(0);
    else fill(0, 0, cols[0]!, 0);
  } catch (e) {
    if (e instanceof LimitReached) return null;
    throw e;
  }
  return { p: acc.value, tables };
}
