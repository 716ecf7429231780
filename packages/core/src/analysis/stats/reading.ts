import type { ChiSquareResult } from './chi-square.js';
import type { CramersVResult } from './cramers-v.js';
import type { ExactTestResult } from './fisher-exact.js';
import type { KruskalWallisResult } from './kruskal-wallis.js';
import type { SpearmanResult } from './spearman.js';

/** The caution printed with every set of results. */
export const CAUTION =
  'These tests show association only: a link between a table\'s place in the foreign-key graph and how much it changes is not evidence that one causes the other.';

/** A p-value in text: four decimals, or three significant digits in exponent form below 0.001. */
export function formatP(p: number): string {
  if (p === 0) return '0';
  return p >= 0.001 ? p.toFixed(4) : p.toExponential(2);
}

const f3 = (x: number): string => x.toFixed(3);
const int = (n: number): string => n.toLocaleString('en-US');

const verdict = (p: number, alpha: number, yes: string, no: string): string => (p < alpha ? `${yes} at the ${alpha} level` : `${no} at the ${alpha} level`);

export function chiSquareReading(subject: string, r: ChiSquareResult, alpha: number): string {
  if (!r.computable) return `${subject}: the chi-square test is not computable (${r.reason}).`;
  const small = r.smallExpected > 0 ? ` ${r.smallExpected} of ${r.cells} expected counts are below 5, so the exact test is the better guide.` : '';
  return `${subject}: chi-square = ${f3(r.statistic)} with ${r.df} degree${r.df === 1 ? '' : 's'} of freedom, p = ${formatP(r.pValue)}: ${verdict(r.pValue, alpha, 'an association', 'no association shown')}.${small}`;
}

export function exactReading(subject: string, r: ExactTestResult, alpha: number): string {
  if (!r.computable) return `${subject}: the exact test is not computable (${r.reason}).`;
  const how =
    r.method === 'exact'
      ? `all ${int(r.tables!)} tables with the observed margins enumerated`
      : `Monte Carlo with ${int(r.draws!)} random tables, seed ${r.seed}, as there are more than ${int(r.limit)} tables`;
  return `${subject}: exact test (Fisher-Freeman-Halton; ${how}) p = ${formatP(r.pValue)}: ${verdict(r.pValue, alpha, 'an association', 'no association shown')}.`;
}

export function cramersVReading(subject: string, r: CramersVResult): string {
  if (!r.computable) return `${subject}: Cramer's V is not computable (${r.reason}).`;
  const bc = r.biasCorrected.computable ? `bias-corrected ${f3(r.biasCorrected.value)}` : `bias correction not computable: ${r.biasCorrected.reason}`;
  return `${subject}: Cramer's V = ${f3(r.value)} (${bc}), on a scale from 0 (no association) to 1 (complete association).`;
}

export function spearmanReading(r: SpearmanResult, alpha: number): string {
  const subject = 'Distinct neighbours in the history graph and counted updates';
  if (!r.computable) return `${subject}: Spearman's correlation is not computable (${r.reason}).`;
  const dir = r.rho > 0 ? 'a positive monotonic association' : 'a negative monotonic association';
  return `${subject}: Spearman's rho = ${f3(r.rho)} over ${r.n} tables, p = ${formatP(r.pValue)} (${r.method === 'exact' ? 'exact' : 't approximation'}): ${verdict(r.pValue, alpha, dir, 'no monotonic association shown')}.`;
}

export function kruskalReading(r: KruskalWallisResult, alpha: number): string {
  const subject = 'Counted updates across topology classes';
  if (!r.computable) return `${subject}: the Kruskal-Wallis test is not computable (${r.reason}).`;
  return `${subject}: Kruskal-Wallis H = ${f3(r.statistic)} with ${r.df} degree${r.df === 1 ? '' : 's'} of freedom over ${r.groups.length} classes, p = ${formatP(r.pValue)}: ${verdict(r.pValue, alpha, 'the classes differ', 'no difference shown')}.`;
}
