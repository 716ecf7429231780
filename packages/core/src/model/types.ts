/**
 * The neutral schema model: what every adapter produces and every later stage reads.
 *
 * The model knows no ORM. Names are physical (what the database would call them); the
 * ORM-level name a table or column came from is kept beside it for readers.
 */

/** A neutral column type. The native type as written in the ORM code is kept on the column. */
export type NeutralType =
  | { kind: 'integer' }
  | { kind: 'smallint' }
  | { kind: 'bigint' }
  | { kind: 'decimal'; precision?: number; scale?: number }
  | { kind: 'float' }
  | { kind: 'double' }
  | { kind: 'boolean' }
  | { kind: 'string'; length?: number }
  | { kind: 'text' }
  | { kind: 'uuid' }
  | { kind: 'date' }
  | { kind: 'time'; withZone?: boolean; precision?: number }
  | { kind: 'datetime'; precision?: number }
  | { kind: 'timestamp'; withZone: boolean; precision?: number }
  | { kind: 'json' }
  | { kind: 'binary'; length?: number }
  | { kind: 'enum'; name?: string; values: string[] }
  | { kind: 'array'; of: NeutralType }
  | { kind: 'other'; raw: string };

export type NeutralTypeKind = NeutralType['kind'];

/** Where a definition was found: a path relative to the repository root and a 1-based line. */
export interface Origin {
  file: string;
  line?: number;
}

/** How a column's value is produced by the database, when it is. */
export type GeneratedKind = 'autoincrement' | 'identity' | 'uuid' | 'computed' | 'rowid';

export interface Column {
  /** Physical column name. */
  name: string;
  /**
   * Identity of the column within its table across versions, when the ORM code states a
   * rename (a migration's renameColumn): the column's first name. Absent means `name`.
   */
  id?: string;
  /** Name of the field or property in the ORM code, when it differs or is known. */
  ormName?: string;
  type: NeutralType;
  /** The type as written in the ORM code, e.g. `String @db.VarChar(200)` or `varchar`. */
  nativeType: string;
  nullable: boolean;
  /** The default as text, as written (an expression is kept as its source text). */
  default?: string;
  /** Set when the database generates the value (serial, identity, uuid, computed). */
  generated?: GeneratedKind;
  origin?: Origin;
}

export type ReferentialAction = 'cascade' | 'restrict' | 'no action' | 'set null' | 'set default';

export interface ForeignKey {
  /** Constraint name when the ORM code names it. */
  name?: string;
  /** Referencing columns, in order. */
  columns: string[];
  /** Stable id of the referenced table (see tableId). */
  referencedTable: string;
  referencedColumns: string[];
  onDelete?: ReferentialAction;
  onUpdate?: ReferentialAction;
  /** `database`: a real constraint; `orm`: the ORM emulates it and creates no constraint. */
  enforcement: 'database' | 'orm';
}

export interface UniqueConstraint {
  name?: string;
  columns: string[];
}

export type TableKind =
  /** An ordinary table declared in the ORM code. */
  | 'table'
  /** A join table that the ORM creates without the code declaring it. */
  | 'implicit-join';

export interface Table {
  /**
   * Stable id across versions: `name`, or `namespace.name` when a namespace is set. An adapter
   * keeps the first id when the ORM code states a rename (a migration's renameTable).
   */
  id: string;
  /** Physical table name. */
  name: string;
  /** Database schema (namespace); absent means the default one. */
  namespace?: string;
  /** Name of the model, entity or class in the ORM code. */
  ormName?: string;
  kind: TableKind;
  columns: Column[];
  /** Primary-key column names, in key order; empty when the table has none. */
  primaryKey: string[];
  foreignKeys: ForeignKey[];
  uniques: UniqueConstraint[];
  origin?: Origin;
}

/** A view is reported but is not a table of the analysis. */
export interface ViewRef {
  id: string;
  name: string;
  namespace?: string;
  ormName?: string;
  origin?: Origin;
}

/** The rebuilt schema of one version. */
export interface Snapshot {
  /** Tables in canonical order (by id). */
  tables: Table[];
  views: ViewRef[];
  /** Content hash of the canonical form (see hash.ts); origins and column order are not part of it. */
  hash: string;
}

/** Input an adapter gives core; core sorts it and computes hashes. */
export interface SnapshotInput {
  /**
   * Tables. `contentKey` is an optional promise of the adapter: within one run, two tables with
   * the same key are equal but for their origins, so core can skip normalising and hashing
   * the second one (an adapter that reuses unchanged tables between versions sets it).
   */
  tables: Array<Omit<Table, 'id'> & { id?: string; contentKey?: string }>;
  views?: Array<Omit<ViewRef, 'id'> & { id?: string }>;
}

export type Severity = 'error' | 'warning' | 'info';

export interface Diagnostic {
  severity: Severity;
  /** A short stable code, e.g. `prisma/parse-error`, `file/too-large`. */
  code: string;
  message: string;
  file?: string;
  line?: number;
  column?: number;
}

/** A time type with the fractional-second precision the ORM code gives (none: left unset). */
export function withPrecision<T extends NeutralType>(t: T, p: number | null | undefined): T {
  return p === undefined || p === null ? t : { ...t, precision: p };
}

/** Stable id of a table: its physical name, qualified by its namespace when it has one. */
export function tableId(name: string, namespace?: string): string {
  return namespace ? `${namespace}.${name}` : name;
}
