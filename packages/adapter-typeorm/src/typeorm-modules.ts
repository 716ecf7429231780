import { posix } from 'node:path';
import picomatch from 'picomatch';
import { packageJsonDir } from '@schema-strata/core/extract';
import type { TsconfigFact } from './typeorm-parse.js';

/**
 * Module resolution as TypeScript's `node`/`bundler` resolution does it for the project's own
 * files (relative specifiers, tsconfig `baseUrl` and `paths`, index files, `.js` specifiers
 * standing for `.ts` files), over the paths of one commit's tree. Shared by the locate step and
 * the assembly, so that both follow the same files.
 */

const EXTENSIONS = ['.ts', '.tsx', '.mts', '.cts', '.d.ts', '.js', '.jsx', '.mjs', '.cjs'];
const JS_TO_TS: Record<string, string[]> = { '.js': ['.ts', '.tsx'], '.jsx': ['.tsx'], '.mjs': ['.mts'], '.cjs': ['.cts'] };

export const SOURCE_FILE = /\.(tsx?|mts|cts|jsx?|mjs|cjs)$/;

/**
 * Test code: a file under a test directory (`test/`, `__tests__/`, `e2e/`, also with a prefix:
 * `integration-tests/`, `api_e2e/`) or named `*.spec.ts` / `*.test.ts`. A directory that only
 * starts with such a word (`test-runs/`, a feature of an application) is not test code.
 */
const TEST_PATH = /(^|\/)([\w.]*[-_])?(__tests__|__mocks__|tests?|e2e|spec)\/|\.(spec|test|e2e-spec)\.[cm]?[jt]sx?$/;
export const isTestPath = (p: string): boolean => TEST_PATH.test(p);
export const isDeclarationFile = (p: string): boolean => /\.d\.[cm]?ts$/.test(p);

export type Resolved =
  | { kind: 'typeorm'; sub: string }
  | { kind: 'file'; path: string }
  /** A project file the specifier names, absent from the tree. */
  | { kind: 'missing'; path: string }
  | { kind: 'external'; module: string };

/** The compiler options of one tsconfig chain that matter here, with paths made relative to the repository root. */
export interface TsconfigView {
  /** The tsconfig files of the chain, nearest first. */
  files: string[];
  strictNullChecks: boolean;
  baseUrl?: string;
  /** `paths` patterns with their targets (relative to the repository root). */
  paths?: Array<{ pattern: string; targets: string[] }>;
  outDir?: string;
  rootDir?: string;
  /** Set when an `extends` names a package or a missing file, whose settings are unknown. */
  unknownBase?: string;
}

