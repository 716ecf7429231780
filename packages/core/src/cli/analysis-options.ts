import { existsSync } from 'node:fs';
import type { Command } from 'commander';
import { CHANGE_KINDS, type ChangeKind } from '../changes/kinds.js';
import { DEFAULT_RENAME_THRESHOLD, type RenameMode } from '../changes/rename-heuristic.js';
import { firstParentLine, resolveRevisions } from '../git/repository.js';
import type { InterchangeDocument } from '../interchange/document.js';
import {
  BAND_BASES,
  DEFAULT_COUNTED_KINDS,
  DEFAULT_DRAWS,
  DEFAULT_EXACT_LIMIT,
  DEFAULT_HIGH_ABOVE,
  DEFAULT_SEED,
  resolveAnalysisOptions,
  type AnalysisOptions,
  type BandBasis,
  type InitialRule,
} from '../analysis/options.js';
import { UsageError, EXIT } from '../util/errors.js';

/** The analysis options as commander parses them. */
export interface AnalysisCliOptions {
  count?: string[];
  highAbove?: string;
  bandBy?: string;
  initialVersions?: string;
  initialUntil?: string;
  exclude?: string[];
  excludeImplicitJoins?: boolean;
  excludeOrmFks?: boolean;
  renames?: string;
  renameThreshold?: string;
  alpha?: string;
  exactLimit?: string;
  draws?: string;
  seed?: string;
  repo?: string;
}

const collect = (v: string, prev: string[] | undefined): string[] => [...(prev ?? []), ...v.split(',').map((s) => s.trim()).filter(Boolean)];

/** Names of the options that change the analysis (to tell whether a user gave any). */
export const ANALYSIS_OPTION_KEYS = [
  'count', 'highAbove', 'bandBy', 'initialVersions', 'initialUntil', 'exclude', 'excludeImplicitJoins',
  'excludeOrmFks', 'renames', 'renameThreshold', 'alpha', 'exactLimit', 'draws', 'seed',
] as const;

/** Add the options of the analysis to a command (analyze, export, extract --analyze). */
export function addAnalysisOptions(cmd: Command, opts: { renamesDefault?: string } = {}): Command {
  return cmd
    .option('--count <kinds>', `change kinds counted as updates, comma-separated or repeated (default ${DEFAULT_COUNTED_KINDS.join(',')}, a remembered convention: choose your own)`, collect)
    .option('--high-above <T>', `a table with more than T counted updates is high-activity (default ${DEFAULT_HIGH_ABOVE}, a remembered convention, not a standard)`)
    .option('--band-by <basis>', `what the activity band compares with T: ${BAND_BASES.join(', ')} (default total)`)
    .option('--initial-versions <N>', 'tables born in the first N versions count as initial (default: those of version 0)')
    .option('--initial-until <date|rev>', 'tables born at or before this date, tag or commit count as initial')
    .option('--exclude <pattern>', 'leave tables whose id or name matches this glob out of the measures (repeatable)', collect)
    .option('--exclude-implicit-joins', 'leave out the join tables an ORM creates implicitly')
    .option('--exclude-orm-fks', 'leave out foreign keys that only the ORM enforces')
    .option('--renames <mode>', `stated (only renames the ORM code states) or heuristic (also by name similarity and column overlap)${opts.renamesDefault ? ` (default ${opts.renamesDefault})` : ''}`)
    .option('--rename-threshold <x>', `acceptance threshold of the rename heuristic, 0 to 1 (default ${DEFAULT_RENAME_THRESHOLD})`)
    .option('--alpha <level>', 'significance level of the plain-words readings (default 0.05)')
    .option('--exact-limit <n>', `enumerate the exact test's tables up to this many, Monte Carlo above (default ${DEFAULT_EXACT_LIMIT})`)
    .option('--draws <n>', `Monte Carlo draws of the exact test (default ${DEFAULT_DRAWS})`)
    .option('--seed <n>', `seed of the Monte Carlo draws (default ${DEFAULT_SEED})`);
}

/** True when the user gave any analysis option. */
export function anyAnalysisOption(opts: AnalysisCliOptions): boolean {
  return ANALYSIS_OPTION_KEYS.some((k) => opts[k] !== undefined);
}

function number(flag: string, v: string | undefined, integer = false): number | undefined {
  if (v === undefined) return undefined;
  const n = Number(v);
  if (v.trim() === '' || !Number.isFinite(n) || (integer && !Number.isInteger(n))) {
    throw new UsageError(`${flag} ${v}: not ${integer ? 'a whole number' : 'a number'}`, EXIT.usage);
  }
  return n;
}

