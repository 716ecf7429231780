import type { Timeline } from '../input/timeline.js';
import type { Spell } from './presence.js';

export const MS_PER_DAY = 86_400_000;
/** A year of life for the per-year rates: 365.25 days. */
export const DAYS_PER_YEAR = 365.25;
/** Per-year rates need at least this many days of life (design.md), else they are not computed. */
export const MIN_DAYS_FOR_YEARLY_RATE = 30;

/**
 * Lifetime of a table in versions and in days by committer date. A spell runs from its birth
 * version to its removal version (excluded), or to the last version (included) while the table
 * lives: its versions are the versions it was present in, its days run from the birth version's
 * date to the removal version's date, or to the last version's date. A table with several spells
 * (removed and added again) lives the sum of its spells; the gaps are not life. Committer dates
 * out of order (a rewritten history) never make a spell shorter than zero days.
 */
export function lifetimeOf(spells: readonly Spell[], timeline: Timeline): { versions: number; days: number } {
  const vs = timeline.versions;
  const last = vs[vs.length - 1]!;
  let versions = 0;
  let ms = 0;
  for (const s of spells) {
    const end = s.removed === null ? last : vs[s.removed]!;
    versions += (s.removed === null ? last.index + 1 : s.removed) - s.born;
    ms += Math.max(0, end.time - vs[s.born]!.time);
  }
  return { versions, days: ms / MS_PER_DAY };
}

/** Counted updates per version of life, and per year of life (null below 30 days of life). */
export function ratesOf(counted: number, lifetime: { versions: number; days: number }): { perVersion: number; perYear: number | null } {
  return {
    perVersion: lifetime.versions > 0 ? counted / lifetime.versions : 0,
    perYear: lifetime.days >= MIN_DAYS_FOR_YEARLY_RATE ? counted / (lifetime.days / DAYS_PER_YEAR) : null,
  };
}
