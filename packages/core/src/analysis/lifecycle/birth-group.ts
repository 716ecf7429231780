import type { Timeline } from '../input/timeline.js';
import type { InitialRule } from '../options.js';

export type BirthGroup = 'initial' | 'later';
export const BIRTH_GROUPS: readonly BirthGroup[] = ['initial', 'later'];

/**
 * The last version index whose newborn tables count as `initial` under a rule: 0 for version 0
 * (the first version of the analysed window); N-1 for the first N versions; the last version at
 * or before a date (a bare YYYY-MM-DD takes the whole day, in UTC) or at or before a given
 * version. -1 when no version qualifies (then no table is initial).
 */
export function initialCutoff(rule: InitialRule, timeline: Timeline): number {
  const vs = timeline.versions;
  switch (rule.kind) {
    case 'version0':
      return 0;
    case 'versions':
      return Math.min(rule.count, vs.length) - 1;
    case 'commit':
      return Math.min(rule.version, vs.length - 1);
    case 'date': {
      const t = Date.parse(rule.date) + (/^\d{4}-\d{2}-\d{2}$/.test(rule.date) ? 86_400_000 - 1 : 0);
      let cut = -1;
      for (const v of vs) if (v.time <= t) cut = v.index;
      return cut;
    }
  }
}

/** Birth group of a table born (first) at version `born`. */
export function birthGroupOf(born: number, cutoff: number): BirthGroup {
  return born <= cutoff ? 'initial' : 'later';
}
