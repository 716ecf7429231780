import { createRequire } from 'node:module';

// @stdlib's special functions are loaded on first use, not when the CLI starts (their many
// small modules take a few hundred milliseconds to load).
const require = createRequire(import.meta.url);
type Betainc = typeof import('@stdlib/math-base-special-betainc');
type Gammainc = typeof import('@stdlib/math-base-special-gammainc');
type Gammaln = typeof import('@stdlib/math-base-special-gammaln');
let fns: { betainc: Betainc; gammainc: Gammainc; gammaln: Gammaln } | null = null;
function special(): { betainc: Betainc; gammainc: Gammainc; gammaln: Gammaln } {
  fns ??= {
    betainc: require('@stdlib/math-base-special-betainc') as Betainc,
    gammainc: require('@stdlib/math-base-special-gammainc') as Gammainc,
    gammaln: require('@stdlib/math-base-special-gammaln') as Gammaln,
  };
  return fns;
}

/**
 * Upper tail of the chi-square distribution, P(X >= x) for `df` degrees of freedom: the
 * regularized upper incomplete gamma function Q(df/2, x/2), computed directly (not as 1 - CDF),
 * so that small p-values keep their relative precision.
 */
export function chiSquareUpperTail(x: number, df: number): number {
  if (x <= 0) return 1;
  return special().gammainc(x / 2, df / 2, true, true);
}

/**
 * Two-sided tail of Student's t distribution, P(|T| >= |t|) for `df` degrees of freedom:
 * the regularized incomplete beta function I_{df/(df+t^2)}(df/2, 1/2).
 */
export function tTwoSidedTail(t: number, df: number): number {
  if (!Number.isFinite(t)) return 0;
  return special().betainc(df / (df + t * t), df / 2, 0.5, true, false);
}

/** ln(k!) for k = 0..n, as a table. */
export function logFactorials(n: number): Float64Array {
  const out = new Float64Array(n + 1);
  const { gammaln } = special();
  for (let k = 2; k <= n; k++) out[k] = gammaln(k + 1);
  return out;
}
