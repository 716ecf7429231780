import picomatch from 'picomatch';
import type { ForeignKey } from '../../model/types.js';
import type { AnalysisOptions } from '../options.js';

/** What the filters need to know of a table that ever existed. */
export interface TableFacts {
  id: string;
  /** Every physical name (qualified by namespace) the table had. */
  names: ReadonlySet<string>;
  kind: 'table' | 'implicit-join';
}

/**
 * Why a table is left out of the measures, or undefined when it stays in: a `--exclude`
 * pattern (picomatch, matched against the stable id and every physical name the table had), or
 * `--exclude-implicit-joins` for a join table that an ORM creates implicitly. Views are never
 * tables of the analysis.
 */
export function exclusionReason(t: TableFacts, opts: Pick<AnalysisOptions, 'exclude' | 'excludeImplicitJoins'>): string | undefined {
  if (opts.excludeImplicitJoins && t.kind === 'implicit-join') return 'implicit join table (--exclude-implicit-joins)';
  for (const pattern of opts.exclude) {
    const match = picomatch(pattern, { dot: true });
    if (match(t.id) || [...t.names].some((n) => match(n))) return `matches --exclude ${pattern}`;
  }
  return undefined;
}

/** Whether a foreign key is an edge of the graphs: ORM-only ones are left out with `--exclude-orm-fks`. */
export function keepsForeignKey(fk: ForeignKey, opts: Pick<AnalysisOptions, 'excludeOrmForeignKeys'>): boolean {
  return !(opts.excludeOrmForeignKeys && fk.enforcement === 'orm');
}
