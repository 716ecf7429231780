import { posix } from 'node:path';
import { BlobMemo, detach, isOwnPackageJson, type Located, type LocateRequest, type TreeView } from '@schema-strata/core/extract';
import { ENTITY_DECORATORS, readSettings, TYPEORM_DECORATORS } from './typeorm-config.js';
import {
  extendsTarget, globMatcher, isDeclarationFile, isTestPath, ModuleResolver, nearestTsconfig, packagesByName, parsePackageJson, ResolutionMemo, sourceGlobs, SOURCE_FILE, tsconfigView,
  workspacePackage, type PackageFact, type TsconfigView, type WorkspacePackage,
} from './typeorm-modules.js';

export { sourceGlobs };
import { isOrmconfigPath, isTsconfigPath, parseTypeormFile, type ConfigFact, type TsconfigFact, type TypeormFileFacts, type Value } from './typeorm-parse.js';

/** Paths that can matter to locating or reading TypeORM entities. */
export const TYPEORM_WATCH = [
  '**/*.ts', '**/*.tsx', '**/*.mts', '**/*.cts', '**/*.js', '**/*.jsx', '**/*.mjs', '**/*.cjs',
  '**/tsconfig*.json', '**/ormconfig.*', '**/.env', '**/package.json',
];

export const SEARCHED =
  'TypeORM data source options (new DataSource, createConnection, TypeOrmModule.forRoot, ormconfig.*) and their `entities`, else every file with an @Entity, @ChildEntity, @ViewEntity class or an EntitySchema';

const TS_SOURCE = /\.(tsx?|mts|cts)$/;

/** What the locate step needs of one source file, found by a cheap text scan (no syntax tree). */
interface Scan {
  /** Declares an entity (an entity decorator or an EntitySchema, in a file that imports TypeORM). */
  entity: boolean;
  /** Imports TypeORM's decorators (a base class, an embedded class, custom decorators): its own imports are followed in full. */
  typeorm: boolean;
  /** May hold data source options. */
  config: boolean;
  imports: string[];
  /** The specifiers of re-exports (`export * from`, `export { A } from`): following a barrel is no step. */
  reexports: string[];
}

