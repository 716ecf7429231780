import { posix } from 'node:path';
import type {
  AdapterOptionValues,
  AdapterSession,
  AssembleInput,
  AssembleResult,
  Diagnostic,
  SnapshotInput,
} from '@schema-strata/core/extract';
import { packageJsonDir } from '@schema-strata/core/extract';
import type { KnexFacts, PackageInfo } from './knex-facts.js';
import { knexOptions, type KnexOptions } from './knex-config.js';
import { isKnexfile, knexfileSettings, migrationIndices, resolveImport, resolvePackageSpec, splitPackageSpec } from './knex-locate.js';
import { PMap } from './knex-pmap.js';
import { EMPTY_STATE, Replay, type FileContext, type ReplayCounters, type SchemaState, type StateAccess, type TableState, type ViewState } from './knex-replay.js';
import { untouchedBy, type MapLike } from './knex-track.js';
import { dialectOf, knexClient, type Dialect, type KnexClientInfo } from './knex-types.js';

/** One migration (or init file) of a version, in replay order. */
export interface PlanEntry {
  path: string;
  role: 'init' | 'migration';
  /** Absent when the file never parsed (its effects are skipped). */
  file?: FileContext;
  /** Identity of the entry: its path, its facts and the facts of the project files it imports. */
  key: string;
}

/** What a version's replay needs: its entries in order, the dialect, and every file by path. */
export interface VersionPlan {
  dialect: Dialect;
  /** What `knex.client` holds for the run's client (--knex-client, else the knexfile's), when known. */
  client?: KnexClientInfo;
  /** The schema unqualified names resolve to, when not the dialect's default: --knex-schema, else the knexfile's searchPath (PostgreSQL). */
  schema?: string;
  entries: PlanEntry[];
  files: FileLookup;
  diagnostics: Diagnostic[];
  /**
   * Set when the next version's plan may be this one with migrations appended (`appendedPlan`):
   * one migration directory, no file that imports another, none missing or stale.
   */
  appendable?: { dir: string; loadExtensions: readonly string[]; lastName: string | null };
  /** Set by `appendedPlan`: the plan it extended, whose entries this plan's start with. */
  extends?: VersionPlan;
}

const factsKeys = new WeakMap<object, string>();
let factsSerial = 0;
/**
 * A key of a file's facts: a serial number per facts object. Core hands the same object for the
 * same blob, so a file that did not change keeps its key; two blobs with equal facts get two keys,
 * which costs at most a replay that a content hash would have spared (hashing every file's facts
 * took about 70 ms of the Knex benchmark's 3 s in a profile).
 */
function factsKey(facts: KnexFacts): string {
  let k = factsKeys.get(facts);
  if (!k) {
    k = `#${++factsSerial}`;
    factsKeys.set(facts, k);
  }
  return k;
}

const NO_IMPORTS: ReadonlyMap<string, string> = new Map();
const baseNames = new Map<string, string>();
function baseName(p: string): string {
  let b = baseNames.get(p);
  if (b === undefined) {
    b = posix.basename(p);
    baseNames.set(p, b);
  }
  return b;
}
const entryMemo = new WeakMap<FileContext, PlanEntry>();
const contexts = new WeakMap<KnexFacts, Map<string, FileContext>>();
const contextOfInput = new WeakMap<object, FileContext>();

type InputFile = AssembleInput<KnexFacts>['files'][number] & { facts: KnexFacts };

/** The workspace packages of a version (the package.json files its locate step consulted), by name. */
type Workspace = ReadonlyMap<string, { dir: string; info: PackageInfo }>;
const NO_PACKAGES: Workspace = new Map();

/** The workspace packages of a version, from the facts of the package.json files its locate step consulted. */
function workspaceOf(input: AssembleInput<KnexFacts>): Workspace {
  let out: Map<string, { dir: string; info: PackageInfo }> | null = null;
  for (const f of input.consulted ?? []) {
    const info = f.facts?.package;
    if (!info) continue;
    out ??= new Map();
    if (!out.has(info.name)) out.set(info.name, { dir: packageJsonDir(f.path), info });
  }
  return out ?? NO_PACKAGES;
}

/** Whether a file loads one of the workspace packages. */
function usesWorkspace(facts: KnexFacts, packages: Workspace): boolean {
  if (!facts.packages || packages.size === 0) return false;
  return facts.packages.some((spec) => packages.has(splitPackageSpec(spec).name));
}