/** The rename mode and threshold asked for, if any. */
export function renameRequest(opts: AnalysisCliOptions): { mode: RenameMode; threshold: number } | undefined {
  const threshold = number('--rename-threshold', opts.renameThreshold) ?? DEFAULT_RENAME_THRESHOLD;
  if (!(threshold >= 0 && threshold <= 1)) throw new UsageError(`--rename-threshold ${opts.renameThreshold}: must be between 0 and 1`, EXIT.usage);
  if (opts.renames === undefined) return opts.renameThreshold !== undefined ? { mode: 'heuristic', threshold } : undefined;
  if (opts.renames !== 'stated' && opts.renames !== 'heuristic') throw new UsageError(`--renames ${opts.renames}: use stated or heuristic`, EXIT.usage);
  return { mode: opts.renames, threshold };
}

const looksLikeDate = (v: string): boolean => /^\d{4}-\d{2}-\d{2}([T ][0-9:.]+(Z|[+-]\d{2}:?\d{2})?)?$/.test(v) && !Number.isNaN(Date.parse(v));

/**
 * `--initial-until REV`: the version of a revision. A commit id (or its prefix) of a version is
 * found in the document; anything else (a tag, a branch) is asked of the repository, whose
 * first-parent line up to that revision gives the last version at or before it.
 */
async function revisionRule(doc: InterchangeDocument, rev: string, repo: string | undefined): Promise<InitialRule> {
  if (/^[0-9a-f]{7,40}$/i.test(rev)) {
    const hits = doc.versions.filter((v) => v.commit.startsWith(rev.toLowerCase()));
    if (hits.length === 1) return { kind: 'commit', commit: hits[0]!.commit, label: rev, version: hits[0]!.index };
  }
  const where = repo ?? doc.source.repository;
  if (!where || !existsSync(where)) {
    throw new UsageError(`--initial-until ${rev}: not a date nor the commit of a version, and the repository ${where ? `${where} is not here` : 'is unknown'} (name it with --repo)`, EXIT.usage);
  }
  const id = (await resolveRevisions(where, [rev])).get(rev);
  if (!id) throw new UsageError(`--initial-until ${rev}: unknown revision in ${where}`, EXIT.usage);
  const line = new Set(await firstParentLine(where, id));
  let version = -1;
  for (const v of doc.versions) if (line.has(v.commit)) version = v.index;
  return { kind: 'commit', commit: id, label: rev, version };
}

/** The analysis options of the command line that need no document (every value checked). */
export function checkedAnalysisOptions(opts: AnalysisCliOptions): Partial<AnalysisOptions> {
  const partial: Partial<AnalysisOptions> = {};
  if (opts.count) {
    const bad = opts.count.find((k) => !(CHANGE_KINDS as readonly string[]).includes(k));
    if (bad) throw new UsageError(`--count ${bad}: not a change kind (kinds: ${CHANGE_KINDS.join(', ')})`, EXIT.usage);
    partial.count = opts.count as ChangeKind[];
  }
  const t = number('--high-above', opts.highAbove);
  if (t !== undefined) partial.highAbove = t;
  if (opts.bandBy !== undefined) {
    if (!(BAND_BASES as readonly string[]).includes(opts.bandBy)) throw new UsageError(`--band-by ${opts.bandBy}: use ${BAND_BASES.join(', ')}`, EXIT.usage);
    partial.bandBy = opts.bandBy as BandBasis;
  }
  if (opts.initialVersions !== undefined && opts.initialUntil !== undefined) {
    throw new UsageError('--initial-versions and --initial-until: give one of them', EXIT.usage);
  }
  if (opts.initialVersions !== undefined) partial.initial = { kind: 'versions', count: number('--initial-versions', opts.initialVersions, true)! };
  if (opts.initialUntil !== undefined && looksLikeDate(opts.initialUntil)) partial.initial = { kind: 'date', date: opts.initialUntil };
  if (opts.exclude) partial.exclude = opts.exclude;
  if (opts.excludeImplicitJoins) partial.excludeImplicitJoins = true;
  if (opts.excludeOrmFks) partial.excludeOrmForeignKeys = true;
  const alpha = number('--alpha', opts.alpha);
  if (alpha !== undefined) partial.alpha = alpha;
  const d = resolveAnalysisOptions().exact;
  partial.exact = {
    limit: number('--exact-limit', opts.exactLimit, true) ?? d.limit,
    draws: number('--draws', opts.draws, true) ?? d.draws,
    seed: number('--seed', opts.seed, true) ?? d.seed,
  };
  renameRequest(opts);
  // the ranges (T >= 0, alpha in (0, 1), ...) are checked where the defaults are filled in
  return { ...partial, ...resolveAnalysisOptions(partial), initial: partial.initial ?? { kind: 'version0' } };
}

/** Settle the analysis options from the command line, for the given document. */
export async function analysisOptionsFrom(opts: AnalysisCliOptions, doc: InterchangeDocument): Promise<AnalysisOptions> {
  const partial = checkedAnalysisOptions(opts);
  if (opts.initialUntil !== undefined && !looksLikeDate(opts.initialUntil)) partial.initial = await revisionRule(doc, opts.initialUntil, opts.repo);
  return resolveAnalysisOptions(partial);
}
