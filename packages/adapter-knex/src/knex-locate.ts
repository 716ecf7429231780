import { posix } from 'node:path';
import { BlobMemo, isOwnPackageJson, packageJsonDir, sortedIndex, sortedUnique, type AdapterOptionValues, type Diagnostic, type Located, type LocateRequest, type TreeView } from '@schema-strata/core/extract';
import type { Cond, PackageInfo, Val } from './knex-facts.js';
import { isArr, isObj, isProjectPackage, isRelative, isUndeclaredName, member, packageInfo, parseKnexSource, runtimeModulesOf } from './knex-parse.js';
import { knexOptions, type AssumedValue, type KnexOptions } from './knex-config.js';

const SOURCE_EXTENSIONS = ['.js', '.cjs', '.mjs', '.ts', '.cts', '.mts'];
const KNEXFILE_EXTENSIONS = ['.js', '.ts', '.cjs', '.mjs', '.cts', '.mts'];
const KNEXFILE = /^knexfile\.(js|ts|cjs|mjs|cts|mts)$/;

/**
 * Paths that can matter to locating or replaying Knex migrations: every JavaScript and
 * TypeScript file (a knexfile can name any directory, a migration can import constants from
 * anywhere in the project), and the package.json files that make a directory a workspace
 * package a migration may import. One glob for the six extensions (.js .cjs .mjs .ts .cts .mts):
 * git's log pass matches every watched glob against every changed path, so fewer is faster.
 */
export const KNEX_WATCH = ['**/*.*[jt]s', '**/package.json'];

/** Knex's default `migrations.loadExtensions` (lib/migrations/common/MigrationsLoader.js). */
export const DEFAULT_LOAD_EXTENSIONS = ['.co', '.coffee', '.eg', '.iced', '.js', '.cjs', '.litcoffee', '.ls', '.ts'];

export const SEARCHED =
  'knexfile.{js,ts,cjs,mjs,cts,mts} (its migrations.directory, per environment) at the root or in one package of a monorepo, ' +
  'else a directory named migrations whose files are Knex migrations';

export function isKnexfile(path: string): boolean {
  return path.includes('knexfile.') && KNEXFILE.test(posix.basename(path));
}

export function isSourceFile(path: string): boolean {
  return SOURCE_EXTENSIONS.includes(posix.extname(path)) && !/\.d\.[cm]?ts$/.test(path);
}

/** The migration settings a knexfile states, for one environment, with directories relative to the repository root. */
export interface KnexfileSettings {
  /** The environment read, when the knexfile has several. */
  environment?: string;
  client?: string;
  /** Whether the configuration names the client as `client` (Knex's `client.config.client`) or as `dialect`. */
  clientKey?: 'client' | 'dialect';
  directories: string[];
  loadExtensions: string[];
  sortDirsSeparately: boolean;
  tableName: string;
  schemaName?: string;
  /**
   * The first schema of the connection's `searchPath` (Knex's PostgreSQL client sets it on every
   * connection it opens: lib/dialects/postgres, setSchemaSearchPath; a string is one schema name).
   */
  searchPath?: string;
  /** Parts of the knexfile that could not be read statically. */
  notes: string[];
}

const UNKNOWN = Symbol('unknown');
const NO_ASSUMPTIONS: ReadonlyMap<string, AssumedValue> = new Map();
type Plain = string | number | boolean | null | undefined | Plain[] | { [k: string]: Plain } | typeof UNKNOWN;

/**
 * The dotted path of a read from a name the knexfile never declares (`process.env.DB_CLIENT`,
 * `APP.db.client`), which --knex-assume may give a value; null for anything else.
 */
function readPath(v: Val): string | null {
  if (v === null || typeof v !== 'object') return null;
  if ('env' in v) return `process.env.${v.env}`;
  if ('expr' in v) return isUndeclaredName(v.expr) ? v.expr : null;
  // a package's value (not one of the project's: the knexfile reader follows no package)
  if ('imp' in v && v.as !== undefined) return isUndeclaredName(v.as) ? [v.as, ...(v.path ?? [])].join('.') : null;
  if ('at' in v && (typeof v.key === 'string' || typeof v.key === 'number')) {
    const base = readPath(v.at);
    return base === null ? null : `${base}.${v.key}`;
  }
  return null;
}