const norm = (p: string): string => {
  const n = posix.normalize(p).replace(/^\.\//, '').replace(/\/+$/, '');
  return n === '.' ? '' : n;
};

/** Join a repository-relative directory and a relative path; null when it leaves the repository. */
export function joinRepo(dir: string, rel: string): string | null {
  const n = norm(posix.join(dir || '.', rel));
  return n.startsWith('../') || n === '..' ? null : n;
}

/**
 * The view of the tsconfig chain starting at `path`: compiler options merged along `extends`
 * (a relative file; a package base is noted as unknown).
 */
/** The file a tsconfig's relative `extends` entry names, of the paths present. */
export function extendsTarget(from: string, ext: string, has: (p: string) => boolean): string | undefined {
  const base = joinRepo(posix.dirname(from), ext);
  if (base === null) return undefined;
  return [base, base + '.json', `${base}/tsconfig.json`].find((c) => has(c));
}

export function tsconfigView(path: string, factsOf: (p: string) => TsconfigFact | undefined, has: (p: string) => boolean): TsconfigView {
  const chain: Array<{ path: string; fact: TsconfigFact }> = [];
  let unknownBase: string | undefined;
  const visit = (p: string, depth: number): void => {
    if (depth > 8 || chain.some((c) => c.path === p)) return;
    const fact = factsOf(p);
    if (!fact) return;
    chain.push({ path: p, fact });
    for (const ext of fact.extends ?? []) {
      if (ext.startsWith('.') || ext.startsWith('/')) {
        const found = extendsTarget(p, ext, has);
        if (found) visit(found, depth + 1);
        else unknownBase = ext;
      } else unknownBase = ext;
    }
  };
  visit(path, 0);
  const view: TsconfigView = { files: chain.map((c) => c.path), strictNullChecks: false };
  // nearest wins: walk from the farthest base to the file itself
  let strict: boolean | undefined;
  let snc: boolean | undefined;
  for (let i = chain.length - 1; i >= 0; i--) {
    const { path: p, fact } = chain[i]!;
    const dir = posix.dirname(p) === '.' ? '' : posix.dirname(p);
    if (fact.strict !== undefined) strict = fact.strict;
    if (fact.strictNullChecks !== undefined) snc = fact.strictNullChecks;
    if (fact.baseUrl !== undefined) view.baseUrl = joinRepo(dir, fact.baseUrl) ?? '';
    if (fact.paths) {
      const base = fact.baseUrl !== undefined ? joinRepo(dir, fact.baseUrl) ?? '' : dir;
      view.paths = Object.entries(fact.paths).map(([pattern, targets]) => ({ pattern, targets: targets.map((t) => joinRepo(base, t) ?? t) }));
    }
    if (fact.outDir !== undefined) view.outDir = joinRepo(dir, fact.outDir) ?? undefined;
    if (fact.rootDir !== undefined) view.rootDir = joinRepo(dir, fact.rootDir) ?? undefined;
  }
  view.strictNullChecks = snc ?? strict ?? false;
  if (unknownBase) view.unknownBase = unknownBase;
  return view;
}

/** The nearest `tsconfig.json` in the directories above a file, or undefined. */
export function nearestTsconfig(file: string, has: (p: string) => boolean): string | undefined {
  let dir = posix.dirname(file);
  for (;;) {
    const d = dir === '.' ? '' : dir;
    const p = d ? `${d}/tsconfig.json` : 'tsconfig.json';
    if (has(p)) return p;
    if (!d) return undefined;
    dir = posix.dirname(d);
  }
}

/**
 * Globs that point at compiled output (`dist/**\/*.entity.js`) mapped back to the sources through
 * the tsconfig's `outDir` / `rootDir`, and `.js` patterns also read as `.ts`.
 */
export function sourceGlobs(glob: string, ts: TsconfigView | undefined, hasDir: (d: string) => boolean, projectDir: string): string[] {
  const out = new Set<string>([glob]);
  let g = glob;
  if (ts?.outDir !== undefined && (g === ts.outDir || g.startsWith(ts.outDir + '/'))) {
    const root = ts.rootDir ?? (hasDir(projectDir ? `${projectDir}/src` : 'src') ? (projectDir ? `${projectDir}/src` : 'src') : projectDir);
    g = (root ? root : '') + g.slice(ts.outDir.length);
    g = g.replace(/^\//, '');
    out.add(g);
  }
  if (/\.js\b/.test(g) && !/\.ts\b/.test(g)) out.add(g.replace(/\.js\b/g, '.ts'));
  if (/\.js\b/.test(glob) && !/\.ts\b/.test(glob)) out.add(glob.replace(/\.js\b/g, '.ts'));
  return [...out];
}

/** What module resolution needs of a package.json: its name and entry points (from its text alone). */
export interface PackageFact {
  name: string;
  /** `types`, `typings`, `main` and `exports["."]` (its first target by the conditions TypeScript and Node read), as written. */
  entries: string[];
  /** `exports` subpaths (`./lib/*`) with their targets, when `exports` is a map of subpaths. */
  subpaths?: Array<[string, string]>;
}

/** The workspace package of a package.json at `file` that says `fact`. */
export function workspacePackage(file: string, fact: PackageFact): WorkspacePackage {
  return { ...fact, file, dir: packageJsonDir(file) };
}

/** A package of the repository (a workspace package): where its package.json is and what it says. */
export interface WorkspacePackage extends PackageFact {
  /** The package.json's path. */
  file: string;
  /** Its directory ('' for the repository root). */
  dir: string;
}

const CONDITIONS = ['types', 'typings', 'import', 'require', 'node', 'default'];

/** The first target of an `exports` value: a string, the first of a list, or the first condition TypeScript or Node would take. */
function exportTarget(v: unknown, depth = 0): string | undefined {
  if (depth > 4) return undefined;
  if (typeof v === 'string') return v;
  if (Array.isArray(v)) {
    for (const x of v) {
      const t = exportTarget(x, depth + 1);
      if (t) return t;
    }
    return undefined;
  }
  if (v && typeof v === 'object') {
    const o = v as Record<string, unknown>;
    for (const c of CONDITIONS) if (c in o) {
      const t = exportTarget(o[c], depth + 1);
      if (t) return t;
    }
  }
  return undefined;
}

/** The resolution facts of a package.json's text; null when it has no name or is not JSON. */
export function parsePackageJson(text: string): PackageFact | null {
  let j: unknown;
  try {
    j = JSON.parse(text);
  } catch {
    return null;
  }
  if (!j || typeof j !== 'object') return null;
  const o = j as Record<string, unknown>;
  if (typeof o.name !== 'string' || !o.name) return null;
  const entries: string[] = [];
  for (const k of ['types', 'typings', 'main']) if (typeof o[k] === 'string' && o[k]) entries.push(o[k] as string);
  const ex = o.exports;
  let subpaths: Array<[string, string]> | undefined;
  if (ex && typeof ex === 'object' && !Array.isArray(ex) && Object.keys(ex).some((k) => k.startsWith('.'))) {
    subpaths = [];
    for (const [k, v] of Object.entries(ex as Record<string, unknown>)) {
      const t = exportTarget(v);
      if (!t) continue;
      if (k === '.') entries.push(t);
      else subpaths.push([k, t]);
    }
  } else {
    const t = exportTarget(ex);
    if (t) entries.push(t);
  }
  return { name: o.name, entries, ...(subpaths && subpaths.length > 0 ? { subpaths } : {}) };
}

/** The package name and subpath of a bare specifier (`@scope/name/sub`, `name/sub`), or null. */
export function splitSpecifier(spec: string): { name: string; sub: string } | null {
  if (spec.startsWith('.') || spec.startsWith('/') || spec.includes(':')) return null;
  const parts = spec.split('/');
  const n = spec.startsWith('@') ? 2 : 1;
  if (parts.length < n || parts.slice(0, n).some((x) => !x)) return null;
  return { name: parts.slice(0, n).join('/'), sub: parts.slice(n).join('/') };
}

/** Workspace packages by name; several of one name in the order resolution tries them (by directory). */
export function packagesByName(list: Iterable<WorkspacePackage>): Map<string, WorkspacePackage[]> {
  const out = new Map<string, WorkspacePackage[]>();
  for (const p of list) {
    let l = out.get(p.name);
    if (!l) out.set(p.name, (l = []));
    l.push(p);
  }
  const key = (p: WorkspacePackage): string => JSON.stringify([p.entries, p.subpaths ?? []]);
  for (const l of out.values()) l.sort((a, b) => (a.dir < b.dir ? -1 : a.dir > b.dir ? 1 : key(a) < key(b) ? -1 : key(a) > key(b) ? 1 : 0));
  return out;
}

/** The targets a package's `exports` subpath map gives a subpath (exact keys, then one-`*` patterns). */
function subpathTargets(pkg: WorkspacePackage, sub: string): string[] {
  const want = `./${sub}`;
  for (const [k, t] of pkg.subpaths ?? []) if (k === want) return [t];
  for (const [k, t] of pkg.subpaths ?? []) {
    const star = k.indexOf('*');
    if (star < 0) continue;
    const pre = k.slice(0, star);
    const post = k.slice(star + 1);
    if (want.startsWith(pre) && want.endsWith(post) && want.length >= pre.length + post.length) return [t.replace('*', want.slice(pre.length, want.length - post.length))];
  }
  return [sub];
}

/** Compiled output directories a package's entry commonly points into, when no tsconfig names one. */
const OUTPUT_DIRS = new Set(['dist', 'lib', 'build', 'out']);

/** A resolution kept from commit to commit, with what it depended on. */
interface KeptResolution {
  r: Resolved;
  /** The paths whose presence it tested, as `tryFile` bases. */
  bases: string[];
  /** It went through a workspace package (and so looked at which directories exist). */
  usesDirs: boolean;
  /** The workspace package it went into (reported again on every reuse). */
  pkg?: { name: string; file: string };
}

/**
 * Resolutions kept across the commits of one history walk. A resolution depends on the presence
 * of the paths it tested (all of them `tryFile` bases with an extension or an index file), on the
 * tsconfig files and package.json files of the tree (the context: when they change, everything
 * is dropped) and, through a workspace package, on which directories exist. At each full locate,
 * the paths the walk changed since the last one drop the resolutions that tested them.
 */
export class ResolutionMemo {
  private readonly kept = new Map<string, KeptResolution>();
  private readonly byBase = new Map<string, Set<string>>();
  private context: string | null = null;
  private walkId: object | null = null;
  /** Paths changed since the last `begin`; null when unknown (everything is dropped then). */
  private pending: string[] | null = null;
  private dirs: ReadonlySet<string> = new Set();
  /** Resolutions reused and resolutions worked out (for tests). */
  reused = 0;
  resolved = 0;

  /** Called at every commit of a walk (full locate or not), with the paths it changed. */
  note(walk: { id: object; changed: readonly string[] } | undefined): void {
    if (!walk || walk.id !== this.walkId || this.pending === null) {
      this.walkId = walk?.id ?? null;
      this.pending = null;
      return;
    }
    for (const p of walk.changed) this.pending.push(p);
  }

  /** Start a full locate: keep what still holds under this context and these directories. */
  begin(context: string, dirs: ReadonlySet<string>): void {
    const pending = this.pending;
    if (pending === null || context !== this.context || this.kept.size > MAX_KEPT) this.clear();
    else {
      let dirsChanged = false;
      for (const q of pending) {
        for (const b of probingBases(q)) this.drop(b);
        for (let d = posix.dirname(q); d !== '.' && !dirsChanged; d = posix.dirname(d)) if (this.dirs.has(d) !== dirs.has(d)) dirsChanged = true;
      }
      if (dirsChanged) for (const [k, e] of this.kept) if (e.usesDirs) this.kept.delete(k);
    }
    this.context = context;
    this.dirs = dirs;
    this.pending = this.walkId ? [] : null;
  }

  get(key: string): KeptResolution | undefined {
    return this.kept.get(key);
  }

  set(key: string, e: KeptResolution): void {
    this.kept.set(key, e);
    for (const b of e.bases) {
      let s = this.byBase.get(b);
      if (!s) this.byBase.set(b, (s = new Set()));
      s.add(key);
    }
  }

  private drop(base: string): void {
    const keys = this.byBase.get(base);
    if (!keys) return;
    for (const k of keys) this.kept.delete(k);
    this.byBase.delete(base);
  }

  private clear(): void {
    this.kept.clear();
    this.byBase.clear();
  }
}

/** Resolutions kept at most (a walk over very many distinct import sites starts afresh). */
const MAX_KEPT = 500_000;

/** The `tryFile` bases whose outcome depends on whether `q` exists. */
export function probingBases(q: string): string[] {
  const out = [q];
  for (const e of EXTENSIONS) if (q.endsWith(e)) out.push(q.slice(0, -e.length));
  for (const [js, tss] of Object.entries(JS_TO_TS)) for (const t of tss) if (q.endsWith(t)) out.push(q.slice(0, -t.length) + js);
  const slash = q.lastIndexOf('/');
  const name = q.slice(slash + 1);
  if (EXTENSIONS.some((e) => name === `index${e}`)) out.push(slash < 0 ? '' : q.slice(0, slash));
  return out;
}

/** Resolves import specifiers of the project's files against one commit's paths. */
export class ModuleResolver {
  private readonly memo = new Map<string, Resolved>();
  /** While a resolution for `shared` is worked out: what it depends on. */
  private probes: KeptResolution | null = null;

  /**
   * `packages` gives the repository's own packages of a name (a bare specifier naming one resolves
   * into its sources); `usedPackage` is told of each package a resolution went into.
   */
  constructor(
    private readonly has: (p: string) => boolean,
    private readonly tsconfigOf: (file: string) => TsconfigView | undefined,
    private readonly workspace?: {
      packages: (name: string) => readonly WorkspacePackage[] | undefined;
      hasDir: (d: string) => boolean;
      usedPackage?: (pkg: WorkspacePackage) => void;
    },
    /** Resolutions kept from earlier commits (`ResolutionMemo`); its `begin` was called for this commit. */
    private readonly shared?: ResolutionMemo,
  ) {}

  /**
   * The source file a package's entry or subpath stands for: compiled output (`dist/index.js`,
   * `lib/x.d.ts`) mapped back to the sources through the package's tsconfig `outDir` / `rootDir`
   * (as data source globs are), else `src/` for an output directory no tsconfig names; then the
   * usual extension and index rules.
   */
  private packageFile(pkg: WorkspacePackage, sub: string): string | undefined {
    const ws = this.workspace!;
    if (this.probes) this.probes.usesDirs = true;
    const targets = sub ? subpathTargets(pkg, sub) : [...pkg.entries, 'index'];
    const ts = this.tsconfigOf(pkg.file);
    for (const t of targets) {
      const base = joinRepo(pkg.dir, t.replace(/\.d\.([cm]?)ts$/, '.$1js'));
      if (base === null) continue;
      let view = ts;
      const first = base.slice(pkg.dir ? pkg.dir.length + 1 : 0).split('/')[0]!;
      if (ts?.outDir === undefined && OUTPUT_DIRS.has(first) && base.includes('/')) view = { files: [], strictNullChecks: false, ...ts, outDir: pkg.dir ? `${pkg.dir}/${first}` : first };
      // without a rootDir, TypeScript's is the inputs' common directory: src/ (dist/index.js), or
      // the package's own (a build with --rootDir ./ gives dist/src/index.js)
      const views = view?.outDir !== undefined && view.rootDir === undefined ? [view, { ...view, rootDir: pkg.dir }] : [view];
      const globs = views.flatMap((v) => sourceGlobs(base, v, ws.hasDir, pkg.dir).slice(1));
      // the sources first, the path as written last
      for (const g of [...globs, base]) {
        const found = this.tryFile(g);
        if (found) return found;
      }
    }
    return undefined;
  }

  private tryFile(base: string): string | undefined {
    this.probes?.bases.push(base);
    const ext = posix.extname(base);
    if (ext && this.has(base) && SOURCE_FILE.test(base)) return base;
    const ts = JS_TO_TS[ext];
    if (ts) {
      const stem = base.slice(0, -ext.length);
      for (const e of ts) if (this.has(stem + e)) return stem + e;
    }
    for (const e of EXTENSIONS) if (this.has(base + e)) return base + e;
    for (const e of EXTENSIONS) if (this.has(`${base}/index${e}`)) return `${base}/index${e}`;
    return undefined;
  }

  resolve(from: string, spec: string): Resolved {
    const key = `${posix.dirname(from)}\u0000${spec}`;
    let r = this.memo.get(key);
    if (r) return r;
    const shared = this.shared;
    if (shared) {
      const kept = shared.get(key);
      const pkg = kept?.pkg ? this.workspace?.packages(kept.pkg.name)?.find((p) => p.file === kept.pkg!.file) : undefined;
      if (kept && (!kept.pkg || pkg)) {
        if (pkg) this.workspace!.usedPackage?.(pkg);
        shared.reused++;
        this.memo.set(key, kept.r);
        return kept.r;
      }
      this.probes = { r: { kind: 'external', module: spec }, bases: [], usesDirs: false };
    }
    r = this.resolveUncached(from, spec);
    this.memo.set(key, r);
    if (shared) {
      const e = this.probes!;
      this.probes = null;
      e.r = r;
      shared.resolved++;
      shared.set(key, e);
    }
    return r;
  }

  private used(pkg: WorkspacePackage): void {
    if (this.probes) this.probes.pkg = { name: pkg.name, file: pkg.file };
    this.workspace!.usedPackage?.(pkg);
  }

  private resolveUncached(from: string, spec: string): Resolved {
    if (spec === 'typeorm' || spec.startsWith('typeorm/')) return { kind: 'typeorm', sub: spec.slice('typeorm'.length).replace(/^\//, '') };
    if (spec.startsWith('./') || spec.startsWith('../') || spec === '.' || spec === '..') {
      const base = joinRepo(posix.dirname(from), spec);
      if (base === null) return { kind: 'external', module: spec };
      const found = this.tryFile(base);
      return found ? { kind: 'file', path: found } : { kind: 'missing', path: base };
    }
    const cfg = this.tsconfigOf(from);
    if (cfg?.paths) {
      let matchedAny = false;
      for (const { pattern, targets } of cfg.paths) {
        const star = pattern.indexOf('*');
        let rest: string | null = null;
        if (star < 0) rest = pattern === spec ? '' : null;
        else {
          const pre = pattern.slice(0, star);
          const post = pattern.slice(star + 1);
          if (spec.startsWith(pre) && spec.endsWith(post) && spec.length >= pre.length + post.length) rest = spec.slice(pre.length, spec.length - post.length);
        }
        if (rest === null) continue;
        matchedAny = true;
        for (const t of targets) {
          const cand = t.includes('*') ? t.replace('*', rest) : t;
          const found = this.tryFile(norm(cand));
          if (found) return { kind: 'file', path: found };
        }
      }
      if (matchedAny && !spec.startsWith('@') ) return { kind: 'missing', path: spec };
    }
    if (cfg?.baseUrl !== undefined) {
      const base = joinRepo(cfg.baseUrl, spec);
      if (base !== null) {
        const found = this.tryFile(base);
        if (found) return { kind: 'file', path: found };
      }
    }
    const bare = this.workspace ? splitSpecifier(spec) : null;
    const pkgs = bare ? this.workspace!.packages(bare.name) : undefined;
    if (bare && pkgs && pkgs.length > 0) {
      for (const pkg of pkgs) {
        const found = this.packageFile(pkg, bare.sub);
        if (found) {
          this.used(pkg);
          return { kind: 'file', path: found };
        }
      }
      this.used(pkgs[0]!);
      return { kind: 'missing', path: joinRepo(pkgs[0]!.dir, bare.sub) ?? spec };
    }
    return { kind: 'external', module: spec };
  }
}

/** A glob matcher over repository-relative paths (picomatch, as core uses). */
export function globMatcher(globs: readonly string[]): (p: string) => boolean {
  if (globs.length === 0) return () => false;
  return picomatch(globs as string[], { dot: true });
}
