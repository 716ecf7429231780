import { CHANGE_KINDS, type ChangeKind } from '../changes/kinds.js';
import { UsageError, EXIT } from '../util/errors.js';

/**
 * The change kinds that count as a table's update activity unless `--count` says otherwise.
 * This set is a convention remembered from earlier schema-evolution studies, not a standard:
 * it keeps the changes that alter a table's structure (its columns and its key) and leaves
 * out renames, constraint and default tweaks. Choose your own with `--count`.
 */
export const DEFAULT_COUNTED_KINDS: readonly ChangeKind[] = Object.freeze([
  'column-added',
  'column-removed',
  'column-type-changed',
  'primary-key-changed',
] as const);

/**
 * The activity threshold T: a table with more than T counted updates is `high`, one with 1 to T
 * is `low`. The value 5 is remembered from earlier schema-evolution studies, not a standard;
 * set your own with `--high-above`.
 */
export const DEFAULT_HIGH_ABOVE = 5;

/** What the activity band is computed from. */
export type BandBasis = 'total' | 'per-year' | 'per-version';
export const BAND_BASES: readonly BandBasis[] = ['total', 'per-year', 'per-version'];

/**
 * Which tables count as `initial`. `version0`: present in version 0 of the analysed window
 * (the default, design.md); `versions`: born in the first `count` versions; `date`: born at a
 * version whose committer date is at or before `date` (a bare YYYY-MM-DD means the whole day);
 * `commit`: born at or before the version of `commit` (a tag or revision the CLI resolved).
 */
export type InitialRule =
  | { kind: 'version0' }
  | { kind: 'versions'; count: number }
  | { kind: 'date'; date: string }
  | { kind: 'commit'; commit: string; label?: string; version: number };

/** Settings of the exact test (Fisher-Freeman-Halton). */
export interface ExactTestOptions {
  /** Enumerate every table with the observed margins when there are at most this many; Monte Carlo above. */
  limit: number;
  /** Monte Carlo draws. */
  draws: number;
  /** Seed of the Monte Carlo generator (32-bit Mersenne Twister). */
  seed: number;
}

/** Default limit of the exact enumeration: one million tables (about 0.2 s on the 2-core machine of the benchmarks). */
export const DEFAULT_EXACT_LIMIT = 1_000_000;
export const DEFAULT_DRAWS = 100_000;
export const DEFAULT_SEED = 20240601;

export interface AnalysisOptions {
  /** Change kinds counted as updates. */
  count: ChangeKind[];
  /** The threshold T of the activity bands. */
  highAbove: number;
  bandBy: BandBasis;
  initial: InitialRule;
  /** Table name patterns (picomatch, matched against the id and the physical name) left out of the measures. */
  exclude: string[];
  /** Leave out join tables that an ORM creates implicitly (kind `implicit-join`). */
  excludeImplicitJoins: boolean;
  /** Leave out foreign keys that only the ORM enforces (enforcement `orm`). */
  excludeOrmForeignKeys: boolean;
  /** Significance level of the plain-words readings (0.05 is common practice). */
  alpha: number;
  exact: ExactTestOptions;
}

export function defaultAnalysisOptions(): AnalysisOptions {
  return {
    count: [...DEFAULT_COUNTED_KINDS],
    highAbove: DEFAULT_HIGH_ABOVE,
    bandBy: 'total',
    initial: { kind: 'version0' },
    exclude: [],
    excludeImplicitJoins: false,
    excludeOrmForeignKeys: false,
    alpha: 0.05,
    exact: { limit: DEFAULT_EXACT_LIMIT, draws: DEFAULT_DRAWS, seed: DEFAULT_SEED },
  };
}

/** Fill in defaults and check values; a bad value is a one-line usage error. */
export function resolveAnalysisOptions(partial: Partial<AnalysisOptions> = {}): AnalysisOptions {
  const d = defaultAnalysisOptions();
  const o: AnalysisOptions = {
    ...d,
    ...partial,
    exact: { ...d.exact, ...(partial.exact ?? {}) },
  };
  const known = new Set<string>(CHANGE_KINDS);
  for (const k of o.count) {
    if (!known.has(k)) throw new UsageError(`--count ${k}: not a change kind (kinds: ${CHANGE_KINDS.join(', ')})`, EXIT.usage);
  }
  o.count = CHANGE_KINDS.filter((k) => o.count.includes(k));
  if (!Number.isFinite(o.highAbove) || o.highAbove < 0) throw new UsageError(`--high-above ${o.highAbove}: must be a number >= 0`, EXIT.usage);
  if (!BAND_BASES.includes(o.bandBy)) throw new UsageError(`--band-by ${o.bandBy}: use ${BAND_BASES.join(', ')}`, EXIT.usage);
  if (!(o.alpha > 0 && o.alpha < 1)) throw new UsageError(`--alpha ${o.alpha}: must be between 0 and 1`, EXIT.usage);
  if (!Number.isInteger(o.exact.limit) || o.exact.limit < 0) throw new UsageError(`--exact-limit ${o.exact.limit}: must be a whole number >= 0`, EXIT.usage);
  if (!Number.isInteger(o.exact.draws) || o.exact.draws < 1) throw new UsageError(`--draws ${o.exact.draws}: must be a whole number >= 1`, EXIT.usage);
  if (!Number.isInteger(o.exact.seed) || o.exact.seed < 0 || o.exact.seed > 0xffffffff) throw new UsageError(`--seed ${o.exact.seed}: must be a whole number from 0 to 4294967295`, EXIT.usage);
  if (o.initial.kind === 'versions' && (!Number.isInteger(o.initial.count) || o.initial.count < 1)) {
    throw new UsageError(`--initial-versions ${o.initial.count}: must be a whole number >= 1`, EXIT.usage);
  }
  if (o.initial.kind === 'date' && Number.isNaN(Date.parse(o.initial.date))) {
    throw new UsageError(`--initial-until ${o.initial.date}: not a date`, EXIT.usage);
  }
  return o;
}