/**
 * Evaluate a knexfile value statically: `__dirname` is `/` + the knexfile's directory (an
 * absolute path inside the repository); reads from undeclared names take the values of `assume`.
 */
function evalConfig(v: Val, dir: string, assume: ReadonlyMap<string, AssumedValue>, depth = 0): Plain {
  if (depth > 20) return UNKNOWN;
  if (assume.size > 0) {
    const path = readPath(v);
    if (path !== null && assume.has(path)) return assume.get(path)!;
  }
  if (v === null || typeof v !== 'object') return v;
  if ('arr' in v) return v.arr.map((x) => evalConfig(x, dir, assume, depth + 1));
  if ('obj' in v) {
    const out: { [k: string]: Plain } = {};
    for (const [k, x] of v.obj) {
      if (k === '...') {
        const s = evalConfig(x, dir, assume, depth + 1);
        if (s && typeof s === 'object' && !Array.isArray(s)) Object.assign(out, s);
      } else out[k] = evalConfig(x, dir, assume, depth + 1);
    }
    return out;
  }
  if ('dir' in v) return '/' + dir;
  if ('join' in v) {
    const parts = v.join.map((x) => evalConfig(x, dir, assume, depth + 1));
    if (!parts.every((p) => typeof p === 'string')) return UNKNOWN;
    // path.resolve(x) is relative to the working directory, which Knex's CLI sets to the knexfile's
    return posix.join(...(parts as string[]));
  }
  if ('cat' in v) {
    const parts = v.cat.map((x) => evalConfig(x, dir, assume, depth + 1));
    if (!parts.every((p) => typeof p === 'string' || typeof p === 'number')) return UNKNOWN;
    return parts.join('');
  }
  if ('or' in v) {
    const a = evalConfig(v.or[0], dir, assume, depth + 1);
    return a === UNKNOWN || !a ? evalConfig(v.or[1], dir, assume, depth + 1) : a;
  }
  if ('when' in v) {
    // `process.env.X ? a : b`: decided when --knex-assume gives what it reads, else not known,
    // and the first branch Knex users write is the usual one
    const c = evalCond(v.when, dir, assume, depth + 1);
    if (c !== undefined) return evalConfig(c ? v.then : v.else, dir, assume, depth + 1);
    const a = evalConfig(v.then, dir, assume, depth + 1);
    return a === UNKNOWN ? evalConfig(v.else, dir, assume, depth + 1) : a;
  }
  if ('at' in v) {
    const base = evalConfig(v.at, dir, assume, depth + 1);
    const key = evalConfig(v.key, dir, assume, depth + 1);
    if (base && typeof base === 'object' && !Array.isArray(base) && typeof key === 'string') return base[key];
    return UNKNOWN;
  }
  if ('undef' in v) return undefined;
  return UNKNOWN;
}

/** A knexfile's condition, when its values are known (undefined when not). */
function evalCond(c: Cond, dir: string, assume: ReadonlyMap<string, AssumedValue>, depth: number): boolean | undefined {
  if (depth > 20) return undefined;
  if ('lit' in c) return c.lit;
  if ('not' in c) {
    const x = evalCond(c.not, dir, assume, depth + 1);
    return x === undefined ? undefined : !x;
  }
  if ('and' in c || 'or' in c) {
    const [l, r] = 'and' in c ? c.and : c.or;
    const a = evalCond(l, dir, assume, depth + 1);
    const b = evalCond(r, dir, assume, depth + 1);
    if ('and' in c) return a === false || b === false ? false : a === true && b === true ? true : undefined;
    return a === true || b === true ? true : a === false && b === false ? false : undefined;
  }
  const scalar = (x: Plain): boolean => x === null || x === undefined || typeof x === 'string' || typeof x === 'number' || typeof x === 'boolean';
  if ('eq' in c) {
    const a = evalConfig(c.eq[0], dir, assume, depth + 1);
    const b = evalConfig(c.eq[1], dir, assume, depth + 1);
    return scalar(a) && scalar(b) ? (a === b) !== !!c.neg : undefined;
  }
  if ('truthy' in c) {
    const x = evalConfig(c.truthy, dir, assume, depth + 1);
    return x === UNKNOWN ? undefined : !!x;
  }
  return undefined;
}