const DECORATOR_NAMES = new Set(TYPEORM_DECORATORS as readonly string[]);
const TYPEORM_IMPORT_RE = /import\s+(?:type\s+)?([^;]*?)\s*from\s*['"]typeorm(?:\/[^'"]*)?['"]|(?:const|let|var)\s*\{([^}]*)\}\s*=\s*require\(\s*['"]typeorm['"]\s*\)/g;

/** Whether a file imports any of TypeORM's decorators (a repository or a service importing `Repository` does not). */
function importsDecorators(text: string): boolean {
  for (const m of text.matchAll(TYPEORM_IMPORT_RE)) {
    const clause = m[1] ?? m[2] ?? '';
    if (/\*\s*as\s/.test(clause) || (m[1] !== undefined && !clause.includes('{'))) return true;
    const inner = clause.slice(clause.indexOf('{') + 1, clause.lastIndexOf('}') < 0 ? undefined : clause.lastIndexOf('}'));
    for (const part of inner.split(',')) {
      const name = part.trim().replace(/^type\s+/, '').split(/\s+as\s+|\s*:\s*/)[0]!.trim();
      if (DECORATOR_NAMES.has(name)) return true;
    }
  }
  return false;
}

const IMPORT_RE = /(?:^|[^.\w$])(?:import|export)\s*(?:type\s+)?(?:[\w$*{}\s,]*?\s*from\s*)?['"]([^'"\n]+)['"]/g;
const REQUIRE_RE = /\b(?:require|import)\s*\(\s*['"]([^'"\n]+)['"]\s*\)/g;
const TYPEORM_RE = /['"]typeorm(?:\/[^'"]*)?['"]/;
const REEXPORT_RE = /(?:^|[^.\w$])export\s*(?:type\s+)?(?:\*(?:\s*as\s+[\w$]+)?|\{[^}]*\})\s*from\s*['"]([^'"\n]+)['"]/g;

function scanText(text: string, entityDecorators: readonly string[]): Scan {
  const imports = new Set<string>();
  for (const m of text.matchAll(IMPORT_RE)) imports.add(m[1]!);
  for (const m of text.matchAll(REQUIRE_RE)) imports.add(m[1]!);
  const fromTypeorm = TYPEORM_RE.test(text);
  const typeorm = fromTypeorm && importsDecorators(text);
  let entity = fromTypeorm && (/@\s*(?:[\w$]+\.)*(?:Entity|ChildEntity|ViewEntity)\s*\(/.test(text) || /\bEntitySchema\b/.test(text));
  if (!entity) for (const d of entityDecorators) if (text.includes(`@${d}`)) entity = true;
  // (a quoted key too: `"entities": [...]`)
  const config = /\bentities["'`]?\s*:/.test(text) || /\bautoLoadEntities\b/.test(text);
  const reexports = new Set<string>();
  for (const m of text.matchAll(REEXPORT_RE)) reexports.add(m[1]!);
  // (copies: a match is a slice that would keep the whole text alive as long as the scan is memoised)
  return { entity, typeorm, config, ...detach({ imports: [...imports], reexports: [...reexports] }) };
}

const scanMemo = new Map<string, Map<string, Scan>>();
const factsMemo = new BlobMemo<TypeormFileFacts | null>();
const tsconfigMemo = new BlobMemo<TsconfigFact | null>();
const packageMemo = new BlobMemo<PackageFact | null>();


/** What a path is, by its name alone (see `kindOf`). */
const K_SOURCE = 1; // a source file, not a declaration file
const K_TS = 2; // a TypeScript source (`TS_SOURCE`)
const K_TEST = 4;
const K_ORMCONFIG = 8;
const K_TSCONFIG = 16;
const K_PACKAGE = 32;
const pathKinds = new Map<string, number>();

/**
 * The kind of a path (`K_*` bits), worked out once per path for the run: a full locate tests
 * every path of the tree against several patterns, and consecutive commits share nearly all of
 * their paths (on a real monorepo's history of 2,256 full locates the patterns alone took seconds).
 */
function kindOf(p: string): number {
  let bits = pathKinds.get(p);
  if (bits === undefined) {
    bits = 0;
    if (SOURCE_FILE.test(p) && !isDeclarationFile(p)) bits |= K_SOURCE;
    if (TS_SOURCE.test(p)) bits |= K_TS;
    if (isTestPath(p)) bits |= K_TEST;
    if (isOrmconfigPath(p)) bits |= K_ORMCONFIG;
    if (isTsconfigPath(p)) bits |= K_TSCONFIG;
    if (isOwnPackageJson(p)) bits |= K_PACKAGE;
    pathKinds.set(p, bits);
  }
  return bits;
}
const is = (p: string, bit: number): boolean => (kindOf(p) & bit) !== 0;

const parents = new Map<string, string>();
/** `posix.dirname` of a path (a file's or a directory's), once per path for the run. */
function parentDir(p: string): string {
  let d = parents.get(p);
  if (d === undefined) {
    d = posix.dirname(p);
    parents.set(p, d);
  }
  return d;
}


/** Parsed facts of a configuration file (locate reads these few files in full), by blob id. */
async function factsOf(tree: TreeView, path: string): Promise<TypeormFileFacts | undefined> {
  const facts = await factsMemo.of(tree, path, (text, blob) => {
    const r = text === undefined ? undefined : parseTypeormFile({ path, blob, text });
    return r && r.ok ? r.facts : null;
  });
  return facts ?? undefined;
}

async function tsconfigFactOf(tree: TreeView, path: string): Promise<TsconfigFact | undefined> {
  const fact = await tsconfigMemo.of(tree, path, (text, blob) => {
    const r = text === undefined ? undefined : parseTypeormFile({ path, blob, text });
    return r && r.ok && r.facts.tsconfig ? r.facts.tsconfig : null;
  });
  return fact ?? undefined;
}

/** The entity sources a data source's `entities` option names, evaluated statically (paths and class references). */
export interface EntitySelection {
  /** Globs relative to the repository root. */
  globs: string[];
  /** Class or schema references by local name, resolved through the config file's imports. */
  refs: string[];
  /** Something could not be evaluated, or entities are registered elsewhere (autoLoadEntities). */
  open: boolean;
}

/** The directory TypeORM resolves a configuration's relative paths against: the nearest package root. */
export function projectDirOf(file: string, has: (p: string) => boolean): { dir: string; consulted?: string } {
  let dir = posix.dirname(file);
  for (;;) {
    const d = dir === '.' ? '' : dir;
    const pkg = d ? `${d}/package.json` : 'package.json';
    if (has(pkg)) return { dir: d, consulted: pkg };
    if (!d) return { dir: '' };
    dir = posix.dirname(d);
  }
}

/** Globs of one `entities` path, relative to the repository root (`/`-prefixed paths are already so, from __dirname). */
export function entityGlobs(item: string, projectDir: string, ts: TsconfigView | undefined, hasDir: (d: string) => boolean): string[] {
  const abs = item.startsWith('/') ? posix.normalize(item).slice(1) : posix.normalize(posix.join(projectDir || '.', item)).replace(/^\.\//, '');
  if (abs.startsWith('..')) return [];
  const glob = /[*?{[]/.test(abs) ? abs : abs.replace(/\/$/, '') + (SOURCE_FILE.test(abs) ? '' : '/**/*');
  return sourceGlobs(glob === '.' ? '**/*' : glob, ts, hasDir, projectDir);
}

type Light = string | Light[] | { ref: string } | null;

/** Evaluate an `entities` value as far as paths and class names go; null for anything else. */
function lightEval(v: Value, dir: string, consts: Map<string, Value>, depth = 0): Light {
  if (depth > 8) return null;
  switch (v.k) {
    case 'l':
      return typeof v.v === 'string' ? v.v : null;
    case 'a': {
      const out: Light[] = [];
      for (const e of v.e) {
        if (e.k === 's') {
          const inner = lightEval(e.v, dir, consts, depth + 1);
          if (!Array.isArray(inner)) return null;
          out.push(...inner);
        } else out.push(lightEval(e, dir, consts, depth + 1));
      }
      return out;
    }
    case 'r': {
      if (v.n === '__dirname' || v.n === 'import.meta.dirname') return '/' + dir;
      const c = consts.get(v.n);
      if (c) return lightEval(c, dir, consts, depth + 1);
      if (/^[A-Za-z_$][\w$]*$/.test(v.n)) return { ref: v.n };
      return null;
    }
    case 'b': {
      if (v.o !== '+') return null;
      const l = lightEval(v.l, dir, consts, depth + 1);
      const r = lightEval(v.r, dir, consts, depth + 1);
      return typeof l === 'string' && typeof r === 'string' ? l + r : null;
    }
    case 't': {
      let s = '';
      for (const q of v.q) {
        const x = typeof q === 'string' ? q : lightEval(q, dir, consts, depth + 1);
        if (typeof x !== 'string') return null;
        s += x;
      }
      return s;
    }
    case 'c': {
      const callee = v.c.k === 'r' ? v.c.n : '';
      if (/^(path\.)?(posix\.)?(join|resolve)$/.test(callee)) {
        const parts: string[] = [];
        for (const a of v.a) {
          const x = lightEval(a, dir, consts, depth + 1);
          if (typeof x !== 'string') return null;
          parts.push(x);
        }
        if (callee.endsWith('resolve')) {
          // resolve: the last absolute part starts over
          let at = 0;
          parts.forEach((p, i) => {
            if (p.startsWith('/')) at = i;
          });
          return posix.join(...parts.slice(at));
        }
        return posix.join(...parts);
      }
      return null;
    }
    default:
      return null;
  }
}

/** The entity selection of one configuration (locate's static reading; the assembly resolves further). */
export function selectionOf(cfg: ConfigFact, configPath: string, has: (p: string) => boolean, ts: TsconfigView | undefined, hasDir: (d: string) => boolean, consts: Map<string, Value>): EntitySelection {
  const sel: EntitySelection = { globs: [], refs: [], open: false };
  if (cfg.options.k !== 'o') return { ...sel, open: true };
  const fileDir = posix.dirname(configPath) === '.' ? '' : posix.dirname(configPath);
  const projectDir = cfg.source === 'code' ? projectDirOf(configPath, has).dir : fileDir;
  let entities: Value | undefined;
  for (const [k, v] of cfg.options.p) {
    if (k === 'entities') entities = v;
    if (k === 'autoLoadEntities' && !(v.k === 'l' && v.v === false)) sel.open = true;
    if (k === null) sel.open = true;
  }
  if (!entities) return { ...sel, open: true };
  const got = lightEval(entities, fileDir, consts);
  const list = Array.isArray(got) ? got : got === null ? null : [got];
  if (!list) return { ...sel, open: true };
  for (const item of list) {
    if (typeof item === 'string') sel.globs.push(...entityGlobs(item, projectDir, ts, hasDir)); else if (item && !Array.isArray(item) && 'ref' in item) sel.refs.push(item.ref);
    else sel.open = true;
  }
  return sel;
}

const sameScan = (a: Scan, b: Scan): boolean =>
  a.entity === b.entity && a.typeorm === b.typeorm && !a.config && !b.config && a.imports.length === b.imports.length && a.imports.every((x, i) => x === b.imports[i]) &&
  a.reexports.length === b.reexports.length && a.reexports.every((x, i) => x === b.reexports[i]);

/** The previous commit's answer: most commits change files in ways that do not change which files are read. */
let last: { sig: string; paths: readonly string[]; blobs: Map<string, string>; result: Located } | undefined;

/** A fact as text, once per fact object (facts are kept per blob). */
const factTexts = new WeakMap<object, string>();
function factText(f: object | undefined): string {
  if (!f) return '';
  let t = factTexts.get(f);
  if (t === undefined) factTexts.set(f, (t = JSON.stringify(f)));
  return t;
}

/** Import resolutions kept from commit to commit of a walk (see `ResolutionMemo`; its counters serve tests). */
export const importResolutions = new ResolutionMemo();

/**
 * Locate the entity files of one commit, the files they follow (base classes, embedded classes,
 * enums, constants, custom decorators, barrels), the data source configuration and the tsconfig
 * files that govern them. When the paths are those of the previous commit and every changed file
 * still declares and imports the same (by the scan of its text), the previous answer stands.
 */
export async function locateTypeorm(tree: TreeView, req: LocateRequest): Promise<Located> {
  const sig = JSON.stringify(req.options) + '\u0000' + (req.paths ? req.paths.join('\u0001') : '\u0002');
  importResolutions.note(tree.walk);
  const all = tree.paths();
  const paths = Array.isArray(all) ? (all as string[]) : [...all];
  if (last && last.sig === sig && last.paths.length === paths.length && paths.every((p, i) => p === last!.paths[i])) {
    // the next commits' changed source files will be scanned here too: ask for them now
    tree.walk?.readAhead?.((p) => SOURCE_FILE.test(p) && !p.includes('node_modules/'));
    const changed: Array<[string, string]> = [];
    let same = true;
    for (const p of paths) {
      const b = tree.blob(p)!;
      const old = last.blobs.get(p)!;
      if (b === old) continue;
      changed.push([p, b]);
      const scans = scanMemo.get(entityDecoratorSig(req))!;
      const before = scans?.get(old);
      if (!before || isOrmconfigPath(p) || isTsconfigPath(p) || !SOURCE_FILE.test(p) || p.endsWith('package.json')) {
        same = false;
        break;
      }
      let now = scans.get(b);
      if (!now) {
        const text = await tree.read(p);
        now = text === undefined ? undefined : scanText(text, entityDecorators(req));
        if (now) scans.set(b, now);
      }
      if (!now || !sameScan(before, now)) {
        same = false;
        break;
      }
    }
    if (same) {
      for (const [p, b] of changed) last.blobs.set(p, b);
      return last.result;
    }
  }
  const result = await locateFull(tree, req);
  last = { sig, paths: paths.slice(), blobs: new Map(paths.map((p) => [p, tree.blob(p)!])), result };
  return result;
}

function entityDecorators(req: LocateRequest): string[] {
  const settings = readSettings(req.options);
  return [...settings.decorators].filter(([, t]) => ENTITY_DECORATORS.has(t)).map(([n]) => n);
}

const entityDecoratorSig = (req: LocateRequest): string => entityDecorators(req).join(',');

async function locateFull(tree: TreeView, req: LocateRequest): Promise<Located> {
  const decorators = entityDecorators(req);
  const sig = decorators.join(',');
  let memo = scanMemo.get(sig);
  if (!memo) scanMemo.set(sig, (memo = new Map()));
  const scans = memo;
  const has = (p: string): boolean => tree.has(p);
  const all = tree.paths() as string[];
  const allList = Array.isArray(all) ? all : [...all];

  const scanRead = async (p: string, blob: string): Promise<Scan> => {
    const text = await tree.read(p);
    const s = text === undefined ? { entity: false, typeorm: false, config: false, imports: [], reexports: [] } : scanText(text, decorators);
    scans.set(blob, s);
    return s;
  };
  // the scan of a blob seen before is handed back as it is, not through a promise: a full locate
  // asks for every source file's scan, and an `await` per file cost a tick per file
  const scanOf = (p: string): Scan | undefined | Promise<Scan | undefined> => {
    const blob = tree.blob(p);
    if (!blob) return undefined;
    return scans.get(blob) ?? scanRead(p, blob);
  };
  const scanNow = async (p: string): Promise<Scan | undefined> => scanOf(p);
  /** A flag of a file's scan: at once for a blob scanned before, else once its text is read. */
  const flagOf = (p: string, key: 'entity' | 'config'): boolean | Promise<boolean> => {
    const s = scanOf(p);
    return s instanceof Promise ? s.then((x) => x?.[key] ?? false) : (s?.[key] ?? false);
  };

  // tsconfig views, per tsconfig path, for this commit
  const tsViews = new Map<string, TsconfigView>();
  const tsFacts = new Map<string, TsconfigFact | undefined>();
  const nearest = new Map<string, string | undefined>();
  const tsconfigFor = (file: string): TsconfigView | undefined => {
    const dir = posix.dirname(file);
    let p = nearest.get(dir);
    if (!nearest.has(dir)) {
      p = nearestTsconfig(file, has);
      nearest.set(dir, p);
    }
    if (!p) return undefined;
    let v = tsViews.get(p);
    if (!v) {
      v = tsconfigView(p, (q) => tsFacts.get(q), has);
      tsViews.set(p, v);
    }
    return v;
  };
  // read every tsconfig of the tree first (they are few and small), so that views are synchronous
  for (const p of allList) if (is(p, K_TSCONFIG)) tsFacts.set(p, await tsconfigFactOf(tree, p));
  const dirs = new Set<string>();
  for (const p of allList) {
    let d = parentDir(p);
    while (d !== '.' && !dirs.has(d)) {
      dirs.add(d);
      d = parentDir(d);
    }
  }
  const hasDir = (d: string): boolean => d === '' || dirs.has(d);
  // the repository's own packages (every package.json of the tree, node_modules aside): a bare
  // specifier naming one resolves into its sources
  const packages: WorkspacePackage[] = [];
  for (const p of allList) {
    if (!is(p, K_PACKAGE)) continue;
    const fact = await packageMemo.of(tree, p, (text) => (text === undefined ? null : parsePackageJson(text)));
    if (fact) packages.push(workspacePackage(p, fact));
  }
  const byName = packagesByName(packages);
  const usedPackages = new Set<WorkspacePackage>();
  // what every resolution depends on beyond the paths it tests: what the tsconfig and package.json
  // files say (a release that bumps every package's version changes none of it)
  let context = '';
  // (and which file each relative `extends` names: a path no tsconfig name need match)
  for (const [p, f] of tsFacts) {
    context += `${p}\u0000${factText(f)}`;
    for (const e of f?.extends ?? []) if (e.startsWith('.') || e.startsWith('/')) context += `\u0000${extendsTarget(p, e, has) ?? ''}`;
    context += '\u0001';
  }
  for (const pkg of packages) context += `${pkg.file}\u0000${factText(pkg)}\u0001`;
  importResolutions.begin(context, dirs);
  const resolver = new ModuleResolver(has, tsconfigFor, { packages: (n) => byName.get(n), hasDir, usedPackage: (pkg) => usedPackages.add(pkg) }, importResolutions);

  const consulted = new Set<string>();
  const configFiles = new Set<string>();
  // with --path: data source files among the selected ones, handed over as consulted files (the
  // assembly reads them; the entities they list outside the selection are neither followed nor missing)
  const consultedConfigs = new Set<string>();
  let roots: string[] = [];
  const sourceOf = (p: string): boolean => is(p, K_SOURCE);

  if (req.paths) {
    for (const p of req.paths) {
      if (!sourceOf(p)) continue;
      const scan = await scanNow(p);
      if (scan?.entity) roots.push(p);
      // a data source among the selected files gives the database type and the naming, and which
      // of the selected entities TypeORM registers
      else if (scan?.config && !is(p, K_TEST) && ((await factsOf(tree, p))?.configs.length ?? 0) > 0) {
        configFiles.add(p);
        consultedConfigs.add(p);
      }
    }
  } else {
    // data source configurations
    const selections: EntitySelection[] = [];
    const candidates: string[] = [];
    for (const p of allList) {
      if (is(p, K_ORMCONFIG)) candidates.push(p);
      else if (sourceOf(p)) {
        let c = flagOf(p, 'config');
        if (c instanceof Promise) c = await c;
        if (c) candidates.push(p);
      }
    }
    for (const p of candidates) {
      const facts = await factsOf(tree, p);
      if (!facts || facts.configs.length === 0) continue;
      configFiles.add(p);
      const consts = new Map<string, Value>(facts.consts.map((c) => [c.name, c.value]));
      const pd = projectDirOf(p, has);
      if (pd.consulted) consulted.add(pd.consulted);
      for (const cfg of facts.configs) {
        if (cfg.settingsOnly) continue;
        const sel = selectionOf(cfg, p, has, tsconfigFor(p), hasDir, consts);
        // class references: the files their imports name
        for (const ref of sel.refs) {
          const imp = facts.imports.find((i) => i.names.some(([local]) => local === ref) || i.def === ref);
          if (imp) {
            const res = resolver.resolve(p, imp.from);
            if (res.kind === 'file') sel.globs.push(res.path);
            else sel.open = true;
          } else if (facts.classes.some((c) => c.name === ref) || facts.schemas.some((s) => s.name === ref)) sel.globs.push(p);
          else sel.open = true;
        }
        selections.push(sel);
      }
    }
    /** The paths of the tree that `keep` accepts and whose scan finds an entity, in tree order. */
    const entitiesAmong = async (keep: (p: string) => boolean): Promise<string[]> => {
      const out: string[] = [];
      for (const p of allList) {
        if (!keep(p)) continue;
        let e = flagOf(p, 'entity');
        if (e instanceof Promise) e = await e;
        if (e) out.push(p);
      }
      return out;
    };
    const open = selections.length === 0 || selections.some((s) => s.open);
    if (!open) {
      const match = globMatcher(selections.flatMap((s) => s.globs));
      roots = await entitiesAmong((p) => sourceOf(p) && match(p));
    }
    if (open || roots.length === 0) {
      // TypeScript sources that are not declaration files, outside test code; failing those, the other sources
      const kinds = K_SOURCE | K_TS | K_TEST;
      roots = await entitiesAmong((p) => (kindOf(p) & kinds) === (K_SOURCE | K_TS));
      if (roots.length === 0) roots = await entitiesAmong((p) => (kindOf(p) & kinds) === K_SOURCE);
    }
  }
  if (roots.length === 0) return { files: [], searched: SEARCHED };

  // follow imports: in full from files that use TypeORM, two steps from other files
  const included = new Set<string>(roots);
  const queue: Array<{ path: string; depth: number }> = roots.map((path) => ({ path, depth: 0 }));
  // the fewest steps each file was reached in: a file reached again in fewer (a barrel that a
  // configuration file imports, and an entity too) is followed again from there
  const steps = new Map<string, number>(roots.map((path) => [path, 0]));
  const reach = (path: string, depth: number): void => {
    const before = steps.get(path);
    if (before !== undefined && before <= depth) return;
    steps.set(path, depth);
    included.add(path);
    queue.push({ path, depth });
  };
  // a configuration file's own imports are read only for the names its options use (a naming strategy class, a list of entities)
  for (const c of configFiles) {
    if (!sourceOf(c)) continue;
    const facts = await factsOf(tree, c);
    if (!facts) continue;
    const used = new Set<string>();
    const collect = (v: unknown): void => {
      if (Array.isArray(v)) {
        for (const x of v) collect(x);
        return;
      }
      if (!v || typeof v !== 'object') return;
      const val = v as Value;
      if (val.k === 'r') used.add(val.n.split('.')[0]!);
      for (const x of Object.values(val)) if (x && typeof x === 'object') collect(x);
    };
    // (with --path, only what the naming strategy uses: the entities are among the selection)
    for (const cfg of facts.configs) collect(req.paths ? namingStrategyOf(cfg.options) : cfg.options);
    for (const k of facts.consts) if (used.has(k.name)) collect(k.value);
    for (const imp of facts.imports) {
      const names = [...imp.names.map(([local]) => local), ...(imp.def ? [imp.def] : []), ...(imp.ns ? [imp.ns] : [])];
      if (!names.some((n) => used.has(n))) continue;
      const r = resolver.resolve(c, imp.from);
      if (r.kind === 'file') reach(r.path, 2);
    }
  }
  while (queue.length > 0) {
    const { path, depth } = queue.shift()!;
    const scan = await scanNow(path);
    if (!scan) continue;
    const aware = scan.typeorm || scan.entity;
    const next = aware ? 1 : depth + 1;
    // entity files and files using TypeORM's decorators are followed in full; two steps from
    // others, where a re-export (a barrel, a package's index) is no step
    for (const spec of scan.imports) {
      const again = !aware && scan.reexports.includes(spec);
      if (!aware && depth >= 2 && !again) continue;
      const r = resolver.resolve(path, spec);
      if (r.kind === 'file') reach(r.path, again ? depth : next);
    }
  }
  for (const c of configFiles) {
    if (consultedConfigs.has(c)) consulted.add(c);
    else included.add(c);
  }
  // a package that imports were resolved into: its package.json is consulted (the assembly
  // resolves the same imports from it: core hands it the facts of the consulted files, see
  // `readsConsulted`), and the tsconfig files that map its compiled output to its sources are read
  for (const pkg of usedPackages) {
    consulted.add(pkg.file);
    const v = tsconfigFor(pkg.file);
    if (v) for (const f of v.files) included.add(f);
  }
  for (const p of [...included]) {
    if (!sourceOf(p)) continue;
    const v = tsconfigFor(p);
    if (v) for (const f of v.files) included.add(f);
  }
  return { files: [...included].sort(), consulted: [...consulted].sort(), searched: SEARCHED };
}

/** The `namingStrategy` of an options object, as facts (undefined when it has none or is not an object). */
function namingStrategyOf(options: Value): Value | undefined {
  return options.k === 'o' ? options.p.find(([k]) => k === 'namingStrategy')?.[1] : undefined;
}
