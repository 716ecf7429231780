import type { Diagnostic, SnapshotInput } from '../model/types.js';

/**
 * The adapter plugin interface. An adapter knows one ORM and nothing about git, metrics or
 * output: core gives it a read-only view of one commit's tree, it says which files hold the
 * schema, and it turns the text of those files into a neutral snapshot plus diagnostics.
 *
 * @example
 * ```ts
 * import type { SchemaAdapter } from '@schema-strata/core';
 *
 * const adapter: SchemaAdapter = {
 *   name: 'tables-txt',
 *   version: '1.0.0',
 *   watch: ['**\/tables.txt'],
 *   locate: (tree) => ({ files: tree.has('tables.txt') ? ['tables.txt'] : [] }),
 *   assemble: ({ files }) => ({
 *     snapshot: {
 *       tables: files[0].text!.split('\n').filter(Boolean).map((name) => ({
 *         name, kind: 'table', columns: [], primaryKey: [], foreignKeys: [], uniques: [],
 *       })),
 *     },
 *     diagnostics: [],
 *   }),
 * };
 * export default adapter;
 * ```
 */
export interface SchemaAdapter<Facts = unknown> {
  /** Short name, used by `--adapter NAME` and in the interchange file. */
  readonly name: string;
  /** Version of the adapter; part of every cache key. */
  readonly version: string;
  /** One line for `--help` and `adapters`. */
  readonly description?: string;
  /** Options of the adapter's own; the CLI shows them in `--help` and passes them through. */
  readonly options?: readonly AdapterOption[];
  /**
   * Glob patterns (picomatch syntax, relative to the repository root) of every path that can
   * matter for locating or reading the schema. Core reads the history of these paths only.
   * `--path` globs given by the user are added to them.
   */
  readonly watch: readonly string[];
  /**
   * Which files hold the schema at one commit. Called for every commit that touches a watched
   * path, so it must be cheap; `tree.read` is cached by blob id.
   */
  locate(tree: TreeView, request: LocateRequest): Promise<Located> | Located;
  /**
   * Optional per-file step: the facts of one file, cached by its blob id (in memory and on
   * disk). When absent, `assemble` receives the text of every file instead.
   * Facts must be plain JSON data, and depend on the file's text (and the options) alone: core
   * calls this for the files of the versions ahead as soon as git hands them over, in no fixed
   * order relative to `assemble` (`ExtractRequest.parseAhead`).
   */
  parseFile?(file: SourceFile, options: AdapterOptionValues): FileFacts<Facts> | Promise<FileFacts<Facts>>;
  /**
   * Build the snapshot of one version from its files. Called in version order within one
   * session (see `createSession`); the result is cached by the set of (path, blob) pairs.
   */
  assemble(input: AssembleInput<Facts>, options: AdapterOptionValues): AssembleResult | Promise<AssembleResult>;
  /**
   * Optional: a stateful assembler for one run, for adapters that can reuse the previous
   * version's work (a fold over migrations, say). When present, core calls the session's
   * `assemble` instead of the adapter's.
   */
  createSession?(options: AdapterOptionValues): AdapterSession<Facts>;
  /**
   * Optional, for an adapter with `parseFile`: its assembly also reads the files its locate step
   * consulted (`Located.consulted`: a package.json that says where an imported package's sources
   * are, say). Core then parses them too and hands their facts over as `AssembleInput.consulted`,
   * and an assembly's cache key holds them. They still make no version of their own.
   */
  readsConsulted?: boolean;
  /**
   * Optional: write core's demo story (an ORM-neutral schema history) as this ORM's code, one
   * file set per step, for `schema-strata demo --adapter NAME`.
   */
  renderDemo?(story: DemoStory): DemoCommitFiles[];
}

/** Files of one demo step: path -> text, or null to delete. The step's tree is exactly these files when `replaceTree`. */
export interface DemoCommitFiles {
  files: Record<string, string | null>;
  replaceTree?: boolean;
}

export interface DemoColumn {
  /** Physical name (snake_case). */
  name: string;
  /** Field or property name in ORM code (camelCase). */
  field: string;
  type: 'serial' | 'int' | 'string' | 'text' | 'boolean' | 'date' | 'datetime' | 'decimal' | 'enum';
  length?: number;
  precision?: number;
  scale?: number;
  /** For `enum`: the enum's name in DemoStep.enums. */
  enum?: string;
  nullable?: boolean;
  unique?: boolean;
  /** A literal default (a number, a boolean, an enum value), or `now` for the current time. */
  default?: string | number | boolean;
}

export interface DemoRelation {
  /** Relation property on the referencing side (camelCase). */
  field: string;
  /** Referencing columns (physical names of columns of this table). */
  columns: string[];
  /** Model of the referenced table. */
  references: string;
  /** Property on the referenced side that lists the referencing rows. */
  backField: string;
  onDelete?: 'cascade' | 'restrict' | 'set null';
}

export interface DemoTable {
  /** Model, entity or class name (PascalCase). */
  model: string;
  /** Physical table name. */
  table: string;
  columns: DemoColumn[];
  /** Primary key (physical column names). */
  primaryKey: string[];
  relations: DemoRelation[];
  /** Implicit many-to-many relations this model owns: the other model and both list properties. */
  manyToMany: Array<{ with: string; field: string; backField: string }>;
}

export interface DemoStep {
  date: string;
  message: string;
  tables: DemoTable[];
  enums: Array<{ name: string; values: string[] }>;
  /** `reformat`: same schema, other layout; `broken`: a commit whose schema does not parse. */
  variant?: 'reformat' | 'broken';
}