const CONFIG_KEYS = ['client', 'dialect', 'connection', 'migrations', 'useNullAsDefault', 'pool', 'searchPath'];

/** The environments of a knexfile's default export, or null when it is one flat configuration. */
export function knexfileEnvironments(config: Val): string[] | null {
  if (!isObj(config)) return null;
  if (config.obj.some(([k]) => CONFIG_KEYS.includes(k))) return null;
  return config.obj.filter(([k, v]) => k !== '...' && isObj(v)).map(([k]) => k);
}

/**
 * The migration settings of a knexfile (its default export, as facts), for the environment
 * asked for, else `production`, else `development`, else the first one (Knex's CLI reads
 * `development` by default; production is where the schema that matters lives).
 */
export function knexfileSettings(config: Val | undefined, knexfilePath: string, environment?: string, assume: ReadonlyMap<string, AssumedValue> = NO_ASSUMPTIONS): KnexfileSettings {
  const dir = posix.dirname(knexfilePath) === '.' ? '' : posix.dirname(knexfilePath);
  const notes: string[] = [];
  const settings: KnexfileSettings = {
    directories: [],
    loadExtensions: DEFAULT_LOAD_EXTENSIONS,
    sortDirsSeparately: false,
    tableName: 'knex_migrations',
    notes,
  };
  let chosen: Val | undefined = config;
  const envs = config === undefined ? null : knexfileEnvironments(config);
  if (envs) {
    const name = environment && envs.includes(environment)
      ? environment
      : (['production', 'development'].find((e) => envs.includes(e)) ?? envs[0]);
    if (environment && !envs.includes(environment)) notes.push(`the knexfile has no environment "${environment}"; ${name ?? 'none'} is read`);
    if (name) {
      settings.environment = name;
      chosen = member(config!, name);
    }
  }
  const plain = chosen === undefined ? undefined : evalConfig(chosen, dir, assume);
  const obj = plain && typeof plain === 'object' && !Array.isArray(plain) ? plain : {};
  const client = obj['client'] ?? obj['dialect'];
  if (typeof client === 'string') {
    settings.client = client;
    settings.clientKey = obj['client'] === client ? 'client' : 'dialect';
  }
  else if (client === UNKNOWN) notes.push('the client is not known statically');
  const sp = obj['searchPath'];
  const firstSchema = Array.isArray(sp) ? sp[0] : sp;
  if (typeof firstSchema === 'string' && firstSchema) settings.searchPath = firstSchema;
  else if (firstSchema === UNKNOWN) notes.push('the searchPath is not known statically; unqualified names are taken as in the default schema (set --knex-schema)');
  const mig = obj['migrations'];
  const m = mig && typeof mig === 'object' && !Array.isArray(mig) ? mig : {};
  if (mig === UNKNOWN) notes.push('migrations settings are not known statically; ./migrations is assumed');
  const d = m['directory'];
  const list = d === undefined ? ['./migrations'] : Array.isArray(d) ? d : [d];
  for (const x of list) {
    if (typeof x !== 'string') {
      notes.push('a migrations.directory is not known statically; it is left out');
      continue;
    }
    const p = x.startsWith('/') ? posix.normalize(x.slice(1)) : posix.normalize(posix.join(dir, x));
    const norm = p === '.' ? '' : p.replace(/\/+$/, '');
    if (norm.startsWith('..')) notes.push(`migrations.directory ${x} is outside the repository; left out`);
    else if (!settings.directories.includes(norm)) settings.directories.push(norm);
  }
  if (settings.directories.length === 0 && list.length > 0 && notes.length === 0) settings.directories.push(posix.join(dir, 'migrations'));
  const le = m['loadExtensions'];
  if (Array.isArray(le) && le.every((x) => typeof x === 'string')) settings.loadExtensions = le as string[];
  if (m['sortDirsSeparately'] === true) settings.sortDirsSeparately = true;
  if (typeof m['tableName'] === 'string') settings.tableName = m['tableName'];
  if (typeof m['schemaName'] === 'string') settings.schemaName = m['schemaName'];
  return settings;
}

