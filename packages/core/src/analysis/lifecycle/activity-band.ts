import type { BandBasis } from '../options.js';

export type ActivityBand = 'unchanged' | 'low' | 'high';
export const ACTIVITY_BANDS: readonly ActivityBand[] = ['unchanged', 'low', 'high'];

/**
 * The activity band of a table: `unchanged` (no counted update), `low` (above 0 and at most T),
 * `high` (more than T). The value compared with T is the total of counted updates, or with
 * `--band-by` their rate per year or per version of life; totals grow with age, rates do not.
 * Null when the rate cannot be computed (per year, under 30 days of life).
 */
export function activityBandOf(
  counted: number,
  rates: { perVersion: number; perYear: number | null },
  basis: BandBasis,
  highAbove: number,
): { band: ActivityBand | null; value: number | null } {
  const value = basis === 'total' ? counted : basis === 'per-year' ? rates.perYear : rates.perVersion;
  if (counted === 0) return { band: 'unchanged', value: value ?? 0 };
  if (value === null) return { band: null, value: null };
  return { band: value > highAbove ? 'high' : 'low', value };
}