export interface DemoStory {
  title: string;
  steps: DemoStep[];
}

/**
 * One run's stateful assembler. Core keeps a table's origins (file and line of the table and of
 * its columns) from the first version of the run that has that table, and reads no later ones.
 * So a session may hand back, for an unchanged table, the very object it handed back for an
 * earlier version, with the origins of then: core then takes it as stored without reading it
 * again (lines that moved since do not matter). A fresh session starts every run.
 */
export interface AdapterSession<Facts = unknown> {
  assemble(input: AssembleInput<Facts>): AssembleResult | Promise<AssembleResult>;
}

export interface AdapterOption {
  /** Long option name without dashes, prefixed with the adapter's name by convention: `prisma-relation-mode`. */
  readonly flag: string;
  readonly description: string;
  readonly type: 'string' | 'boolean' | 'string[]';
  /** Allowed values for a string option. */
  readonly choices?: readonly string[];
  readonly default?: string | boolean | string[];
  /** Whether the option changes the adapter's output (then it is part of the cache key). Default true. */
  readonly affectsOutput?: boolean;
}

export type AdapterOptionValues = Readonly<Record<string, string | boolean | string[] | undefined>>;

/** A read-only view of the watched paths of one commit's tree. */
export interface TreeView {
  /** The commit id. */
  readonly commit: string;
  /** Every watched path present at this commit. */
  paths(): Iterable<string>;
  has(path: string): boolean;
  /** Blob id of a path, or undefined. */
  blob(path: string): string | undefined;
  /** Text of a file (cached by blob id; a byte-order mark is removed), or undefined when absent or binary. */
  read(path: string): Promise<string | undefined>;
  /** Paths under a directory (no trailing slash), recursively. */
  under(dir: string): string[];
  /**
   * Set during the history walk, where `locate` is called for every logged commit in order:
   * `id` is one object for the whole walk (a key for state an adapter carries from commit to
   * commit, in a WeakMap), and `changed` lists the watched paths this commit added, changed or
   * deleted since the commit of the walk's previous call (a rename as both paths). Absent when
   * a view stands on its own (one commit built alone, adapter detection): assume nothing then.
   *
   * `readAhead`, when present, is a hint: the files that the next commits of the walk add or
   * change and that `wanted` accepts are asked of git now, so that their texts are on their way
   * while this process works (for a locate step that reads every new file of some kind; without
   * it, each commit's read waits for git in turn). A text read ahead is kept until its commit has
   * been located, and after that only when that commit located its file.
   */
  readonly walk?: { readonly id: object; readonly changed: readonly string[]; readAhead?(wanted: (path: string) => boolean): void };
}

export interface LocateRequest {
  /** User-given `--path` patterns (already expanded by core to the matching paths when given). */
  readonly paths?: readonly string[];
  /**
   * Of `paths`, those selected only because they lie in a subdirectory of a `--path` directory
   * (no glob or file entry names them). An adapter whose ORM reads only a directory's own files,
   * as Knex reads a migration directory, leaves them out. Absent when there are none.
   */
  readonly nested?: readonly string[];
  readonly options: AdapterOptionValues;
}

export interface Located {
  /** Paths of the files to read for this commit's schema; empty when there is no schema. */
  files: string[];
  /**
   * Files read to locate the schema (package.json, configs); recorded for the version, but they
   * make a version only when they change `files`.
   */
  consulted?: string[];
  /** When several independent schemas are present and none is the one the ORM would pick. */
  ambiguous?: { candidates: string[][]; hint: string };
  /** A message explaining where was searched, used when no commit has a schema. */
  searched?: string;
  /** Set when the schema exists but cannot be analysed (unsupported database, say). */
  unsupported?: string;
  diagnostics?: Diagnostic[];
}

export interface SourceFile {
  /** Path relative to the repository root. */
  readonly path: string;
  readonly blob: string;
  /** Text, with a byte-order mark removed. */
  readonly text: string;
}

export type FileFacts<Facts> =
  | { ok: true; facts: Facts; diagnostics?: Diagnostic[] }
  | { ok: false; diagnostics: Diagnostic[] };

export interface AssembleFile<Facts> {
  readonly path: string;
  readonly blob: string;
  /** Present when the adapter has no `parseFile`. */
  readonly text?: string;
  /** Present when the adapter has `parseFile`: this file's facts (its last good ones when this blob failed). */
  readonly facts?: Facts;
  /** True when this blob failed to parse and `facts` are from an earlier blob of the same path. */
  readonly stale?: boolean;
}

export interface AssembleInput<Facts> {
  /** Files of the version, sorted by path. */
  readonly files: readonly AssembleFile<Facts>[];
  /** Files that failed to parse and never had a good parse: their effects are missing. */
  readonly missing: readonly string[];
  /**
   * For an adapter with `readsConsulted`: the files its locate step consulted for this version,
   * sorted by path, with their facts (those that could not be read or parsed left out).
   */
  readonly consulted?: readonly AssembleFile<Facts>[];
}

export type AssembleResult =
  | { snapshot: SnapshotInput; diagnostics: Diagnostic[]; /** Raw statements etc. the adapter left out. */ counters?: Record<string, number> }
  /** The whole schema failed: core keeps the previous snapshot and marks the version `carried`. */
  | { failed: true; diagnostics: Diagnostic[] };

/** What a module that provides an adapter exports: the adapter as default or as `adapter`. */
export interface AdapterModule {
  default?: SchemaAdapter;
  adapter?: SchemaAdapter;
}