/**
 * The migration files of a directory as Knex's file-system source lists them: the files directly
 * in it (not in subdirectories) whose extension is in loadExtensions. A TypeScript project whose
 * knexfile loads only the compiled `.js` files, and whose `.js` files are not committed, gets
 * its `.ts` sources instead (with a note).
 */
export function migrationsIn(paths: readonly string[], dir: string, loadExtensions: readonly string[]): { files: string[]; fromSources: boolean } {
  const got = migrationIndices(paths, dir, loadExtensions);
  return { files: got.indices.map((i) => paths[i]!), fromSources: got.fromSources };
}

/** As `migrationsIn`, but the positions of the migrations in `paths`. */
export function migrationIndices(paths: readonly string[], dir: string, loadExtensions: readonly string[]): { indices: number[]; fromSources: boolean } {
  const prefix = dir === '' ? '' : dir + '/';
  const files: number[] = [];
  const sources: number[] = [];
  for (let i = 0; i < paths.length; i++) {
    const p = paths[i]!;
    if (!p.startsWith(prefix) || p.indexOf('/', prefix.length) >= 0) continue;
    if (p.endsWith('ts') && /\.d\.[cm]?ts$/.test(p)) continue;
    let loaded = false;
    for (const e of loadExtensions) {
      if (p.endsWith(e) && p.length - e.length > prefix.length) {
        loaded = true;
        break;
      }
    }
    if (loaded) files.push(i);
    else if (p.endsWith('.ts') || p.endsWith('.mts') || p.endsWith('.cts')) sources.push(i);
  }
  if (files.length > 0 || !loadExtensions.includes('.js')) return { indices: files, fromSources: false };
  return { indices: sources, fromSources: sources.length > 0 };
}

/**
 * Resolve a relative import specifier of `from` against a set of paths, as Node and TypeScript
 * would: the exact file, the `.ts` source of a `.js` specifier, the specifier with a source
 * extension, or its index file.
 */
export function resolveImport(from: string, spec: string, has: (p: string) => boolean): string | undefined {
  const base = posix.normalize(posix.join(posix.dirname(from), spec));
  if (base.startsWith('..')) return undefined;
  const ext = posix.extname(base);
  const candidates: string[] = [];
  if (SOURCE_EXTENSIONS.includes(ext)) {
    candidates.push(base);
    const stem = base.slice(0, -ext.length);
    if (ext === '.js') candidates.push(stem + '.ts', stem + '.tsx');
    if (ext === '.mjs') candidates.push(stem + '.mts');
    if (ext === '.cjs') candidates.push(stem + '.cts');
  }
  for (const e of SOURCE_EXTENSIONS) candidates.push(base + e);
  for (const e of SOURCE_EXTENSIONS) candidates.push(`${base}/index${e}`);
  return candidates.find(has);
}