/**
 * The replay's view of a file; reused across versions while its facts are the same and it
 * imports nothing (core hands the same input object while a path keeps its blob).
 */
function fileContext(file: InputFile, paths: { has(p: string): boolean }, packages: Workspace): FileContext {
  const { path, facts } = file;
  if (facts.imports.length > 0 || usesWorkspace(facts, packages)) {
    const imports = new Map<string, string>();
    const has = (p: string): boolean => paths.has(p);
    for (const spec of facts.imports) {
      const target = resolveImport(path, spec, has);
      if (target) imports.set(spec, target);
    }
    for (const spec of facts.packages ?? []) {
      const target = resolvePackageSpec(spec, packages, has);
      if (target) imports.set(spec, target);
    }
    return { path, facts, imports };
  }
  let ctx = contextOfInput.get(file);
  if (ctx) return ctx;
  let byPath = contexts.get(facts);
  if (!byPath) {
    byPath = new Map();
    contexts.set(facts, byPath);
  }
  ctx = byPath.get(path);
  if (!ctx) {
    ctx = { path, facts, imports: NO_IMPORTS };
    byPath.set(path, ctx);
  }
  contextOfInput.set(file, ctx);
  return ctx;
}

/**
 * The files of a version by path: a binary search over the input (sorted by path), each file's
 * context made on first use, so that a version costs no map of all its files.
 */
export class FileLookup {
  private readonly made = new Map<number, FileContext>();
  constructor(
    private readonly input: AssembleInput<KnexFacts>['files'],
    private readonly paths: { has(p: string): boolean },
    private readonly packages: Workspace = NO_PACKAGES,
  ) {}

  get(path: string): FileContext | undefined {
    const files = this.input;
    let lo = 0;
    let hi = files.length - 1;
    while (lo <= hi) {
      const mid = (lo + hi) >> 1;
      const p = files[mid]!.path;
      if (p === path) return this.at(mid);
      if (p < path) lo = mid + 1;
      else hi = mid - 1;
    }
    return undefined;
  }

  /** The context of the file at this position of the input. */
  at(i: number): FileContext | undefined {
    let ctx = this.made.get(i);
    if (!ctx) {
      const f = this.input[i]!;
      if (!f.facts) return undefined;
      ctx = fileContext(f as InputFile, this.paths, this.packages);
      this.made.set(i, ctx);
    }
    return ctx;
  }

  *values(): IterableIterator<FileContext> {
    for (let i = 0; i < this.input.length; i++) {
      const ctx = this.at(i);
      if (ctx) yield ctx;
    }
  }
}

/** Compare two names with digit runs as numbers (`2_x` before `10_x`), the rest as text; equal ones by their text. */
export function naturalCompare(a: string, b: string): number {
  const digit = (c: number): boolean => c >= 48 && c <= 57;
  let i = 0;
  let j = 0;
  while (i < a.length && j < b.length) {
    const ca = a.charCodeAt(i);
    const cb = b.charCodeAt(j);
    if (digit(ca) && digit(cb)) {
      let ei = i;
      let ej = j;
      while (ei < a.length && digit(a.charCodeAt(ei))) ei++;
      while (ej < b.length && digit(b.charCodeAt(ej))) ej++;
      const d = BigInt(a.slice(i, ei)) - BigInt(b.slice(j, ej));
      if (d !== 0n) return d < 0n ? -1 : 1;
      i = ei;
      j = ej;
      continue;
    }
    if (ca !== cb) return ca - cb;
    i++;
    j++;
  }
  if (a.length - i !== b.length - j) return a.length - i - (b.length - j);
  return a < b ? -1 : a > b ? 1 : 0;
}

const codeUnitCompare = (a: string, b: string): number => (a < b ? -1 : a > b ? 1 : 0);

