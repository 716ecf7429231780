/** Every kind of change between two consecutive versions (design.md, "Versions and changes"). */
export const CHANGE_KINDS = [
  'table-added',
  'table-removed',
  'table-renamed',
  'column-added',
  'column-removed',
  'column-renamed',
  'column-type-changed',
  'column-nullability-changed',
  'column-default-changed',
  'column-unique-changed',
  'column-enum-values-changed',
  'primary-key-changed',
  'foreign-key-added',
  'foreign-key-removed',
  'foreign-key-changed',
] as const;

export type ChangeKind = (typeof CHANGE_KINDS)[number];

export interface Change {
  /** Index of the version in which the change is first seen. */
  version: number;
  kind: ChangeKind;
  /** Stable id of the table. */
  table: string;
  /** Physical column name (after the change; before it for a removal). */
  column?: string;
  /** For foreign-key changes: the referencing columns, comma-separated. */
  foreignKey?: string;
  /** Text form of the value before the change; absent for additions. */
  before?: string;
  /** Text form of the value after the change; absent for removals. */
  after?: string;
  /** How a rename was established: `stated` by the ORM code, or `heuristic` (with evidence). */
  basis?: 'stated' | 'heuristic';
  evidence?: string;
}

/** Order of kinds within one table's changes of one version. */
export const KIND_ORDER: Record<ChangeKind, number> = Object.fromEntries(CHANGE_KINDS.map((k, i) => [k, i])) as Record<
  ChangeKind,
  number
>;