/** Relative import specifiers in a text: a quick scan, not a parse (`import`, `export ... from`, `require`, `import()`). */
export function scanImports(text: string): string[] {
  const out: string[] = [];
  const re = /(?:\bfrom\s*|\brequire\s*\(\s*|\bimport\s*\(\s*|\bimport\s+)(['"])(\.{1,2}(?:\/[^'"\n]*)?)\1/g;
  for (let m = re.exec(text); m; m = re.exec(text)) if (!out.includes(m[2]!)) out.push(m[2]!);
  return out;
}

// memos by blob id: the same text always gives the same answer
const moduleMemo = new BlobMemo<{ relative: string[]; packages: string[] }>();
const configMemo = new BlobMemo<Val | null>();
const migrationMemo = new BlobMemo<boolean>();
const NO_MODULES = { relative: [], packages: [] };

/** Whether a text names, in a quick scan, a bare specifier that could be a package of the project. */
function mayLoadPackage(text: string): boolean {
  const re = /(?:\bfrom\s*|\brequire\s*\(\s*|\bimport\s*\(\s*|\bimport\s+)(['"])([^'"\n.][^'"\n]*)\1/g;
  for (let m = re.exec(text); m; m = re.exec(text)) if (isProjectPackage(m[2]!)) return true;
  return false;
}

/**
 * The modules a file loads when it runs: its relative specifiers, and its bare ones that could
 * name a package of the project. Quick scans first; a file they find either in is parsed, once,
 * so that imports only in comments, and those TypeScript elides (used only as types), are not
 * followed.
 */
async function modulesOf(tree: TreeView, path: string): Promise<{ relative: string[]; packages: string[] }> {
  const got = await moduleMemo.of(tree, path, (text) => {
    if (text === undefined || (scanImports(text).length === 0 && !mayLoadPackage(text))) return NO_MODULES;
    const modules = runtimeModulesOf(text);
    return { relative: modules.filter(isRelative), packages: modules.filter(isProjectPackage) };
  });
  return got ?? NO_MODULES;
}

const importsOf = async (tree: TreeView, path: string): Promise<string[]> => (await modulesOf(tree, path)).relative;

async function knexfileConfig(tree: TreeView, path: string): Promise<Val | null> {
  const config = await configMemo.of(tree, path, (text) => {
    const parsed = text === undefined ? null : parseKnexSource(text);
    return parsed && parsed.ok ? (parsed.facts.config ?? null) : null;
  });
  return config ?? null;
}

/**
 * Whether a file reads like a Knex migration (a quick scan, memoised by blob): it defines `up`
 * and uses a Knex builder. Migrations of other tools (a query runner, a query interface) do not.
 */
async function looksLikeKnexMigration(tree: TreeView, path: string): Promise<boolean> {
  const looks = await migrationMemo.of(
    tree,
    path,
    (text = '') => /\bup\b/.test(text) && (/\.schema\s*\.\s*\w+\s*\(/.test(text) || /\bknex\b/.test(text)) && !/\bqueryRunner\b|\bqueryInterface\b/.test(text),
  );
  return looks ?? false;
}

/** A package of the repository (a workspace package): the directory of its package.json and what it says. */
export interface WorkspacePackage {
  /** The package.json's path. */
  file: string;
  /** Its directory ('' at the root). */
  dir: string;
  info: PackageInfo;
}

const packageMemo = new BlobMemo<PackageInfo | null>();


/** The repository's own packages at this commit (every package.json with a name, node_modules aside), by name; the first by path wins. */
async function workspacePackages(tree: TreeView): Promise<Map<string, WorkspacePackage>> {
  const out = new Map<string, WorkspacePackage>();
  for (const p of [...tree.paths()].filter(isOwnPackageJson).sort()) {
    const info = await packageMemo.of(tree, p, (text) => (text === undefined ? null : packageInfo(text)));
    if (info && !out.has(info.name)) out.set(info.name, { file: p, dir: packageJsonDir(p), info });
  }
  return out;
}

/** The package name of a bare specifier (`@coop/names/tables` -> `@coop/names`) and the subpath after it. */
export function splitPackageSpec(spec: string): { name: string; sub: string } {
  const parts = spec.split('/');
  const n = spec.startsWith('@') ? 2 : 1;
  return { name: parts.slice(0, n).join('/'), sub: parts.slice(n).join('/') };
}

/**
 * The file a bare specifier stands for when it names a workspace package: its entry point as a
 * file of the repository (`source`, `exports`, `main`, `module`, each as written, or its `.ts`
 * source, or, for compiled output that is not committed (`dist/cjs/index.js`), the same path
 * under `src/` with the build directories left out), else `src/index` or `index`; a subpath
 * (`@coop/names/tables`) under the package's directory or its `src/`. Undefined when the
 * specifier names no workspace package, or none of those files is there.
 */
export function resolvePackageSpec(spec: string, packages: ReadonlyMap<string, { dir: string; info: PackageInfo }>, has: (p: string) => boolean): string | undefined {
  const { name, sub } = splitPackageSpec(spec);
  const pkg = packages.get(name);
  if (!pkg) return undefined;
  // resolved as a relative specifier of a file in the package's directory
  const from = pkg.dir ? `${pkg.dir}/package.json` : 'package.json';
  const rel = (p: string): string | undefined => resolveImport(from, `./${p}`, has);
  if (sub) return rel(sub) ?? rel(`src/${sub}`);
  for (const entry of pkg.info.entries) {
    const e = posix.normalize(entry).replace(/^\.\//, '');
    if (e.startsWith('..') || /\.d\.[cm]?ts$/.test(e)) continue;
    const direct = rel(e);
    if (direct) return direct;
    // compiled output: the same file under src/, without one build directory or more
    const parts = e.split('/');
    for (let k = 1; k < parts.length; k++) {
      const got = rel(['src', ...parts.slice(k)].join('/'));
      if (got) return got;
    }
  }
  return rel('src/index') ?? rel('index');
}

/** Bare specifiers a file loads when it runs that could name a package of the project (see `modulesOf`). */
const packageImportsOf = async (tree: TreeView, path: string): Promise<string[]> => (await modulesOf(tree, path)).packages;

/**
 * The files the given ones import from the project, transitively (at most `limit` files): by
 * relative specifiers, and by bare ones that name a workspace package (`packages`), whose
 * package.json files are returned as `manifests`.
 */
async function importClosure(
  tree: TreeView, start: readonly string[], skip: ReadonlySet<string>, packages: ReadonlyMap<string, WorkspacePackage>, limit = 500,
): Promise<{ files: string[]; anyImports: boolean; manifests: string[] }> {
  const seen = new Set(start);
  const queue = [...start];
  const out: string[] = [];
  const manifests = new Set<string>();
  let anyImports = false;
  const has = (x: string): boolean => tree.has(x);
  for (let head = 0; head < queue.length && out.length < limit; head++) {
    const p = queue[head]!;
    const targets: string[] = [];
    const specs = await importsOf(tree, p);
    if (specs.length > 0) anyImports = true;
    for (const spec of specs) {
      const target = resolveImport(p, spec, has);
      if (target) targets.push(target);
    }
    if (packages.size > 0) {
      for (const spec of await packageImportsOf(tree, p)) {
        const w = packages.get(splitPackageSpec(spec).name);
        if (!w) continue;
        anyImports = true;
        manifests.add(w.file);
        const target = resolvePackageSpec(spec, packages, has);
        if (target) targets.push(target);
      }
    }
    for (const target of targets) {
      if (seen.has(target) || skip.has(target)) continue;
      seen.add(target);
      out.push(target);
      queue.push(target);
    }
  }
  return { files: out, anyImports, manifests: [...manifests].sort() };
}

function normalisePath(p: string): string {
  return posix.normalize(p.replace(/\\/g, '/')).replace(/^\.\/+/, '').replace(/\/+$/, '');
}

/** The init (base-schema) files the options name, normalised. */
export function initFiles(options: AdapterOptionValues): string[] {
  return knexOptions(options).init.map(normalisePath);
}

interface Found {
  knexfile?: string;
  migrations: string[];
  diagnostics: Diagnostic[];
  /** The knexfile's migration settings, and whether a directory fell back to `.ts` sources. */
  settings?: { directories: string[]; loadExtensions: string[]; fromSources: boolean };
}

/** The migrations of one knexfile at this commit. */
async function fromKnexfile(tree: TreeView, knexfile: string, opts: KnexOptions): Promise<Found> {
  const config = await knexfileConfig(tree, knexfile);
  const s = knexfileSettings(config ?? undefined, knexfile, opts.environment, opts.assume);
  const migrations: string[] = [];
  let fromSources = false;
  for (const dir of s.directories) {
    const got = migrationsIn(tree.under(dir), dir, s.loadExtensions);
    migrations.push(...got.files);
    if (got.fromSources) fromSources = true;
  }
  return { knexfile, migrations, diagnostics: [], settings: { directories: s.directories, loadExtensions: s.loadExtensions, fromSources } };
}

/**
 * What one walk's last locate found, when it is simple enough to carry to the next commit: a
 * root knexfile, migrations that import nothing (so no helper files), no diagnostics.
 */
interface Carried {
  knexfile: string;
  /** Every init file the options name. */
  initNamed: string[];
  directories: string[];
  loadExtensions: string[];
  /** The located files (the knexfile, the init files present, the migrations), sorted; never changed in place. */
  files: readonly string[];
}
const carriedByWalk = new WeakMap<object, Carried>();

/** `xs` (sorted) with `p` in its place: a new array, or `xs` itself when it has `p`. */
function withInserted(xs: readonly string[], p: string): readonly string[] {
  const at = sortedIndex(xs, p);
  if (xs[at] === p) return xs;
  if (at < xs.length) return xs.slice(0, at).concat([p], xs.slice(at));
  const ys = xs.slice();
  ys.push(p);
  return ys;
}

/**
 * The located files of this commit from the walk's last ones, when this commit only added or
 * changed migrations that import nothing (or files that cannot matter: not a knexfile, not an
 * init file, not in a migration directory, with nothing imported anywhere). Null otherwise:
 * then the commit is located afresh.
 */
async function carryForward(tree: TreeView, last: Carried, changed: readonly string[]): Promise<Carried | null> {
  // the next commits' new files in the migration directories will be read here too: ask for them now
  tree.walk?.readAhead?.((p) => {
    const parent = posix.dirname(p);
    return last.directories.includes(parent === '.' ? '' : parent);
  });
  let files = last.files;
  for (const p of changed) {
    if (isKnexfile(p) || last.initNamed.includes(p) || isOwnPackageJson(p)) return null;
    const parent = posix.dirname(p);
    const dir = parent === '.' ? '' : parent;
    if (!last.directories.includes(dir)) continue;
    if (!tree.has(p)) return null;
    const got = migrationsIn([p], dir, last.loadExtensions);
    if (got.fromSources) return null;
    if (got.files.length === 0) continue;
    if ((await importsOf(tree, p)).length > 0) return null;
    // (a package it loads may be a workspace package: located afresh, which follows it)
    if ((await packageImportsOf(tree, p)).length > 0) return null;
    files = withInserted(files, p);
  }
  return files === last.files ? last : { ...last, files };
}

/**
 * Locate the Knex migrations of one commit: the migration directories of the knexfile (read as
 * a syntax tree, never run), else a directory named `migrations` whose files are Knex migrations;
 * `--path` entries instead when given. Init files named by `--knex-init` come first. Files the
 * migrations import from the project are included, so that their edits make versions.
 */
export async function locateKnex(tree: TreeView, req: LocateRequest): Promise<Located> {
  const walk = req.paths ? undefined : tree.walk;
  if (walk) {
    const last = carriedByWalk.get(walk.id);
    if (last) {
      const next = await carryForward(tree, last, walk.changed);
      if (next) {
        carriedByWalk.set(walk.id, next);
        // (the same array while nothing was added: core does not change what it is handed)
        return { files: next.files as string[], searched: SEARCHED };
      }
      carriedByWalk.delete(walk.id);
    }
  }
  const opts = knexOptions(req.options);
  const init = initFiles(req.options).filter((p) => tree.has(p));
  const diagnostics: Diagnostic[] = [];
  let found: Found | null = null;
  let ambiguous: Located['ambiguous'];
  if (req.paths) {
    // Knex reads a migration directory's own files, not its subdirectories (FsMigrations lists
    // each directory with readdir): files only a --path directory's subdirectory holds are left out
    const nested = new Set(req.nested ?? []);
    const named = req.paths.filter((p) => tree.has(p) && isSourceFile(p) && !init.includes(p) && !nested.has(p));
    found = { migrations: named.filter((p) => !isKnexfile(p)), diagnostics: [] };
    const kf = named.find(isKnexfile);
    if (kf) found.knexfile = kf;
  } else {
    const all = [...tree.paths()];
    const knexfiles = all.filter((p) => isKnexfile(p) && !p.includes('node_modules/'));
    const byDir = new Map<string, string[]>();
    for (const k of knexfiles) {
      const d = posix.dirname(k);
      byDir.set(d, [...(byDir.get(d) ?? []), k]);
    }
    const pick = (list: string[]): string =>
      [...list].sort((a, b) => KNEXFILE_EXTENSIONS.indexOf(posix.extname(a)) - KNEXFILE_EXTENSIONS.indexOf(posix.extname(b)))[0]!;
    if (byDir.has('.')) found = await fromKnexfile(tree, pick(byDir.get('.')!), opts);
    else if (byDir.size > 0) {
      const candidates: Found[] = [];
      for (const d of [...byDir.keys()].sort()) candidates.push(await fromKnexfile(tree, pick(byDir.get(d)!), opts));
      const distinct = new Map<string, Found>();
      for (const c of candidates) {
        const key = c.migrations.join('\n');
        if (!distinct.has(key)) distinct.set(key, c);
      }
      const withMigrations = [...distinct.values()].filter((c) => c.migrations.length > 0);
      if (distinct.size === 1) found = candidates[0]!;
      else if (withMigrations.length === 1) found = withMigrations[0]!;
      else if (withMigrations.length > 1) {
        ambiguous = {
          candidates: withMigrations.map((c) => [c.knexfile!]),
          hint: `--path ${posix.dirname(withMigrations[0]!.migrations[0]!)} (or the migration directory of another knexfile)`,
        };
      } else found = candidates[0]!;
    } else {
      // no knexfile: directories named migrations whose files are Knex migrations (the root's first)
      const dirs = [...new Set(all.filter((p) => /(^|\/)migrations\/[^/]+$/.test(p) && !p.includes('node_modules/')).map((p) => posix.dirname(p)))].sort(
        (a, b) => a.split('/').length - b.split('/').length || (a < b ? -1 : a > b ? 1 : 0),
      );
      const hits: Found[] = [];
      for (const dir of dirs) {
        const files = migrationsIn(tree.under(dir), dir, DEFAULT_LOAD_EXTENSIONS).files;
        let knexLike = false;
        for (const f of files) if ((knexLike = await looksLikeKnexMigration(tree, f))) break;
        if (knexLike) hits.push({ migrations: files, diagnostics: [] });
      }
      if (hits.length === 1 || (hits.length > 1 && posix.dirname(hits[0]!.migrations[0]!) === 'migrations')) found = hits[0]!;
      else if (hits.length > 1) {
        ambiguous = {
          candidates: hits.map((h) => [posix.dirname(h.migrations[0]!) + '/']),
          hint: `--path ${posix.dirname(hits[0]!.migrations[0]!)} (or another of them)`,
        };
      }
    }
  }
  if (ambiguous) return { files: [], ambiguous, searched: SEARCHED };
  const migrations = found?.migrations ?? [];
  if (migrations.length === 0 && init.length === 0) {
    return { files: [], ...(found?.knexfile ? { consulted: [found.knexfile] } : {}), searched: SEARCHED, diagnostics };
  }
  const core = [...init, ...migrations];
  const skip = new Set<string>([...core, ...(found?.knexfile ? [found.knexfile] : [])]);
  const closure = await importClosure(tree, core, skip, await workspacePackages(tree));
  const helpers = closure.files;
  const files = [...(found?.knexfile ? [found.knexfile] : []), ...core, ...helpers];
  // the next commit of the walk may start from this one (see carryForward)
  const kf = found?.knexfile;
  if (walk && kf && !kf.includes('/') && found!.settings && !found!.settings.fromSources && !closure.anyImports && diagnostics.length === 0) {
    carriedByWalk.set(walk.id, {
      knexfile: kf, initNamed: initFiles(req.options), directories: found!.settings.directories,
      loadExtensions: found!.settings.loadExtensions, files: sortedUnique([kf, ...init, ...migrations]),
    });
  }
  return {
    files, searched: SEARCHED,
    // the package.json files of the workspace packages followed: the assembly resolves their names by them
    ...(closure.manifests.length ? { consulted: closure.manifests } : {}),
    ...(diagnostics.length ? { diagnostics } : {}),
  };
}