/** The init files the options name, as paths of the version's files. */
function initPaths(options: KnexOptions): string[] {
  return options.init.map((p) => posix.normalize(p).replace(/^\.\//, ''));
}

/**
 * Plan the replay of one version: find the knexfile among the files (its migration settings and
 * client), the init files, the migrations in Knex's order (lib/migrations/migrate/sources/
 * fs-migrations.js: by file name across directories, a stable sort; each directory in turn with
 * `sortDirsSeparately`), and the project files they import.
 */
export function planVersion(input: AssembleInput<KnexFacts>, options: KnexOptions): VersionPlan {
  const diagnostics: Diagnostic[] = [...options.diagnostics];
  const all = input.files.map((f) => f.path);
  let pathSet: Set<string> | null = null;
  const paths = { has: (p: string): boolean => (pathSet ??= new Set([...all, ...input.missing])).has(p) };
  const packages = workspaceOf(input);
  const files = new FileLookup(input.files, paths, packages);
  let blobs: Map<string, string> | null = null;
  const blobOf = (p: string): string => (blobs ??= new Map(input.files.map((f) => [f.path, f.blob]))).get(p) ?? '';

  const init = initPaths(options).filter((p) => paths.has(p));
  const initSet = new Set(init);
  const knexfile = input.files.find((f) => isKnexfile(f.path) && !initSet.has(f.path));
  const settings = knexfile ? knexfileSettings(knexfile.facts?.config, knexfile.path, options.environment, options.assume) : null;
  for (const n of settings?.notes ?? []) diagnostics.push({ severity: 'info', code: 'knex/knexfile', file: knexfile!.path, message: n });

  let dialect: Dialect = 'postgresql';
  if (options.client) dialect = options.client;
  else if (settings?.client) {
    const d = dialectOf(settings.client);
    if (d) dialect = d;
    else diagnostics.push({ severity: 'info', code: 'knex/client-unknown', file: knexfile!.path, message: `client ${settings.client} is not one schema-strata maps; types follow PostgreSQL (set --knex-client)` });
  }
  const client = options.clientName !== undefined ? knexClient(options.clientName) : knexClient(settings?.client, settings?.clientKey);
  // (only Knex's PostgreSQL client applies a searchPath)
  const schema = options.schema ?? (dialect === 'postgresql' ? settings?.searchPath : undefined);

  // the migrations and the directory each comes from
  // `at`: the file's position in the input (-1: a missing file; undefined: look it up by path)
  const found: Array<{ path: string; dir: number; name: string; at?: number }> = [];
  const several = (settings?.directories.length ?? 0) > 1 || !settings;
  const taken = new Set<string>([...initSet, ...(knexfile ? [knexfile.path] : [])]);
  const take = (p: string, dir: number, at?: number): void => {
    if (several || taken.size > 0) {
      if (taken.has(p)) return;
      if (several) taken.add(p);
    }
    found.push({ path: p, dir, name: baseName(p), ...(at !== undefined ? { at } : {}) });
  };
  let fromSources = false;
  if (settings) {
    const everything = input.missing.length > 0 ? [...all, ...input.missing] : all;
    settings.directories.forEach((dir, di) => {
      const got = migrationIndices(everything, dir, settings.loadExtensions);
      for (const i of got.indices) take(everything[i]!, di, i < input.files.length ? i : -1);
      if (got.fromSources) {
        fromSources = true;
        diagnostics.push({ severity: 'info', code: 'knex/load-extensions', file: knexfile!.path, message: `${dir}: loadExtensions names only compiled files, which are not in the repository; the .ts sources are replayed` });
      }
    });
  } else {
    // no knexfile: every file except the init files and the helpers the others import
    const imported = new Set<string>();
    for (const ctx of files.values()) for (const target of ctx.imports.values()) if (target !== ctx.path) imported.add(target);
    const dirs = [...new Set(all.concat(input.missing).map((p) => posix.dirname(p)))].sort();
    for (const p of [...all, ...input.missing].sort()) {
      if (isKnexfile(p)) continue;
      if (imported.has(p) && !files.get(p)?.facts.up) continue;
      take(p, dirs.indexOf(posix.dirname(p)));
    }
  }

  const cmp = options.order === 'natural' ? naturalCompare : codeUnitCompare;
  const order = (a: (typeof found)[number], b: (typeof found)[number]): number => {
    if (settings?.sortDirsSeparately && a.dir !== b.dir) return a.dir - b.dir;
    return cmp(a.name, b.name) || a.dir - b.dir || codeUnitCompare(a.path, b.path);
  };
  // the files come sorted by path: within one directory that is already Knex's order by name
  let sorted = true;
  for (let i = 1; i < found.length && sorted; i++) if (order(found[i - 1]!, found[i]!) > 0) sorted = false;
  if (!sorted) found.sort(order);
  const byName = new Map<string, string[]>();
  // one directory cannot hold two files of one name
  if (several) for (const f of found) {
    const list = byName.get(f.name);
    if (list) list.push(f.path);
    else byName.set(f.name, [f.path]);
  }
  for (const [name, list] of byName) {
    if (list.length < 2) continue;
    diagnostics.push({
      severity: 'warning', code: 'knex/duplicate-name', file: list[1]!,
      message: `two migrations are named ${name} (${list.join(', ')}): Knex records migrations by file name, so a database that ran one never runs the other; both are replayed here, in this order`,
    });
  }

  const depKey = (path: string): string => {
    // the facts of the project files this file imports, transitively
    const seen = new Set<string>([path]);
    const queue = [path];
    const keys: string[] = [];
    for (let head = 0; head < queue.length; head++) {
      const p = queue[head]!;
      const ctx = files.get(p);
      if (!ctx) continue;
      for (const target of ctx.imports.values()) {
        if (seen.has(target)) continue;
        seen.add(target);
        queue.push(target);
        const t = files.get(target);
        keys.push(`${target}:${t ? factsKey(t.facts) : `missing:${blobOf(target)}`}`);
      }
    }
    return keys.sort().join(',');
  };
  const entry = (path: string, role: PlanEntry['role'], at?: number): PlanEntry => {
    const file = at === undefined ? files.get(path) : at >= 0 ? files.at(at) : undefined;
    if (file && file.facts.imports.length === 0 && !usesWorkspace(file.facts, packages)) return plainEntry(file, role);
    const own = file ? factsKey(file.facts) : `missing:${blobOf(path)}`;
    return { path, role, ...(file ? { file } : {}), key: `${role}|${path}|${own}|${file ? depKey(path) : ''}` };
  };
  const entries = [...init.map((p) => entry(p, 'init')), ...found.map((f) => entry(f.path, 'migration', f.at))];
  const plan: VersionPlan = { dialect, ...(client ? { client } : {}), ...(schema ? { schema } : {}), entries, files, diagnostics };
  // (not with workspace packages: a file that loads one imports another)
  if (settings && !several && !fromSources && packages.size === 0 && input.missing.length === 0 && input.files.every((f) => f.facts && !f.stale && f.facts.imports.length === 0)) {
    plan.appendable = { dir: settings.directories[0]!, loadExtensions: settings.loadExtensions, lastName: found.length > 0 ? found[found.length - 1]!.name : null };
  }
  return plan;
}

/** The entry of a file that imports nothing: the same object in every version (its context is reused). */
function plainEntry(file: FileContext, role: PlanEntry['role']): PlanEntry {
  let e = entryMemo.get(file);
  if (!e || e.role !== role) {
    e = { path: file.path, role, file, key: `${role}|${file.path}|${factsKey(file.facts)}|` };
    entryMemo.set(file, e);
  }
  return e;
}

/**
 * The plan of a version whose files are the last version's (the same input objects, in order)
 * plus new migrations that Knex orders after every earlier one: the last plan with them
 * appended, so that a history of appended migrations costs no full plan per version. Null when
 * the version differs in any other way; `planVersion` then plans it from scratch.
 */
export function appendedPlan(last: VersionPlan, lastFiles: AssembleInput<KnexFacts>['files'], input: AssembleInput<KnexFacts>, options: KnexOptions): VersionPlan | null {
  const a = last.appendable;
  if (!a || input.missing.length > 0 || workspaceOf(input).size > 0) return null;
  const files = input.files;
  const added: InputFile[] = [];
  let i = 0;
  for (const f of files) {
    if (i < lastFiles.length && lastFiles[i] === f) i++;
    else if (!f.facts || f.stale || f.facts.imports.length > 0) return null;
    else added.push(f as InputFile);
  }
  if (i !== lastFiles.length) return null;
  if (added.length === 0) return { ...last, files: new FileLookup(files, NO_PATHS), extends: last };
  const cmp = options.order === 'natural' ? naturalCompare : codeUnitCompare;
  const init = new Set(initPaths(options));
  let lastName = a.lastName;
  const entries: PlanEntry[] = [];
  for (const f of added) {
    if (isKnexfile(f.path) || init.has(f.path)) return null;
    const got = migrationIndices([f.path], a.dir, a.loadExtensions);
    if (got.indices.length !== 1 || got.fromSources) return null;
    const name = baseName(f.path);
    if (lastName !== null && cmp(lastName, name) >= 0) return null;
    lastName = name;
    entries.push(plainEntry(fileContext(f, NO_PATHS, NO_PACKAGES), 'migration'));
  }
  return {
    dialect: last.dialect,
    ...(last.client ? { client: last.client } : {}),
    ...(last.schema ? { schema: last.schema } : {}),
    entries: [...last.entries, ...entries],
    files: new FileLookup(files, NO_PATHS),
    diagnostics: last.diagnostics,
    appendable: { ...a, lastName },
    extends: last,
  };
}

/** For plans whose files import nothing: no import is ever resolved against it. */
const NO_PATHS = { has: (): boolean => false };

interface Step {
  key: string;
  path: string;
  state: SchemaState;
  /** What the migration read and wrote of the state before it (see `KnexSession`). */
  access: StateAccess;
  diagnostics: Diagnostic[];
  counters: ReplayCounters;
  missing: boolean;
  role: PlanEntry['role'];
  /** Diagnostics and counts of this step and every step before it. */
  upTo: { diagnostics: Diagnostic[]; counters: VersionCounters };
}

const PARTS = ['tables', 'views', 'enums', 'moved', 'rawTables'] as const;
type Part = (typeof PARTS)[number];
type Changed = Record<Part, Set<string>>;

/** Deep equality of plain data (the replay's tables, views, enum values). */
function sameData(a: unknown, b: unknown): boolean {
  if (a === b) return true;
  if (typeof a !== 'object' || typeof b !== 'object' || a === null || b === null) return false;
  if (Array.isArray(a)) {
    if (!Array.isArray(b) || a.length !== b.length) return false;
    for (let i = 0; i < a.length; i++) if (!sameData(a[i], b[i])) return false;
    return true;
  }
  if (Array.isArray(b)) return false;
  const ka = Object.keys(a);
  if (ka.length !== Object.keys(b).length) return false;
  for (const k of ka) {
    if (!Object.prototype.hasOwnProperty.call(b, k)) return false;
    if (!sameData((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k])) return false;
  }
  return true;
}

/** A copy of a state with the writes of a step of another fold applied (the values that step left). */
function withWrites(state: SchemaState, step: Step): SchemaState {
  let out = state;
  for (const part of PARTS) {
    const written = step.access[part].written;
    if (written.size === 0) continue;
    const from = step.state[part] as MapLike<unknown>;
    const to = (part === 'tables' ? new PMap(state.tables) : new Map(state[part] as Map<string, unknown>)) as MapLike<unknown>;
    for (const k of written) {
      const v = from.get(k);
      if (v === undefined) to.delete(k);
      else to.set(k, v);
    }
    out = { ...out, [part]: to };
  }
  return out;
}

interface VersionCounters {
  migrations: number;
  skippedMigrations: number;
  rawStatements: number;
  rawSchemaStatements: number;
  unresolved: number;
}

const NO_COUNTS: VersionCounters = { migrations: 0, skippedMigrations: 0, rawStatements: 0, rawSchemaStatements: 0, unresolved: 0 };

const tableOutput = new WeakMap<TableState, SnapshotInput['tables'][number]>();
const viewOutput = new WeakMap<ViewState, NonNullable<SnapshotInput['views']>[number]>();

/** The neutral table of a replayed table (memoised: an untouched table is the same object in the next version). */
function toTable(t: TableState): SnapshotInput['tables'][number] {
  let out = tableOutput.get(t);
  if (out) return out;
  out = {
    id: t.id,
    name: t.name,
    ...(t.namespace ? { namespace: t.namespace } : {}),
    kind: 'table',
    columns: t.columns.map((c) => ({
      name: c.name,
      ...(c.id !== c.name ? { id: c.id } : {}),
      type: c.type,
      nativeType: c.native,
      nullable: c.nullable,
      ...(c.default !== undefined ? { default: c.default } : {}),
      ...(c.generated ? { generated: c.generated } : {}),
      origin: c.origin,
    })),
    primaryKey: [...t.primaryKey],
    foreignKeys: t.foreignKeys.map((f) => ({
      ...(f.name ? { name: f.name } : {}),
      columns: [...f.columns],
      referencedTable: f.refTable,
      referencedColumns: [...f.refColumns],
      ...(f.onDelete ? { onDelete: f.onDelete } : {}),
      ...(f.onUpdate ? { onUpdate: f.onUpdate } : {}),
      enforcement: 'database' as const,
    })),
    uniques: t.uniques.map((u) => ({ ...(u.name ? { name: u.name } : {}), columns: [...u.columns] })),
    origin: t.origin,
  };
  tableOutput.set(t, out);
  return out;
}

function toView(v: ViewState): NonNullable<SnapshotInput['views']>[number] {
  let out = viewOutput.get(v);
  if (!out) {
    out = { id: v.id, name: v.name, ...(v.namespace ? { namespace: v.namespace } : {}), origin: v.origin };
    viewOutput.set(v, out);
  }
  return out;
}

/**
 * The fold of one run: the schema after each migration of the last version assembled is kept, so
 * that a version which only appends migrations replays just those. A version whose old migration
 * was edited (or removed, or which gained one in the middle) replays from that migration on, but
 * a later migration that read none of the tables (views, enum types) the change touched is not
 * replayed again: it would do the same, so what it wrote is copied over (`Replay.access`).
 */
export class KnexSession implements AdapterSession<KnexFacts> {
  private steps: Step[] = [];
  private dialect: Dialect | null = null;
  /** The client the steps were replayed for (null before the first version). */
  private client: KnexClientInfo | undefined | null = null;
  /** The schema of unqualified names the steps were replayed for. */
  private schema: string | undefined = undefined;
  /** Migrations replayed by this session (for tests and benchmarks). */
  replayed = 0;
  /** Migrations of a refold taken over from the previous fold without replaying them. */
  carriedOver = 0;

  constructor(private readonly options: KnexOptions) {}

  /** The last version's plan and files, which the next version's plan may extend. */
  private last: { plan: VersionPlan; files: AssembleInput<KnexFacts>['files'] } | null = null;
  /** Versions planned by extending the last plan (for tests and benchmarks). */
  plansExtended = 0;
  /** The plan `steps` were folded for. */
  private folded: VersionPlan | null = null;

  private plan(input: AssembleInput<KnexFacts>): VersionPlan {
    const extended = this.last ? appendedPlan(this.last.plan, this.last.files, input, this.options) : null;
    if (extended) this.plansExtended++;
    const plan = extended ?? planVersion(input, this.options);
    this.last = { plan, files: input.files };
    return plan;
  }

  assemble(input: AssembleInput<KnexFacts>): AssembleResult {
    const plan = this.plan(input);
    // (knexClient gives one object per client: a different object is a different client)
    if (plan.dialect !== this.dialect || plan.client !== this.client || plan.schema !== this.schema) {
      this.steps = [];
      this.dialect = plan.dialect;
      this.client = plan.client;
      this.schema = plan.schema;
    }
    const steps = this.steps;
    let i = 0;
    // a plan that extends the one the steps were folded for shares all of its entries
    if (plan.extends && plan.extends === this.folded && steps.length === plan.extends.entries.length) i = steps.length;
    // (not kept: a chain of plans would hold every version's entries)
    delete plan.extends;
    while (i < steps.length && i < plan.entries.length && steps[i]!.key === plan.entries[i]!.key) i++;
    // the old fold's steps from the first difference on, to match against this version's entries
    const rest = steps.slice(i);
    steps.length = i;
    let state = i > 0 ? steps[i - 1]!.state : EMPTY_STATE;
    // `base`: the old fold's state at the point the new fold has reached; `changed`: per part of
    // the state, the keys whose values may differ between the two (a superset of the differences)
    let base = state;
    const changed: Changed = { tables: new Set(), views: new Set(), enums: new Set(), moved: new Set(), rawTables: new Set() };
    let next = 0;
    let byKey: Map<string, number> | null = null;
    for (let j = i; j < plan.entries.length; j++) {
      const e = plan.entries[j]!;
      // the old step of the same entry, if it is still ahead of the old fold's point
      let m = -1;
      if (next < rest.length) {
        if (rest[next]!.key === e.key) m = next;
        else {
          byKey ??= new Map(rest.map((st, k) => [st.key, k]));
          const k = byKey.get(e.key);
          if (k !== undefined && k > next) m = k;
        }
      }
      if (m >= 0) {
        // old steps passed over are gone from this version: what they wrote differs now
        for (let k = next; k < m; k++) for (const part of PARTS) for (const key of rest[k]!.access[part].written) changed[part].add(key);
        base = m > 0 ? rest[m - 1]!.state : base;
        next = m + 1;
        const old = rest[m]!;
        if (PARTS.every((part) => untouchedBy(old.access[part], changed[part]))) {
          state = withWrites(state, old);
          for (const part of PARTS) for (const key of old.access[part].written) changed[part].delete(key);
          base = old.state;
          this.carriedOver++;
          steps.push({ ...old, state, upTo: this.upTo(j, old.role, old.missing, old.diagnostics, old.counters) });
          continue;
        }
      }
      const replay = new Replay(state, plan.dialect, plan.files, plan.client, plan.schema, this.options.assume);
      if (e.file) {
        replay.runFile(e.file, e.role);
        this.replayed++;
      }
      const after = replay.state();
      const access = replay.access();
      const target = m >= 0 ? rest[m]! : null;
      const targetState = target ? target.state : base;
      // with no old step ahead to match, what differs from the old fold no longer matters (it
      // only decides whether an old step can be taken over): only this step's writes are
      // compared, to keep the old objects they equal (a fresh fold of many migrations would
      // otherwise compare every table so far at every step)
      const last = next >= rest.length;
      for (const part of PARTS) {
        const keys = last ? access[part].written : new Set([...changed[part], ...access[part].written, ...(target ? target.access[part].written : [])]);
        const now = after[part] as MapLike<unknown>;
        const then = targetState[part] as MapLike<unknown>;
        const differ = new Set<string>();
        for (const k of keys) {
          const a = now.get(k);
          const b = then.get(k);
          if (a === b) continue;
          // written anew with the same content: the old fold's object is kept, so that later
          // steps (and the output's memo) see no difference
          if (a !== undefined && b !== undefined && access[part].written.has(k) && sameData(a, b)) now.set(k, b);
          else differ.add(k);
        }
        changed[part] = differ;
      }
      base = targetState;
      state = after;
      steps.push({
        key: e.key, path: e.path, state, access, diagnostics: replay.diagnostics, counters: replay.counters, missing: !e.file, role: e.role,
        upTo: this.upTo(j, e.role, !e.file, replay.diagnostics, replay.counters),
      });
    }
    this.folded = plan;
    return this.result(state, plan);
  }

  /** The running totals after step `j` of the fold being built (steps before it are in place). */
  private upTo(j: number, role: PlanEntry['role'], missing: boolean, diagnostics: Diagnostic[], c: ReplayCounters): Step['upTo'] {
    const before = j > 0 ? this.steps[j - 1]!.upTo : { diagnostics: [], counters: NO_COUNTS };
    return {
      diagnostics: diagnostics.length > 0 ? [...before.diagnostics, ...diagnostics] : before.diagnostics,
      counters: {
        migrations: before.counters.migrations + (role === 'migration' ? 1 : 0),
        skippedMigrations: before.counters.skippedMigrations + (missing ? 1 : 0),
        rawStatements: before.counters.rawStatements + c.rawStatements,
        rawSchemaStatements: before.counters.rawSchemaStatements + c.rawSchemaStatements,
        unresolved: before.counters.unresolved + c.unresolved,
      },
    };
  }

  /** The schema after each entry of the last version assembled: the init files, then the migrations in order. */
  trace(): Array<{ path: string; role: PlanEntry['role']; skipped: boolean; snapshot: SnapshotInput }> {
    return this.steps.map((s) => ({
      path: s.path,
      role: s.role,
      skipped: s.missing,
      snapshot: { tables: s.state.tables.valueList().map(toTable), views: [...s.state.views.values()].map(toView) },
    }));
  }

  private result(state: SchemaState, plan: VersionPlan): AssembleResult {
    const last = this.steps[this.steps.length - 1]?.upTo ?? { diagnostics: [], counters: NO_COUNTS };
    const diagnostics = [...plan.diagnostics, ...last.diagnostics];
    const tables = state.tables.valueList().map(toTable);
    const views = [...state.views.values()].map(toView);
    return { snapshot: { tables, views }, diagnostics, counters: { ...last.counters } };
  }
}

/** Assemble one version without a session (a fresh fold from the first migration). */
export function assembleKnex(input: AssembleInput<KnexFacts>, options: AdapterOptionValues): AssembleResult {
  return new KnexSession(knexOptions(options)).assemble(input);
}
