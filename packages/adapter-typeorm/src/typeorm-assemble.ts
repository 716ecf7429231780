import { posix } from 'node:path';
import type {
  AdapterOptionValues, AssembleInput, AssembleResult, Column, Diagnostic, ForeignKey, GeneratedKind, Origin, ReferentialAction,
  SnapshotInput, UniqueConstraint,
} from '@schema-strata/core/extract';
import { ENTITY_DECORATORS, readSettings, type TypeormSettings } from './typeorm-config.js';
import {
  classKey, DecoratorReader, schemaKey,
  type ColumnArgs, type ColumnOpts, type EmbeddedArgs, type JoinColumnOpts, type RelationArgs, type TargetArgs, type UniqueArgs,
} from './typeorm-decorators.js';
import {
  exportSignature, get, isArrE, isFnE, isObjE, isSymE, isUnk, Project, str, symName, textOf, type E, type Sym, type Tracked, type VersionDelta,
} from './typeorm-evaluate.js';
import { globMatcher, isTestPath, packagesByName, workspacePackage, type WorkspacePackage } from './typeorm-modules.js';
import { namingRules, shorten, type NamingRules } from './typeorm-naming.js';
import { entityGlobs } from './typeorm-locate.js';
import type { ClassFact, ConfigFact, TypeormFileFacts } from './typeorm-parse.js';
import {
  DATA_SOURCE_TYPES, driverFamily, isSupportedType, mappedTypes, nativeTypeText, neutralType, normalizeType,
  type ColumnTypeRef, type DriverFamily, type MappedTypes,
} from './typeorm-types.js';

/**
 * The assembly of one version: from the facts of its files, the tables TypeORM would create.
 * Follows TypeORM's own EntityMetadataBuilder step by step (entities, inherited and embedded
 * columns, single-table inheritance, relations and their join columns, junction tables of
 * many-to-many relations, closure tables, generated columns, unique constraints, foreign keys),
 * with the naming strategy and driver type rules of the data source.
 */

type TableInput = SnapshotInput['tables'][number];

interface DataSourceInfo {
  family: DriverFamily;
  type?: string;
  naming: NamingRules;
  entityPrefix: string;
  schema?: string;
  /** Entity selection: undefined when every entity class counts. */
  select?: { match: (path: string) => boolean; keys: Set<string> };
}

interface ColMeta {
  target: string;
  propertyName: string;
  propertyPath: string;
  mode: ColumnArgs['mode'] | 'virtual';
  givenName?: string;
  type?: ColumnTypeRef;
  length: string;
  precision?: number | null;
  scale?: number;
  nullable: boolean;
  primary: boolean;
  default?: { v: E };
  enumValues?: Array<string | number>;
  enumName?: string;
  isArray: boolean;
  generated?: string;
  /** The type the generation strategy gives (applied last, after foreign keys copied the declared type). */
  generatedType?: ColumnTypeRef;
  computed?: boolean;
  prefixes: string[];
  databaseName: string;
  databaseNameWithoutPrefixes: string;
  origin: Origin;
  referenced?: ColMeta;
  design?: ColumnArgs['design'];
  isDiscriminator?: boolean;
  embedded?: EmbMeta;
}

interface EmbMeta {
  propertyName: string;
  propertyPath: string;
  prefixes: string[];
  columns: ColMeta[];
  relations: RelMeta[];
  uniques: UniqueArgs[];
  /** Target keys of the embedded class's inheritance tree. */
  targets: string[];
}

interface RelMeta {
  args: RelationArgs;
  propertyName: string;
  propertyPath: string;
  relationType: RelationArgs['relationType'];
  type: E;
  entity: EntMeta;
  embedded?: EmbMeta;
  inverse?: EntMeta;
  joinColumns: ColMeta[];
}

interface EntMeta {
  key: string;
  targetName: string;
  args: TargetArgs;
  kind: 'regular' | 'view' | 'entity-child' | 'junction' | 'closure-junction';
  givenTableName?: string;
  tableNameWithoutPrefix: string;
  tableName: string;
  schema?: string;
  database?: string;
  /** Keys of the inheritance tree, the class itself first, then its ancestors (then STI children). */
  tree: string[];
  sti?: boolean;
  parent?: EntMeta;
  ownColumns: ColMeta[];
  embeddeds: EmbMeta[];
  relations: RelMeta[];
  uniques: Array<{ name?: string; columns: ColMeta[] }>;
  foreignKeys: ForeignKey[];
  /** Join and closure tables this entity's relations and tree create. */
  junctions: EntMeta[];
  origin: Origin;
  /** What relating entities take from it, as built by phase A (see `signature`). */
  sigA?: string;
  /** Its primary key includes a join column of its own relations (typed by what they reference). */
  keyedByRelation?: boolean;
  /** Its part of the entity set's fingerprint. */
  setSig?: string;
  /** Diagnostics of its ancestors' reading, of its phase A, and of its whole build (phase B, with A's). */
  ancDiags?: DiagList;
  phaseADiags?: DiagList;
  resultDiags?: DiagList;
  /** Its tables, once built. */
  tables?: TableInput[];
  /** The ids of the tables of the entity it replaced (to tell whether duplicate tables can have changed). */
  prevIds?: string;
}

type DiagList = Array<[string, Diagnostic]>;
const NO_DIAGS: DiagList = [];
const NO_KEYS: ReadonlySet<string> = new Set();

interface Candidate {
  a: TargetArgs;
  schemaFactKey?: string;
}

/** What the collection of a version found (see `collectEntities`), aligned lists. */
interface Collected {
  /** Files that declare classes or schemas, in path order, and their candidates. */
  files: string[];
  lists: Array<Tracked<Candidate[]>>;
  /** Every candidate, in order; its entity meta (when selected and relational) or its MongoDB diagnostic. */
  cands: Candidate[];
  candEnts: Array<EntMeta | undefined>;
  candMongo: Array<DiagList | undefined>;
  /** Diagnostics of single-table inheritance and of duplicate tables. */
  structure: DiagList;
}

/**
 * A version's entity set and the parts of its output, kept for the next version: when that
 * version's changes leave the set as it is (the same candidates, names and inheritance), it
 * patches the frame in place instead of collecting again.
 */
interface Frame extends Collected {
  fileAt: Map<string, number>;
  /** Candidate position by key; undefined when two candidates share a key (then nothing is patched). */
  candAt?: Map<string, number>;
  /** Entity metas that are not built (views, single-table children, duplicates): their ancestors are checked at every version. */
  unbuilt: EntMeta[];
  /** Keys of the entities of a duplicate-table pair. */
  dupKeys: Set<string>;
  dedupe: DiagList;
  views: NonNullable<SnapshotInput['views']>;
}

const tableIds = (tables: readonly TableInput[] | undefined): string => (tables ?? []).map((x) => (x.namespace ? `${x.namespace}.${x.name}` : x.name)).join('\u0000');
const setSigOf = (e: EntMeta): string => JSON.stringify([e.key, e.kind, e.targetName, e.tableName, e.schema, e.database, e.parent?.key, e.sti, e.args.tree?.type]);

const ACTIONS: Record<string, ReferentialAction> = {
  CASCADE: 'cascade', RESTRICT: 'restrict', 'NO ACTION': 'no action', 'SET NULL': 'set null', 'SET DEFAULT': 'set default', DEFAULT: 'set default',
};

function action(s: string | undefined, project: Project, origin?: Origin): ReferentialAction {
  if (!s) return 'no action';
  const a = ACTIONS[s.toUpperCase()];
  if (a) return a;
  project.report(`act\u0000${origin?.file}\u0000${origin?.line}\u0000${s}`, {
    severity: 'warning', code: 'typeorm/unknown-action', ...(origin ? { file: origin.file, line: origin.line } : {}),
    message: `referential action ${s} is not one TypeORM knows; recorded as no action`,
  });
  return 'no action';
}

/** What one run's assembly keeps from version to version, each result with the files it read. */
export class AssemblyCache {
  /** Fingerprint of what every result depends on (options, paths, configurations, tsconfig files, the entity set). */
  global = '';
  entitySet = '';
  readonly classArgs = new Map<string, Tracked<TargetArgs | undefined>>();
  readonly isEntity = new Map<string, Tracked<boolean>>();
  readonly ancestors = new Map<string, Tracked<string[]>>();
  readonly schemas = new Map<string, Tracked<TargetArgs | undefined>>();
  readonly entities = new Map<string, { ent: EntMeta; result: Tracked<TableInput[]>; targets: Map<string, string> }>();
  /** Target key to the entities whose stored tables used it (the keys of their `targets`). */
  readonly targetUsers = new Map<string, Set<string>>();
  /** Entity classes and schemas each file declares (with their arguments). */
  readonly fileCandidates = new Map<string, Tracked<Candidate[]>>();
  readonly classByKey = new Map<string, { file: string; cls: ClassFact }>();
  sortedPaths: string[] = [];
  configFiles: string[] = [];
  /** Inverse dependency indexes: a path (or `exp:` path) to the files whose candidates, and the entities whose tables, read it. */
  readonly candidateIndex = new Map<string, Set<string>>();
  readonly entityIndex = new Map<string, Set<string>>();
  /** This version's: files whose candidates and entities whose tables may have changed (every result not in them holds). */
  dirtyFiles: Set<string> | null = null;
  dirtyEntities: Set<string> | null = null;

  /** Index a result under the paths it read, in place of the result it replaces. */
  index(map: Map<string, Set<string>>, t: Tracked<unknown>, key: string, replaced?: Tracked<unknown>): void {
    if (replaced) for (const d of replaced.deps.keys()) if (!t.deps.has(d)) map.get(d)?.delete(key);
    for (const d of t.deps.keys()) {
      let set = map.get(d);
      if (!set) map.set(d, (set = new Set()));
      set.add(key);
    }
  }

  /** Keep an entity's tables, with the paths they read and the targets they used. */
  setEntity(ent: EntMeta, result: Tracked<TableInput[]>, targets: Map<string, string>): void {
    const old = this.entities.get(ent.key);
    this.dropTargets(ent.key, old?.targets);
    this.entities.set(ent.key, { ent, result, targets });
    this.index(this.entityIndex, result, ent.key, old?.result);
    for (const k of targets.keys()) {
      const hash = k.indexOf('\u0001');
      const tk = hash < 0 ? k : k.slice(0, hash);
      let set = this.targetUsers.get(tk);
      if (!set) this.targetUsers.set(tk, (set = new Set()));
      set.add(ent.key);
    }
  }

  dropEntity(key: string): void {
    const old = this.entities.get(key);
    if (!old) return;
    this.dropTargets(key, old.targets);
    this.entities.delete(key);
  }

  private dropTargets(key: string, targets: Map<string, string> | undefined): void {
    for (const k of targets?.keys() ?? []) {
      const hash = k.indexOf('\u0001');
      this.targetUsers.get(hash < 0 ? k : k.slice(0, hash))?.delete(key);
    }
  }

  clearEntities(): void {
    this.entities.clear();
    this.targetUsers.clear();
  }

  /** Mark what the changed paths reach, through the indexes. */
  markDirty(changed: readonly string[], exportsChanged: (p: string) => boolean): void {
    const files = new Set<string>();
    const entities = new Set<string>();
    for (const p of changed) {
      for (const f of this.candidateIndex.get(p) ?? []) files.add(f);
      for (const e of this.entityIndex.get(p) ?? []) entities.add(e);
      if (exportsChanged(p)) {
        for (const f of this.candidateIndex.get(`exp:${p}`) ?? []) files.add(f);
        for (const e of this.entityIndex.get(`exp:${p}`) ?? []) entities.add(e);
      }
      files.add(p);
    }
    this.dirtyFiles = files;
    this.dirtyEntities = entities;
  }

  version = 0;

  clear(): void {
    this.targetUsers.clear();
    this.candidateIndex.clear();
    this.entityIndex.clear();
    this.dirtyFiles = null;
    this.dirtyEntities = null;
    this.fileCandidates.clear();
    this.classArgs.clear();
    this.isEntity.clear();
    this.ancestors.clear();
    this.schemas.clear();
    this.entities.clear();
  }
}

class Builder {
  readonly project: Project;
  readonly reader: DecoratorReader;
  readonly diagnostics: Diagnostic[] = [];
  private readonly classByKey: Map<string, { file: string; cls: ClassFact }>;
  ds!: DataSourceInfo;
  mapped!: MappedTypes;
  entities: EntMeta[] = [];
  private readonly entityByKey = new Map<string, EntMeta>();
  /** Position of each entity in `entities` (undefined when two entities share a key). */
  private entAt: Map<string, number> | undefined;
  /** Entities taken over from the previous version in a full collection (their tables are the same objects). */
  readonly reused = new Set<EntMeta>();
  /** The entities built in this version (the others' tables are taken over). */
  private fresh = new Set<EntMeta>();
  private readonly phaseA = new Map<EntMeta, Tracked<void>>();
  private readonly schemaArgs = new Map<string, TargetArgs>();
  private readonly closureMemo = new Map<EntMeta, Tracked<void>>();
  /** The data source, read with what it read (see `readDataSource`). */
  dsResult?: Tracked<{ failed?: Diagnostic }>;

  /** Signatures of the targets the entity in phase B has used so far. */
  private targetsUsed: Map<string, string> | null = null;
  private readonly sigMemo = new Map<EntMeta, string>();

  constructor(
    files: Map<string, TypeormFileFacts>, readonly settings: TypeormSettings, readonly cache: AssemblyCache, delta?: VersionDelta,
    packages?: ReadonlyMap<string, readonly WorkspacePackage[]>,
    /** Data source files the locate step consulted (under --path): the entities they list that are not selected are not missing. */
    private readonly consultedDataSources: ReadonlySet<string> = new Set(),
  ) {
    this.project = new Project(files, delta, packages, settings.assume);
    this.reader = new DecoratorReader(this.project, settings);
    this.classByKey = cache.classByKey;
  }

  /** Move to the next version (the builder lives as long as the paths and configuration files stay the same). */
  advance(files: Map<string, TypeormFileFacts>, delta: VersionDelta): void {
    this.project.advance(files, delta);
  }

  /** Read the data source options of the configuration files (tracked: read again only when what they read changes). */
  readDataSourceTracked(files: Map<string, TypeormFileFacts>, configFiles: readonly string[]): Tracked<{ failed?: Diagnostic }> {
    this.diagnostics.length = 0;
    const t = this.project.track(() => {
      for (const p of configFiles) this.project.touch(p);
      return this.readDataSource(files, configFiles.filter((p) => files.get(p)!.configs.length > 0));
    });
    this.dsResult = t;
    return t;
  }

  strictOf(file: string): boolean {
    return this.project.tsconfigFor(file)?.strictNullChecks ?? false;
  }

  /** A tracked result from a cache of the run, computed again when a file it read changed. */
  private cached<T>(map: Map<string, Tracked<T>>, key: string, compute: () => T): T {
    const hit = map.get(key);
    if (hit && this.project.valid(hit)) {
      this.project.replay(hit);
      return hit.value;
    }
    const t = this.project.track(compute);
    map.set(key, t);
    return t.value;
  }

  private classOf(key: string): { file: string; cls: ClassFact } | undefined {
    const c = this.classByKey.get(key);
    if (c) this.project.touch(c.file);
    return c;
  }

  args(key: string): TargetArgs | undefined {
    const schema = this.schemaArgs.get(key);
    if (schema) return schema;
    return this.cached(this.cache.classArgs, key, () => {
      const c = this.classOf(key);
      return c ? this.reader.readClass(c.file, c.cls, this.strictOf(c.file)) : undefined;
    });
  }

  /** Ancestors of a class (nearest first), followed through imports; cycles and unfollowable bases are reported. */
  ancestors(key: string): string[] {
    return this.cached(this.cache.ancestors, key, () => this.ancestorsUncached(key));
  }

  private ancestorsUncached(key: string): string[] {
    const out: string[] = [];
    const seen = new Set<string>([key]);
    let cur = this.classOf(key);
    while (cur && cur.cls.base) {
      const e = this.project.eval(cur.cls.base, { file: cur.file, frames: [], depth: 0 });
      if (!isSymE(e)) {
        this.project.report(`base\u0000${cur.file}\u0000${cur.cls.name}`, {
          severity: 'info', code: 'typeorm/base-not-followed', file: cur.file, line: cur.cls.line,
          message: `the base of ${cur.cls.name} (${textOf(e)}) is an expression that cannot be followed statically; columns it adds are left out`,
        });
        break;
      }
      const s = e.s;
      if (s.k === 'missing') {
        this.project.report(`base\u0000${cur.file}\u0000${cur.cls.name}`, {
          severity: 'warning', code: 'typeorm/missing-file', file: cur.file, line: cur.cls.line,
          message: `the base class ${s.name} of ${cur.cls.name} is imported from ${s.spec}, which is not in the tree (${s.path}); its columns are left out`,
        });
        break;
      }
      if (s.k !== 'class') break;
      const k = classKey(s.file, s.c.name);
      if (seen.has(k)) {
        this.project.report(`cycle\u0000${key}`, {
          severity: 'error', code: 'typeorm/inheritance-cycle', file: cur.file, line: cur.cls.line,
          message: `the base classes of ${this.classByKey.get(key)!.cls.name} form a cycle (${[...seen].map((x) => x.slice(x.indexOf('#') + 1)).join(' -> ')} -> ${s.c.name}); the chain is cut there`,
        });
        break;
      }
      seen.add(k);
      out.push(k);
      this.project.touch(s.file);
      cur = { file: s.file, cls: s.c };
    }
    return out;
  }

  /** Whether `child` extends `parent` at any depth. */
  inherits(child: string, parent: string): boolean {
    return this.ancestors(child).includes(parent);
  }

  // ---- data source

  readDataSource(files: Map<string, TypeormFileFacts>, configFiles: readonly string[]): { failed?: Diagnostic } {
    const configs: Array<{ file: string; cfg: ConfigFact; o: E }> = [];
    for (const file of configFiles) {
      for (const cfg of files.get(file)!.configs) configs.push({ file, cfg, o: this.project.eval(cfg.options, { file, frames: [], depth: 0 }) });
    }
    // the application's own data source decides the database and the naming, not a test helper's
    // (the entities of every configuration are read): among the configurations outside test code
    // when there are any, the first whose type is a literal
    // an object with `entities` and a `type` TypeORM has no driver for is another tool's (MikroORM's `postgresql`)
    const typeOk = (c: (typeof configs)[number]): boolean => {
      const t = get(c.o, 'type');
      return typeof t !== 'string' || DATA_SOURCE_TYPES.has(t);
    };
    const own = configs.filter((c) => !isTestPath(c.file) && typeOk(c));
    const deciding = own.length > 0 ? own : configs;
    // (a MongoDB data source beside a relational one, for some documents, does not decide)
    const typed = (c: (typeof configs)[number]): boolean => typeof get(c.o, 'type') === 'string';
    const withType = deciding.find((c) => typed(c) && driverFamily(get(c.o, 'type') as string) !== 'mongodb') ?? deciding.find(typed) ?? deciding[0];
    let type = withType ? get(withType.o, 'type') : undefined;
    if (withType && type !== undefined && typeof type !== 'string') {
      // (nothing to say when --typeorm-database names the database)
      if (this.settings.database === 'auto') this.diagnostics.push({ severity: 'info', code: 'typeorm/database-unknown', file: withType.file, line: withType.cfg.line, message: `the data source type (${textOf(type)}) depends on run-time configuration; PostgreSQL's type rules are used (set --typeorm-database${isSymE(type) && type.s.k === 'global' && type.s.name.startsWith('process.env.') ? `, or --typeorm-assume ${type.s.name}=VALUE` : ''})` });
      type = undefined;
    }
    const distinctTypes = new Set(configs.map((c) => get(c.o, 'type')).filter((t): t is string => typeof t === 'string'));
    if (distinctTypes.size > 1) {
      this.diagnostics.push({ severity: 'info', code: 'typeorm/several-data-sources', message: `data sources of several types (${[...distinctTypes].join(', ')}); the settings of ${withType!.file} are used (${typeof type === 'string' ? type : 'a type decided at run time'})${own.length < configs.length ? ', not those of test code' : ''}${this.settings.database === 'auto' ? '; --typeorm-database chooses another' : ''}` });
    }
    const t = this.settings.database !== 'auto' ? this.settings.database : typeof type === 'string' ? type : undefined;
    const family = driverFamily(t);
    if (family === 'mongodb') {
      return {
        failed: {
          severity: 'error', code: 'typeorm/mongodb-unsupported', ...(withType ? { file: withType.file, line: withType.cfg.line } : {}),
          message: 'the data source type is mongodb, which has no relational tables; schema-strata analyses relational schemas only',
        },
      };
    }
    if (family === 'other') this.diagnostics.push({ severity: 'info', code: 'typeorm/database-rules', message: `database type ${t}: PostgreSQL's type rules are used` });
    this.mapped = mappedTypes(family);
    // naming strategy
    // (options that add a type to shared ones, `{ ...common, type }`, may not show what the shared
    // ones set when they are out of reach: then the shared options of the same file say it)
    const settingOf = (key: string): { value: E; from: (typeof configs)[number] } | undefined => {
      if (!withType) return undefined;
      const own = get(withType.o, key);
      if (own !== undefined) return { value: own, from: withType };
      if (!withType.cfg.settingsOnly) return undefined;
      const shared = configs.find((c) => c.file === withType.file && !c.cfg.settingsOnly && get(c.o, key) !== undefined);
      return shared ? { value: get(shared.o, key), from: shared } : undefined;
    };
    let naming: NamingRules = namingRules('default');
    if (this.settings.naming !== 'auto') naming = namingRules(this.settings.naming);
    else {
      const ns = settingOf('namingStrategy');
      if (ns) naming = this.namingOf(ns.value, ns.from.file, ns.from.cfg.line);
    }
    const prefix = settingOf('entityPrefix')?.value;
    const schema = settingOf('schema')?.value;
    this.ds = {
      family, naming, entityPrefix: typeof prefix === 'string' ? prefix : '',
      ...(t ? { type: t } : {}),
      ...(typeof schema === 'string' ? { schema } : {}),
    };
    // entity selection (every configuration's, together)
    if (configs.some(({ cfg }) => !cfg.settingsOnly)) {
      const sources = [...files.keys()].filter((p) => files.get(p)!.kind === 'source');
      const globs: string[] = [];
      const keys = new Set<string>();
      let open = false;
      for (const { file, cfg, o } of configs) {
        // (options that only add a type to shared ones select nothing)
        if (cfg.settingsOnly) continue;
        if (!isObjE(o) || o.open) {
          open = true;
          continue;
        }
        const auto = get(o, 'autoLoadEntities');
        if (auto !== undefined && auto !== false) open = true;
        const ent = get(o, 'entities');
        if (ent === undefined) {
          open = true;
          continue;
        }
        const list = isArrE(ent) ? ent.e : isObjE(ent) ? [...ent.p.values()] : [ent];
        const fileDir = posix.dirname(file) === '.' ? '' : posix.dirname(file);
        const ts = this.project.tsconfigFor(file);
        const dirs = new Set(sources.flatMap((p) => ancestorsOf(p)));
        const hasDir = (d: string): boolean => d === '' || dirs.has(d);
        // TypeORM resolves relative paths against the working directory (the project's root): the
        // package.json is not read here, so the nearest directory above the configuration whose
        // reading of the globs matches files of this version is taken, else the repository root
        const paths = list.filter((x): x is string => typeof x === 'string');
        const candidates = cfg.source === 'code' ? [...ancestorsOf(file), ''] : [fileDir];
        let chosen: string[] = [];
        for (const d of candidates) {
          const g = paths.flatMap((x) => entityGlobs(x, d, ts, hasDir));
          chosen = g;
          const m = globMatcher(g);
          if (sources.some((p) => m(p))) break;
        }
        globs.push(...chosen);
        for (const item of list) {
          if (typeof item === 'string') continue;
          if (isSymE(item) && item.s.k === 'class') keys.add(classKey(item.s.file, item.s.c.name));
          else if (isSymE(item) && item.s.k === 'schema') keys.add(`schemafact:${item.s.file}#${item.s.s.line}`);
          else if (isSymE(item) && item.s.k === 'missing') {
            // (a data source consulted under --path lists entities the selection may leave out: not missing)
            if (this.consultedDataSources.has(file)) continue;
            this.project.report(`dsmissing\u0000${item.s.path}`, {
              severity: 'warning', code: 'typeorm/missing-file', file, line: cfg.line,
              message: `the data source lists ${item.s.name}, imported from ${item.s.spec}, which is not in the tree (${item.s.path})`,
            });
          } else open = true;
        }
      }
      if (!open) {
        const match = globMatcher(globs);
        this.ds.select = { match, keys };
      }
    }
    return {};
  }

  private namingOf(ns: E, file: string, line: number): NamingRules {
    const unknown = (what: string): NamingRules => {
      this.diagnostics.push({
        severity: 'warning', code: 'typeorm/unknown-naming-strategy', file, line,
        message: isUnk(ns)
          ? `the naming strategy (${what}) depends on run-time configuration; TypeORM's default naming is used (set --typeorm-naming default|snake)`
          : `the naming strategy ${what} is not one schema-strata knows; TypeORM's default naming is used (set --typeorm-naming default|snake)`,
      });
      return namingRules('default');
    };
    const s: Sym | undefined = typeof ns === 'object' && ns !== null && (ns.$ === 'new' || ns.$ === 'sym') ? ns.s : undefined;
    if (!s) return unknown(textOf(ns));
    if (s.k === 'external' && /SnakeNamingStrategy$/.test(s.name)) return namingRules('snake');
    if (s.k === 'typeorm' && s.name === 'DefaultNamingStrategy') return namingRules('default');
    if (s.k === 'class') {
      // a project's class: snake when it (or a base it extends) is a snake-case strategy
      const key = classKey(s.file, s.c.name);
      const chain = [key, ...this.ancestors(key)];
      const last = this.classByKey.get(chain[chain.length - 1]!)!;
      const base = last.cls.base ? this.project.eval(last.cls.base, { file: last.file, frames: [], depth: 0 }) : undefined;
      const fromPackage = isSymE(base) && base.s.k === 'external' && /SnakeNamingStrategy$/.test(base.s.name);
      const fromDefault = isSymE(base) && base.s.k === 'typeorm' && base.s.name === 'DefaultNamingStrategy';
      const snake = chain.some((k) => this.classByKey.get(k)?.cls.snake);
      if (fromPackage || (fromDefault && snake)) return namingRules('snake');
      if (fromDefault && chain.every((k) => !(this.classByKey.get(k)?.cls.methods ?? []).some((m) => /Name$/.test(m)))) return namingRules('default');
      return unknown(s.c.name);
    }
    return unknown(symName(s));
  }

  // ---- entities

  private entityRef(e: E): string | undefined {
    if (isFnE(e)) e = this.project.call(e, [], { file: '', frames: [], depth: 0 });
    if (isSymE(e)) {
      if (e.s.k === 'class') return classKey(e.s.file, e.s.c.name);
      if (e.s.k === 'schema') return `schemafact:${e.s.file}#${e.s.s.line}`;
    }
    if (typeof e === 'string') return `name:${e}`;
    return undefined;
  }

  /**
   * The entity classes and schemas of the version, in TypeORM's order (by path, then as declared),
   * with the single-table inheritance links. An entity whose arguments are the same objects as in
   * the previous version and that read nothing that changed is taken over (with its tables).
   */
  collectEntities(files: Map<string, TypeormFileFacts>): Collected {
    const col: Collected = { files: [], lists: [], cands: [], candEnts: [], candMongo: [], structure: [] };
    this.project.capture(() => {
      for (const file of this.cache.sortedPaths) {
        const facts = files.get(file)!;
        if (facts.classes.length === 0 && facts.schemas.length === 0) continue;
        const t = this.candidatesOf(file, facts);
        col.files.push(file);
        col.lists.push(t);
        col.cands.push(...t.value);
      }
    });
    for (const c of col.cands) {
      const { a, schemaFactKey } = c;
      if (a.schema) this.schemaArgs.set(a.key, a);
      if (!this.selected(c)) {
        col.candEnts.push(undefined);
        col.candMongo.push(undefined);
        continue;
      }
      if (a.mongo) {
        col.candEnts.push(undefined);
        col.candMongo.push([[`mongo\u0000${a.key}`, {
          severity: 'warning', code: 'typeorm/mongodb-entity', file: a.file, line: a.tables[0]!.origin.line,
          message: `${a.name} uses ObjectIdColumn (a MongoDB entity), which has no relational table; it is left out`,
        }]]);
        continue;
      }
      col.candMongo.push(undefined);
      const entry = this.cache.entities.get(a.key);
      const holds = entry && entry.ent.args === a && (this.cache.dirtyEntities ? !this.cache.dirtyEntities.has(a.key) : this.project.valid(entry.result));
      const ent = entry && holds ? entry.ent : this.newEntMeta(a);
      if (entry && holds) this.reused.add(ent);
      col.candEnts.push(ent);
      this.entities.push(ent);
      this.entityByKey.set(a.key, ent);
      if (schemaFactKey) this.entityByKey.set(schemaFactKey, ent);
    }
    col.structure = this.project.capture(() => {
      // single-table inheritance: children share their parent's table
      for (const ent of this.entities) {
        if (ent.kind !== 'entity-child') continue;
        const parent = this.entities.find((p) => p.kind !== 'entity-child' && p.args.inheritance?.pattern === 'STI' && this.inherits(ent.key, p.key));
        if (!parent) {
          this.project.report(`sti\u0000${ent.key}`, {
            severity: 'warning', code: 'typeorm/child-without-parent', file: ent.args.file, line: ent.origin.line,
            message: `${ent.targetName} is a @ChildEntity but no base class declares @TableInheritance; it gets no table`,
          });
          continue;
        }
        ent.parent = parent;
      }
      for (const ent of this.entities) {
        if (ent.kind === 'entity-child') continue;
        if (ent.args.inheritance?.pattern === 'STI') {
          ent.sti = true;
          const children = this.entities.filter((c) => c.kind === 'entity-child' && c.parent === ent);
          if (!this.reused.has(ent)) ent.tree.push(...children.map((c) => c.key));
        } else if (ent.args.inheritance) {
          this.project.report(`cti\u0000${ent.key}`, {
            severity: 'warning', code: 'typeorm/unsupported-inheritance', file: ent.args.file, line: ent.origin.line,
            message: `${ent.targetName}: inheritance pattern ${ent.args.inheritance.pattern} is not supported by TypeORM 0.3; read as separate tables`,
          });
        }
      }
    });
    return col;
  }

  /** Whether the data source's entity selection takes a candidate. */
  private selected({ a, schemaFactKey }: Candidate): boolean {
    const sel = this.ds.select;
    return !sel || sel.match(a.file) || sel.keys.has(a.key) || (!!schemaFactKey && sel.keys.has(schemaFactKey));
  }

  /** The candidates of one file: taken over when nothing they read changed, else read again. */
  candidatesOf(file: string, facts: TypeormFileFacts): Tracked<Candidate[]> {
    const hit = this.cache.fileCandidates.get(file);
    // nothing this file's candidates read changed since the previous version
    if (hit && this.cache.dirtyFiles && !this.cache.dirtyFiles.has(file)) return hit;
    this.cached(this.cache.fileCandidates, file, () => this.fileCandidates(file, facts));
    const t = this.cache.fileCandidates.get(file)!;
    if (t !== hit) this.cache.index(this.cache.candidateIndex, t, file);
    return t;
  }

  /** The entity classes and schemas of one file, read in full (other classes are not: their decorators are not TypeORM's). */
  private fileCandidates(file: string, facts: TypeormFileFacts): Candidate[] {
    this.project.touch(file);
    const out: Candidate[] = [];
    for (const c of facts.classes) {
      if (c.decorators.length === 0) continue;
      const key = classKey(file, c.name);
      const isEntity = this.cached(this.cache.isEntity, key, () => {
        this.project.touch(file);
        const { decos } = this.reader.resolveUses(c.decorators, file);
        return decos.some((d) => ENTITY_DECORATORS.has(d.name));
      });
      if (!isEntity) continue;
      const a = this.args(key)!;
      if (a.tables.length > 0) out.push({ a });
    }
    facts.schemas.forEach((s, i) => {
      const a = this.cached(this.cache.schemas, `${file}\u0000${i}`, () => {
        this.project.touch(file);
        return this.reader.readSchema(file, s);
      });
      if (!a) return;
      out.push({ a, schemaFactKey: `schemafact:${file}#${s.line}` });
    });
    return out;
  }

  private newEntMeta(a: TargetArgs): EntMeta {
    const t = a.tables[0]!;
    const ancestors = a.cls ? this.ancestors(a.key) : [];
    return {
      key: a.key, targetName: a.name, args: a, kind: t.type,
      ...(t.name ? { givenTableName: t.name } : {}),
      tableNameWithoutPrefix: '', tableName: '',
      ...(t.schema ? { schema: t.schema } : {}),
      ...(t.database ? { database: t.database } : {}),
      tree: [a.key, ...ancestors],
      ownColumns: [], embeddeds: [], relations: [], uniques: [], foreignKeys: [], junctions: [], origin: t.origin,
      ancDiags: a.cls ? this.cache.ancestors.get(a.key)!.diags : NO_DIAGS,
    };
  }

  /** Table names of every entity (EntityMetadata.build), then duplicates reported. */
  nameOne(ent: EntMeta): void {
    const { naming, entityPrefix } = this.ds;
    {
      if (ent.kind === 'entity-child' && ent.parent) {
        ent.givenTableName = ent.parent.givenTableName;
        ent.schema = ent.parent.schema;
        ent.database = ent.parent.database;
        ent.tableNameWithoutPrefix = naming.tableName(ent.parent.targetName, ent.parent.givenTableName);
      } else {
        ent.tableNameWithoutPrefix = naming.tableName(ent.targetName, ent.givenTableName);
      }
      if (!ent.schema && this.ds.schema) ent.schema = this.ds.schema;
      ent.tableName = entityPrefix ? naming.prefixTableName(entityPrefix, ent.tableNameWithoutPrefix) : ent.tableNameWithoutPrefix;
    }
  }

  nameEntities(dupKeys: Set<string>): void {
    // an entity taken over keeps the names it was given (the naming inputs are part of the run's fingerprint)
    for (const ent of this.entities) if (!this.reused.has(ent) || !ent.tableName) this.nameOne(ent);
    const owners = new Map<string, EntMeta>();
    const keep: EntMeta[] = [];
    for (const ent of this.entities) {
      if (ent.kind === 'entity-child') {
        keep.push(ent);
        continue;
      }
      const id = `${ent.kind === 'view' ? 'view:' : ''}${this.namespaceOf(ent) ?? ''}.${ent.tableName}`;
      const first = owners.get(id);
      if (first) {
        this.project.report(`dup\u0000${ent.key}`, {
          severity: 'error', code: 'typeorm/duplicate-table', file: ent.args.file, line: ent.origin.line,
          message: `${ent.targetName} and ${first.targetName} (${first.args.file}) both map to the table ${ent.tableName}; ${ent.targetName} is left out`,
        });
        this.entityByKey.delete(ent.key);
        dupKeys.add(ent.key).add(first.key);
        continue;
      }
      owners.set(id, ent);
      keep.push(ent);
    }
    this.entities = keep.filter((e) => e.kind !== 'entity-child' || !e.parent || keep.includes(e.parent));
  }

  namespaceOf(ent: { schema?: string; database?: string }): string | undefined {
    const ns = ent.schema ?? (this.ds.family === 'mysql' ? ent.database : undefined);
    if (!ns || ns === this.mapped.defaultSchema) return undefined;
    return ns;
  }

  // ---- columns

  private newColumn(args: ColumnArgs, ent: EntMeta, emb: EmbMeta | undefined): ColMeta {
    const o = args.options;
    // every property set, undefined when absent: one object shape for all columns (no spread
    // objects to build, and the code that reads columns sees one shape)
    const c: ColMeta = {
      target: args.target, propertyName: args.propertyName,
      propertyPath: emb ? `${emb.propertyPath}.${args.propertyName}` : args.propertyName,
      mode: args.mode,
      givenName: o.name ? o.name : undefined,
      type: o.type,
      length: o.length ?? '',
      precision: o.precision,
      scale: o.scale,
      nullable: o.nullable ?? (o.default !== undefined && o.default.v === null ? true : false),
      primary: !!o.primary,
      default: o.default,
      enumValues: o.enum ? o.enum : undefined,
      enumName: o.enumName ? o.enumName : undefined,
      isArray: !!o.array,
      generated: undefined,
      generatedType: undefined,
      computed: o.asExpression ? true : undefined,
      prefixes: emb ? emb.prefixes : [],
      databaseName: '', databaseNameWithoutPrefixes: '',
      origin: args.origin,
      referenced: undefined,
      design: args.design ? args.design : undefined,
      isDiscriminator: undefined,
      embedded: emb,
    };
    const m = this.mapped;
    if (c.mode === 'treeLevel') c.type = m.treeLevel;
    if (c.mode === 'createDate' || c.mode === 'updateDate') {
      if (c.type === undefined) c.type = c.mode === 'createDate' ? m.createDate : m.updateDate;
      if (!c.default) c.default = { v: { $: 'unk', t: m.createDateDefault } };
      if (c.precision === undefined && m.createDatePrecision) c.precision = m.createDatePrecision;
    }
    if (c.mode === 'deleteDate') {
      if (c.type === undefined) c.type = m.deleteDate;
      if (!c.nullable) c.nullable = true;
      if (c.precision === undefined && m.createDatePrecision) c.precision = m.createDatePrecision;
    }
    if (c.mode === 'version') c.type = m.version;
    this.nameColumn(c);
    void ent;
    return c;
  }

  private nameColumn(c: ColMeta): void {
    c.databaseName = this.ds.naming.columnName(c.propertyName, c.givenName, c.prefixes);
    c.databaseNameWithoutPrefixes = this.ds.naming.columnName(c.propertyName, c.givenName, []);
  }

  /** Columns of a set of targets, as `filterColumns` gives them: in definition order, the first declaration of a property wins. */
  private columnArgsOf(treeDefinitionOrder: string[]): ColumnArgs[] {
    const out: ColumnArgs[] = [];
    const seen = new Set<string>();
    for (const k of treeDefinitionOrder) {
      for (const c of this.args(k)?.columns ?? []) {
        if (seen.has(c.propertyName)) continue;
        seen.add(c.propertyName);
        out.push(c);
      }
    }
    return out;
  }

  /** Keys of a tree in the order their classes were defined: ancestors first. */
  private definitionOrder(ent: EntMeta): string[] {
    const own = [ent.key, ...(ent.args.cls ? this.ancestors(ent.key) : [])].reverse();
    const children = ent.tree.slice(own.length);
    return [...own, ...children];
  }

  buildColumns(ent: EntMeta): void {
    const order = this.definitionOrder(ent);
    // only a single-table parent has children
    const childKeys = ent.sti ? new Set(this.entities.filter((c) => c.kind === 'entity-child' && c.parent === ent).map((c) => c.key)) : NO_KEYS;
    for (const args of this.columnArgsOf(order)) {
      let a = args;
      if (ent.kind === 'regular' && args.target !== ent.key) {
        const own = this.args(ent.key)?.columns.find((c) => c.propertyName === args.propertyName);
        if (own?.options.default && own.options.default.v) a = { ...args, options: { ...args.options, default: own.options.default } };
      }
      const c = this.newColumn(a, ent, undefined);
      if (childKeys.has(args.target)) c.nullable = true;
      ent.ownColumns.push(c);
    }
    const inh = ent.args.inheritance;
    if (inh && inh.column) {
      const name = inh.column.name ?? 'type';
      let d = ent.ownColumns.find((c) => c.propertyName === name);
      if (!d) {
        d = this.newColumn({ target: ent.key, propertyName: name, mode: 'regular', options: { ...inh.column }, origin: ent.origin }, ent, undefined);
        d.mode = 'virtual';
        ent.ownColumns.push(d);
      }
      d.isDiscriminator = true;
    }
    const tree = ent.args.tree;
    if (tree?.type === 'materialized-path') {
      const c = this.newColumn({ target: ent.key, propertyName: 'mpath', mode: 'regular', options: { name: this.ds.naming.materializedPathColumnName, type: { ctor: 'String' }, nullable: true, default: { v: '' } }, origin: ent.origin }, ent, undefined);
      ent.ownColumns.push(c);
    } else if (tree?.type === 'nested-set') {
      const { left, right } = this.ds.naming.nestedSetColumnNames;
      for (const [n, dv] of [[left, 1], [right, 2]] as const) {
        ent.ownColumns.push(this.newColumn({ target: ent.key, propertyName: n, mode: 'regular', options: { name: n, type: { ctor: 'Number' }, nullable: false, default: { v: dv } }, origin: ent.origin }, ent, undefined));
      }
    }
    ent.embeddeds = this.buildEmbeddeds(ent, order, undefined, 0);
    if (ent.sti) for (const e of this.allEmbeddeds(ent)) for (const c of e.columns) c.nullable = true;
  }

  private allEmbeddeds(ent: EntMeta): EmbMeta[] {
    return ent.embeddeds;
  }

  private buildEmbeddeds(ent: EntMeta, targets: string[], parent: EmbMeta | undefined, depth: number): EmbMeta[] {
    if (depth > 8) return [];
    const list: EmbeddedArgs[] = [];
    for (const k of targets) {
      for (const e of this.args(k)?.embeddeds ?? []) {
        if (list.some((x) => x.prefix === e.prefix && x.propertyName === e.propertyName)) continue;
        list.push(e);
      }
    }
    const out: EmbMeta[] = [];
    for (const e of list) {
      const ref = this.project.call(e.type, [], { file: '', frames: [], depth: 0 });
      if (!isSymE(ref) || ref.s.k !== 'class') {
        this.project.report(`emb\u0000${e.target}\u0000${e.propertyName}`, {
          severity: 'warning', code: 'typeorm/embedded-not-found', file: e.origin.file, line: e.origin.line,
          message: `the embedded type of ${e.propertyName} (${textOf(ref)}) ${isSymE(ref) && ref.s.k === 'missing' ? `is imported from ${ref.s.spec}, which is not in the tree` : 'cannot be followed'}; its columns are left out`,
        });
        continue;
      }
      const k = classKey(ref.s.file, ref.s.c.name);
      const embTargets = [k, ...this.ancestors(k)].reverse();
      const partial = e.prefix === undefined || e.prefix === true ? [e.propertyName] : e.prefix === '' || e.prefix === false ? [] : [String(e.prefix)];
      const emb: EmbMeta = {
        propertyName: e.propertyName,
        propertyPath: parent ? `${parent.propertyPath}.${e.propertyName}` : e.propertyName,
        prefixes: [...(parent?.prefixes ?? []), ...partial],
        columns: [], relations: [], uniques: [], targets: embTargets,
      };
      for (const c of this.columnArgsOf(embTargets)) emb.columns.push(this.newColumn(c, ent, emb));
      for (const k2 of embTargets) emb.uniques.push(...(this.args(k2)?.uniques ?? []));
      out.push(emb);
      const nested = this.buildEmbeddeds(ent, embTargets, emb, depth + 1);
      for (const n of nested) emb.columns.push(...n.columns);
      // relations of embedded classes
      for (const r of this.relationArgsOf(embTargets, embTargets.slice().reverse())) {
        emb.relations.push({ args: r, propertyName: r.propertyName, propertyPath: `${emb.propertyPath}.${r.propertyName}`, relationType: r.relationType, type: r.type, entity: ent, embedded: emb, joinColumns: [] });
      }
      for (const n of nested) emb.relations.push(...n.relations);
    }
    return out;
  }

  /** `filterByTargetAndWithoutDuplicateRelationProperties`: the first declaration wins, a subclass may override the target type. */
  private relationArgsOf(definitionOrder: string[], treeOrder: string[]): RelationArgs[] {
    const out: RelationArgs[] = [];
    for (const k of definitionOrder) {
      for (const r of this.args(k)?.relations ?? []) {
        const at = out.findIndex((x) => x.propertyName === r.propertyName);
        if (at < 0) out.push(r);
        else if (treeOrder.indexOf(r.target) < treeOrder.indexOf(out[at]!.target)) out[at] = { ...out[at]!, type: r.type };
      }
    }
    return out;
  }

  columnsOf(ent: EntMeta): ColMeta[] {
    const own = ent.kind === 'entity-child' && ent.parent ? ent.parent.ownColumns : ent.ownColumns;
    const embs = ent.kind === 'entity-child' && ent.parent ? ent.parent.embeddeds : ent.embeddeds;
    return [...own, ...embs.flatMap((e) => e.columns)];
  }

  primaryColumns(ent: EntMeta): ColMeta[] {
    return this.columnsOf(ent).filter((c) => c.primary);
  }

  // ---- relations

  buildRelations(ent: EntMeta): void {
    const order = this.definitionOrder(ent);
    for (const r of this.relationArgsOf(order, ent.tree)) {
      ent.relations.push({ args: r, propertyName: r.propertyName, propertyPath: r.propertyName, relationType: r.relationType, type: r.type, entity: ent, joinColumns: [] });
    }
    for (const e of ent.embeddeds) ent.relations.push(...e.relations);
  }

  resolveTarget(rel: RelMeta): EntMeta | undefined {
    const r = rel.args;
    let t = r.type;
    const viaFunction = isFnE(t);
    // the target's file counts as read for its exports only: its columns are the target's own business
    if (isFnE(t)) t = this.project.shallow(() => this.project.call(t, [], { file: r.origin.file, frames: [], depth: 0 }));
    if (viaFunction && isSymE(t) && t.s.k === 'schema') {
      // RelationMetadata calls the function and compares the EntitySchema object itself with entity targets: never found
      this.project.report(`rt\u0000${r.target}\u0000${rel.propertyPath}`, {
        severity: 'warning', code: 'typeorm/relation-target-not-found', file: r.origin.file, line: r.origin.line,
        message: `the relation ${rel.entity.targetName}.${rel.propertyPath} names an EntitySchema through a function, which TypeORM does not match to the entity (name the schema or its name directly); the relation is left out`,
      });
      return undefined;
    }
    const where = `${rel.entity.targetName}.${rel.propertyPath}`;
    // TypeORM builds EntitySchema definitions apart from decorated classes: a relation reaches its own kind only
    const fromSchema = !!rel.entity.args.schema;
    if (typeof t === 'string') {
      const byName = this.entities.find((e) => !!e.args.schema === fromSchema && (e.targetName === t || e.givenTableName === t));
      if (byName) return byName;
      this.project.report(`rt\u0000${r.target}\u0000${rel.propertyPath}`, {
        severity: 'warning', code: 'typeorm/relation-target-not-found', file: r.origin.file, line: r.origin.line,
        message: `the target ${t} of the relation ${where} is not an entity of this version; the relation is left out`,
      });
      return undefined;
    }
    if (isSymE(t)) {
      const s = t.s;
      if (s.k === 'class' || s.k === 'schema') {
        const key = s.k === 'class' ? classKey(s.file, s.c.name) : `schemafact:${s.file}#${s.s.line}`;
        const ent = this.entityByKey.get(key);
        if (ent && !!ent.args.schema === fromSchema) return ent;
        this.project.report(`rt\u0000${r.target}\u0000${rel.propertyPath}`, {
          severity: 'warning', code: 'typeorm/relation-target-not-entity', file: r.origin.file, line: r.origin.line,
          message: `the target ${symName(s)} of the relation ${where} is not an entity of the data source; the relation is left out`,
        });
        return undefined;
      }
      if (s.k === 'missing') {
        this.project.report(`rt\u0000${r.target}\u0000${rel.propertyPath}`, {
          severity: 'warning', code: 'typeorm/missing-file', file: r.origin.file, line: r.origin.line,
          message: `the target ${s.name} of the relation ${where} is imported from ${s.spec}, which is not in the tree (${s.path}); the relation is left out`,
        });
        return undefined;
      }
    }
    this.project.report(`rt\u0000${r.target}\u0000${rel.propertyPath}`, {
      severity: 'warning', code: 'typeorm/relation-target-not-found', file: r.origin.file, line: r.origin.line,
      message: `the target of the relation ${where} (${textOf(t)}) cannot be followed statically; the relation is left out`,
    });
    return undefined;
  }

  /** Property path of the inverse side (`user => user.posts` or `'posts'`). */
  inverseSideOf(rel: RelMeta): string | undefined {
    const inv = rel.args.inverseSide;
    if (typeof inv === 'string') return inv;
    if (isFnE(inv)) {
      const r = this.project.call(inv, [{ $: 'props', path: '' }], { file: rel.args.origin.file, frames: [], depth: 0 });
      if (typeof r === 'string') return r;
      if (typeof r === 'object' && r !== null && r.$ === 'props') return r.path;
    }
    return undefined;
  }

  private joinColumnArgs(rel: RelMeta): JoinColumnOpts[] {
    return (this.args(rel.args.target)?.joinColumns ?? []).filter((j) => j.propertyName === rel.propertyName);
  }

  /** RelationJoinColumnBuilder: the join columns, foreign key and (one-to-one) unique constraint of a relation. */
  buildJoinColumns(rel: RelMeta): void {
    const inv = rel.inverse!;
    const ent = rel.entity;
    const joinColumns = this.joinColumnArgs(rel);
    const anyRef = joinColumns.some((j) => !!j.referencedColumnName);
    let referenced: ColMeta[];
    if ((joinColumns.length === 0 && rel.relationType === 'many-to-one') || (joinColumns.length > 0 && !anyRef)) referenced = this.primaryColumns(inv);
    else {
      referenced = [];
      for (const j of joinColumns) {
        const own = inv.kind === 'entity-child' && inv.parent ? inv.parent.ownColumns : inv.ownColumns;
        const c = own.find((x) => x.propertyName === j.referencedColumnName);
        if (c) {
          referenced.push(c);
          this.useTargetColumn(inv, c);
        }
        else {
          this.project.report(`rc\u0000${rel.args.target}\u0000${rel.propertyPath}`, {
            severity: 'warning', code: 'typeorm/referenced-column-not-found', file: rel.args.origin.file, line: rel.args.origin.line,
            message: `the referenced column ${j.referencedColumnName} of ${ent.targetName}.${rel.propertyPath} is not a column of ${inv.targetName}; the relation is left out`,
          });
          return;
        }
      }
    }
    if (referenced.length === 0) {
      if (this.relationsOf(inv).some((r) => r.args.primary)) {
        this.project.report(`rk\u0000${rel.args.target}\u0000${rel.propertyPath}`, {
          severity: 'warning', code: 'typeorm/relation-key-not-built', file: rel.args.origin.file, line: rel.args.origin.line,
          message: `the key of ${inv.targetName} is made of its primary relations (TypeORM 0.2), whose join columns are not built before ${ent.targetName}.${rel.propertyPath} in entity order; the relation is left out`,
        });
      }
      return;
    }
    // TypeORM 0.2's RelationMetadata: a primary relation is never nullable; its new join columns are primary
    const primary = !!rel.args.primary;
    const nullable = !(rel.args.nullable === false || primary);
    const columns: ColMeta[] = [];
    for (const ref of referenced) {
      const jc = joinColumns.find((j) => (!j.referencedColumnName || j.referencedColumnName === ref.propertyName) && !!j.name);
      const name = jc ? jc.name! : this.ds.naming.joinColumnName(rel.propertyName, ref.propertyName);
      const pool = rel.embedded ? rel.embedded.columns : ent.ownColumns;
      let col = pool.find((c) => c.databaseNameWithoutPrefixes === name);
      if (!col) {
        col = {
          target: '', propertyName: rel.propertyName, propertyPath: rel.propertyPath, mode: 'virtual', givenName: name,
          ...(ref.type !== undefined ? { type: ref.type } : {}),
          length: this.ds.family === 'mysql' && !ref.length && (ref.generated === 'uuid' || ref.type === 'uuid') ? '36' : ref.length,
          ...(ref.precision !== undefined ? { precision: ref.precision } : {}),
          ...(ref.scale !== undefined ? { scale: ref.scale } : {}),
          nullable, primary,
          ...(ref.enumValues ? { enumValues: ref.enumValues } : {}),
          ...(ref.enumName ? { enumName: ref.enumName } : {}),
          isArray: false,
          prefixes: rel.embedded ? rel.embedded.prefixes : [],
          databaseName: '', databaseNameWithoutPrefixes: '',
          origin: rel.args.origin,
          ...(rel.embedded ? { embedded: rel.embedded } : {}),
        };
        this.nameColumn(col);
        ent.ownColumns.push(col);
      } else {
        if (ref.type !== undefined) col.type = ref.type;
        if (ref.enumValues && !col.enumValues) col.enumValues = ref.enumValues;
      }
      col.referenced = ref;
      columns.push(col);
    }
    rel.joinColumns = columns;
    ent.foreignKeys.push({
      ...(joinColumns[0]?.foreignKeyConstraintName ? { name: joinColumns[0].foreignKeyConstraintName } : {}),
      columns: columns.map((c) => c.databaseName),
      referencedTable: this.tableIdOf(inv),
      referencedColumns: referenced.map((c) => c.databaseName),
      onDelete: action(rel.args.onDelete, this.project, rel.args.origin),
      onUpdate: action(rel.args.onUpdate, this.project, rel.args.origin),
      enforcement: rel.args.createForeignKeyConstraints ? 'database' : 'orm',
    });
    if (rel.relationType === 'one-to-one' && !columns.every((c) => c.primary)) ent.uniques.push({ columns });
  }

  tableIdOf(ent: EntMeta): string {
    const target = ent.kind === 'entity-child' && ent.parent ? ent.parent : ent;
    const ns = this.namespaceOf(target);
    return ns ? `${ns}.${target.tableName}` : target.tableName;
  }

  /** JunctionEntityMetadataBuilder: the join table of an owning many-to-many relation. */
  buildJunction(rel: RelMeta): void {
    const jt = (this.args(rel.args.target)?.joinTables ?? []).find((j) => j.propertyName === rel.propertyName);
    if (!jt) return;
    const owner = rel.entity;
    const inv = rel.inverse!;
    const invRelation = this.relationsOf(inv).find((r) => r.propertyPath === this.inverseSideOf(rel));
    const anyRef = (jt.joinColumns ?? []).some((j) => !!j.referencedColumnName);
    const ownerColumns = this.columnsOf(owner);
    const referenced = !jt.joinColumns || !anyRef
      ? ownerColumns.filter((c) => c.primary)
      : jt.joinColumns.map((j) => ownerColumns.find((c) => c.propertyName === j.referencedColumnName)).filter((c): c is ColMeta => !!c);
    const anyInvRef = (jt.inverseJoinColumns ?? []).some((j) => !!j.referencedColumnName);
    const invOwn = inv.kind === 'entity-child' && inv.parent ? inv.parent.ownColumns : inv.ownColumns;
    const invReferenced = !jt.inverseJoinColumns || !anyInvRef
      ? this.primaryColumns(inv)
      : jt.inverseJoinColumns.map((j) => invOwn.find((c) => c.propertyName === j.referencedColumnName)).filter((c): c is ColMeta => !!c);
    for (const c of invReferenced) this.useTargetColumn(inv, c);
    const { naming } = this.ds;
    const name = jt.name ?? naming.joinTableName(owner.tableNameWithoutPrefix, inv.tableNameWithoutPrefix, rel.propertyPath, invRelation ? invRelation.propertyName : '');
    // EntityMetadata.build shortens a junction's name over the driver's alias limit (given names too)
    let without = naming.tableName('', name);
    if (this.mapped.maxAliasLength > 0 && without.length > this.mapped.maxAliasLength) without = shorten(without, { separator: '_', segmentLength: 3 });
    const junction: EntMeta = {
      key: `junction:${owner.key}#${rel.propertyPath}`,
      targetName: `${owner.targetName}.${rel.propertyPath}`, args: owner.args, kind: 'junction', givenTableName: name,
      tableNameWithoutPrefix: without,
      tableName: '',
      ...((jt.schema ?? owner.schema) ? { schema: jt.schema ?? owner.schema } : {}),
      ...((jt.database ?? owner.database) ? { database: jt.database ?? owner.database } : {}),
      tree: [], ownColumns: [], embeddeds: [], relations: [], uniques: [], foreignKeys: [], junctions: [], origin: rel.args.origin,
    };
    junction.tableName = this.ds.entityPrefix ? naming.prefixTableName(this.ds.entityPrefix, junction.tableNameWithoutPrefix) : junction.tableNameWithoutPrefix;
    const make = (ref: ColMeta, colName: string): ColMeta => {
      const c: ColMeta = {
        target: '', propertyName: colName, propertyPath: colName, mode: 'virtual', givenName: colName,
        ...(ref.type !== undefined ? { type: ref.type } : {}),
        length: this.ds.family === 'mysql' && !ref.length && (ref.generated === 'uuid' || ref.type === 'uuid') ? '36' : ref.length,
        ...(ref.precision !== undefined ? { precision: ref.precision } : {}),
        ...(ref.scale !== undefined ? { scale: ref.scale } : {}),
        nullable: false, primary: true,
        ...(ref.enumValues ? { enumValues: ref.enumValues } : {}),
        ...(ref.enumName ? { enumName: ref.enumName } : {}),
        isArray: false, prefixes: [], databaseName: '', databaseNameWithoutPrefixes: '', origin: rel.args.origin, referenced: ref,
      };
      return c;
    };
    const cols = referenced.map((ref) => {
      const j = (jt.joinColumns ?? []).find((x) => (!x.referencedColumnName || x.referencedColumnName === ref.propertyName) && !!x.name);
      return make(ref, j?.name ?? naming.joinTableColumnName(owner.tableNameWithoutPrefix, ref.propertyName, ref.databaseName));
    });
    const invCols = invReferenced.map((ref) => {
      const j = (jt.inverseJoinColumns ?? []).find((x) => (!x.referencedColumnName || x.referencedColumnName === ref.propertyName) && !!x.name);
      return make(ref, j?.name ?? naming.joinTableInverseColumnName(inv.tableNameWithoutPrefix, ref.propertyName, ref.databaseName));
    });
    for (const a of cols) {
      for (const b of invCols) {
        if (a.givenName === b.givenName) {
          a.propertyName = a.givenName = naming.joinTableColumnDuplicationPrefix(a.propertyName, 1);
          b.propertyName = b.givenName = naming.joinTableColumnDuplicationPrefix(b.propertyName, 2);
        }
      }
    }
    for (const c of [...cols, ...invCols]) {
      c.propertyPath = c.propertyName;
      this.nameColumn(c);
    }
    junction.ownColumns = [...cols, ...invCols];
    const enforcement = rel.args.createForeignKeyConstraints ? 'database' as const : 'orm' as const;
    const oracleLike = this.ds.type === 'oracle';
    junction.foreignKeys.push({
      columns: cols.map((c) => c.databaseName), referencedTable: this.tableIdOf(owner), referencedColumns: referenced.map((c) => c.databaseName),
      onDelete: action(rel.args.onDelete ?? 'CASCADE', this.project), onUpdate: action(oracleLike ? 'NO ACTION' : rel.args.onUpdate ?? 'CASCADE', this.project), enforcement,
    });
    junction.foreignKeys.push({
      columns: invCols.map((c) => c.databaseName), referencedTable: this.tableIdOf(inv), referencedColumns: invReferenced.map((c) => c.databaseName),
      onDelete: action(invRelation ? invRelation.args.onDelete : 'CASCADE', this.project),
      onUpdate: action(oracleLike ? 'NO ACTION' : invRelation ? invRelation.args.onUpdate : 'CASCADE', this.project),
      enforcement,
    });
    owner.junctions.push(junction);
  }

  /** Relations of an entity (a single-table child: its own tree's). */
  relationsOf(ent: EntMeta): RelMeta[] {
    if (ent.relations.length > 0 || ent.kind !== 'entity-child') return ent.relations;
    const order = [ent.key, ...this.ancestors(ent.key)].reverse();
    return this.relationArgsOf(order, [ent.key, ...this.ancestors(ent.key)]).map((r) => ({
      args: r, propertyName: r.propertyName, propertyPath: r.propertyName, relationType: r.relationType, type: r.type, entity: ent, joinColumns: [],
    }));
  }

  /** ClosureJunctionEntityMetadataBuilder: the closure table of a closure-table tree. */
  buildClosure(ent: EntMeta): void {
    const opts = ent.args.tree!.options;
    const given = ent.args.tree!.closureTableName ?? ent.tableNameWithoutPrefix;
    for (const k of ['ancestorColumnName', 'descendantColumnName']) {
      if (get(opts, k) !== undefined) {
        this.project.report(`closure\u0000${ent.key}\u0000${k}`, {
          severity: 'info', code: 'typeorm/closure-column-names', file: ent.args.file, line: ent.origin.line,
          message: `${ent.targetName}: the closure table's ${k} is a function of the project; TypeORM's default column names are used`,
        });
      }
    }
    const { naming } = this.ds;
    const nameWithout = naming.closureJunctionTableName(given);
    const schemaOpt = str(get(opts, 'closureTableSchema'));
    const closure: EntMeta = {
      key: `closure:${ent.key}`, targetName: '', args: ent.args, kind: 'closure-junction', givenTableName: given,
      tableNameWithoutPrefix: nameWithout,
      tableName: this.ds.entityPrefix ? naming.prefixTableName(this.ds.entityPrefix, nameWithout) : nameWithout,
      ...((schemaOpt ?? ent.schema) ? { schema: schemaOpt ?? ent.schema } : {}),
      tree: [], ownColumns: [], embeddeds: [], relations: [], uniques: [], foreignKeys: [], junctions: [], origin: ent.origin,
    };
    const pks = this.primaryColumns(ent);
    const cols: ColMeta[] = [];
    for (const pk of pks) {
      for (const suffix of ['_ancestor', '_descendant']) {
        const c: ColMeta = {
          target: '', propertyName: pk.propertyName + suffix, propertyPath: pk.propertyName + suffix, mode: 'virtual',
          ...(pk.type !== undefined ? { type: pk.type } : {}),
          length: pk.length, ...(pk.precision !== undefined ? { precision: pk.precision } : {}), ...(pk.scale !== undefined ? { scale: pk.scale } : {}),
          nullable: false, primary: true, isArray: false, prefixes: [], databaseName: '', databaseNameWithoutPrefixes: '', origin: ent.origin, referenced: pk,
        };
        this.nameColumn(c);
        cols.push(c);
      }
    }
    closure.ownColumns = cols;
    if (this.columnsOf(ent).some((c) => c.mode === 'treeLevel')) {
      const lvl: ColMeta = { target: '', propertyName: 'level', propertyPath: 'level', mode: 'virtual', type: this.mapped.treeLevel, length: '', nullable: false, primary: false, isArray: false, prefixes: [], databaseName: '', databaseNameWithoutPrefixes: '', origin: ent.origin };
      this.nameColumn(lvl);
      closure.ownColumns.push(lvl);
    }
    const del = this.ds.family === 'mssql' ? 'NO ACTION' : 'CASCADE';
    const anc = cols.filter((_, i) => i % 2 === 0);
    const desc = cols.filter((_, i) => i % 2 === 1);
    // TypeORM builds each closure foreign key on the first ancestor / descendant column
    for (const side of [anc, desc]) {
      closure.foreignKeys.push({
        columns: side.slice(0, 1).map((c) => c.databaseName), referencedTable: this.tableIdOf(ent), referencedColumns: pks.map((c) => c.databaseName),
        onDelete: action(del, this.project), onUpdate: 'no action', enforcement: 'database',
      });
    }
    ent.junctions.push(closure);
  }

  // ---- generated columns, uniques

  applyGenerations(ent: EntMeta): void {
    for (const c of this.columnsOf(ent)) {
      if (!c.target) continue;
      const g = this.args(c.target)?.generations.find((x) => x.propertyName === c.propertyName);
      if (!g) continue;
      c.generated = g.strategy;
      if (g.strategy === 'uuid') c.generatedType = 'uuid';
      else if (g.strategy === 'rowid') c.generatedType = 'int';
      else c.generatedType = c.type ?? { ctor: 'Number' };
    }
  }

  buildUniques(ent: EntMeta): void {
    const order = this.definitionOrder(ent);
    const args: Array<{ u: UniqueArgs; emb?: EmbMeta }> = [];
    for (const k of order) for (const u of this.args(k)?.uniques ?? []) args.push({ u });
    const embs: EmbMeta[] = [];
    const walk = (list: EmbMeta[]): void => {
      for (const e of list) embs.push(e);
    };
    walk(ent.embeddeds);
    for (const e of embs) for (const u of e.uniques) args.push({ u, emb: e });
    const columns = this.columnsOf(ent);
    for (const { u, emb } of args) {
      if (u.partial) continue;
      let paths: string[] | undefined;
      let cols = u.columns;
      if (isFnE(cols)) cols = this.project.call(cols, [{ $: 'props', path: '' }], { file: u.origin.file, frames: [], depth: 0 });
      if (isArrE(cols)) {
        paths = [];
        for (const x of cols.e) {
          if (typeof x === 'string') paths.push(emb && !isFnE(u.columns) ? `${emb.propertyPath}.${x.trim()}` : x.trim());
          else if (typeof x === 'object' && x !== null && x.$ === 'props') paths.push(x.path);
          else {
            paths = undefined;
            break;
          }
        }
      } else if (isObjE(cols)) paths = [...cols.p.keys()];
      if (!paths) {
        this.project.report(`uq\u0000${u.origin.file}\u0000${u.origin.line}`, {
          severity: 'warning', code: 'typeorm/not-literal', file: u.origin.file, line: u.origin.line,
          message: `the columns of a unique constraint on ${ent.targetName} cannot be read statically (${textOf(cols)}); it is left out`,
        });
        continue;
      }
      const out: ColMeta[] = [];
      let ok = true;
      for (const p of paths) {
        const c = columns.find((x) => x.propertyPath === p);
        if (c) {
          out.push(c);
          continue;
        }
        const r = ent.relations.find((x) => x.joinColumns.length > 0 && x.propertyName === p);
        if (r) {
          out.push(...r.joinColumns);
          continue;
        }
        ok = false;
        this.project.report(`uqc\u0000${u.origin.file}\u0000${u.origin.line}\u0000${p}`, {
          severity: 'warning', code: 'typeorm/unique-column-not-found', file: u.origin.file, line: u.origin.line,
          message: `a unique constraint of ${ent.targetName} names ${p}, which is not one of its columns; it is left out`,
        });
      }
      if (ok && out.length > 0) ent.uniques.push({ ...(u.name ? { name: u.name } : {}), columns: out });
    }
  }

  buildForeignKeyDecorators(ent: EntMeta): void {
    const order = this.definitionOrder(ent);
    for (const k of order) {
      for (const fk of this.args(k)?.foreignKeys ?? []) {
        const fake: RelMeta = { args: { target: fk.target, propertyName: fk.propertyName ?? '', relationType: 'many-to-one', type: fk.type, createForeignKeyConstraints: true, origin: fk.origin }, propertyName: fk.propertyName ?? '', propertyPath: fk.propertyName ?? '', relationType: 'many-to-one', type: fk.type, entity: ent, joinColumns: [] };
        const target = this.resolveTarget(fake);
        if (!target) continue;
        this.useTarget(target);
        const columns = this.columnsOf(ent);
        const tcols = this.columnsOf(target);
        const names = [...(fk.columnNames ?? []), ...(fk.propertyName ? [fk.propertyName] : [])];
        const refNames = [...(fk.referencedColumnNames ?? [])];
        if (fk.propertyName && fk.inverseSide) {
          const inv = typeof fk.inverseSide === 'string' ? fk.inverseSide : isFnE(fk.inverseSide) ? this.project.call(fk.inverseSide, [{ $: 'props', path: '' }], { file: fk.origin.file, frames: [], depth: 0 }) : undefined;
          const p = typeof inv === 'string' ? inv : typeof inv === 'object' && inv !== null && inv.$ === 'props' ? inv.path : undefined;
          if (p) refNames.push(p);
        }
        const byName = (list: ColMeta[], n: string): ColMeta | undefined => list.find((c) => c.propertyName === n || c.databaseName === n);
        const cols = names.map((n) => byName(columns, n));
        const refs = refNames.length ? refNames.map((n) => byName(tcols, n)) : this.primaryColumns(target);
        for (const c of refs) if (c) this.useTargetColumn(target, c);
        if (cols.some((c) => !c) || refs.some((c) => !c)) {
          this.project.report(`fkd\u0000${fk.origin.file}\u0000${fk.origin.line}`, {
            severity: 'warning', code: 'typeorm/foreign-key-column-not-found', file: fk.origin.file, line: fk.origin.line,
            message: `a @ForeignKey of ${ent.targetName} names columns that are not found; it is left out`,
          });
          continue;
        }
        ent.foreignKeys.push({
          ...(fk.name ? { name: fk.name } : {}),
          columns: cols.map((c) => c!.databaseName), referencedTable: this.tableIdOf(target), referencedColumns: refs.map((c) => c!.databaseName),
          onDelete: action(fk.onDelete, this.project, fk.origin), onUpdate: action(fk.onUpdate, this.project, fk.origin), enforcement: 'database',
        });
      }
    }
  }

  // ---- output

  private defaultText(c: ColMeta, isEnum: boolean): string | undefined {
    if (!c.default) return undefined;
    let v = c.default.v;
    if (isFnE(v)) {
      const r = this.project.call(v, [], { file: c.origin.file, frames: [], depth: 0 });
      return typeof r === 'string' ? r : v.v.t;
    }
    if (v === undefined || v === null) return undefined;
    if (typeof v === 'string') return isEnum ? v : JSON.stringify(v);
    if (typeof v === 'number' || typeof v === 'boolean') return String(v);
    if (isArrE(v)) return `[${v.e.map((x) => (typeof x === 'string' ? JSON.stringify(x) : textOf(x))).join(', ')}]`;
    if (isUnk(v)) {
      if (v.t === this.mapped.createDateDefault) return v.t;
      this.project.report(`def\u0000${c.origin.file}\u0000${c.origin.line}`, {
        severity: 'info', code: 'typeorm/not-literal', file: c.origin.file, line: c.origin.line,
        message: `the default of ${c.propertyPath} is not a literal (${v.t}); kept as its source text`,
      });
      return v.t;
    }
    v = textOf(v);
    return v;
  }

  private outputColumn(c: ColMeta, table: string, ormName: string | undefined): Column {
    const family = this.ds.family;
    if (c.design && c.mode !== 'virtual') this.designNotes(c, ormName ?? '');
    const written = c.generatedType ?? c.type;
    const normalized = normalizeType(family, written);
    if (!isSupportedType(family, normalized, written) && written !== undefined) {
      this.project.report(`ut\u0000${c.origin.file}\u0000${c.origin.line}\u0000${c.propertyPath}`, {
        severity: 'warning', code: 'typeorm/unsupported-type', file: c.origin.file, line: c.origin.line,
        message: `the type of ${ormName ? ormName + '.' : ''}${c.propertyPath} (${typeof written === 'string' ? written : written.ctor.replace(/^class:/, '')}) is not a column type of ${this.ds.type ?? "postgres (no data source's type was read: PostgreSQL's rules are the default; --typeorm-database names the database)"}; TypeORM would refuse the data source`,
      });
    }
    if (written === undefined) {
      this.project.report(`nt\u0000${c.origin.file}\u0000${c.origin.line}\u0000${c.propertyPath}`, {
        severity: 'warning', code: 'typeorm/no-column-type', file: c.origin.file, line: c.origin.line,
        message: `${ormName ? ormName + '.' : ''}${c.propertyPath} has no column type (none given and none recorded by TypeScript's metadata); TypeORM would refuse it`,
      });
    }
    const isEnum = normalized === 'enum' || (c.enumValues !== undefined && (written === 'enum' || written === 'simple-enum'));
    const enumName = isEnum && family === 'postgres' ? c.enumName ?? `${table}_${c.databaseName.toLowerCase()}_enum` : c.enumName;
    const facets = {
      ...(c.length ? { length: c.length } : {}),
      ...(c.precision !== undefined && c.precision !== null ? { precision: c.precision } : {}),
      ...(c.scale !== undefined ? { scale: c.scale } : {}),
      isArray: c.isArray,
      ...(c.enumValues ? { enumValues: c.enumValues } : {}),
      ...(enumName && isEnum ? { enumName } : {}),
      generatedUuid: c.generated === 'uuid',
    };
    const out: Column = {
      name: c.databaseName,
      ormName: c.propertyPath,
      type: neutralType(family, normalized, written, facets),
      nativeType: nativeTypeText(written, facets),
      nullable: c.primary ? false : c.nullable,
      origin: c.origin,
    };
    const d = this.defaultText(c, isEnum);
    if (d !== undefined) out.default = d;
    const g = c.computed ? 'computed' : generatedKind(c.generated);
    if (g) out.generated = g;
    return out;
  }

  private designNotes(c: ColMeta, where: string): void {
    const d = c.design!;
    if (d.strictNull && typeof c.type === 'object' && c.type.ctor === 'Object') {
      this.project.report(`sn\u0000${c.origin.file}\u0000${c.origin.line}`, {
        severity: 'warning', code: 'typeorm/strict-null-union', file: c.origin.file, line: c.origin.line,
        message: `${where}.${c.propertyPath}: under strictNullChecks TypeScript records the type of a union with null as Object, which TypeORM refuses; read as ${typeof d.strictNull === 'string' ? d.strictNull : d.strictNull.ctor} (give the column a type)`,
      });
      c.type = d.strictNull;
    } else if (d.unresolved && typeof c.type === 'object' && c.type.ctor === 'Object') {
      this.project.report(`ur\u0000${c.origin.file}\u0000${c.origin.line}`, {
        severity: 'warning', code: 'typeorm/type-unresolved', file: c.origin.file, line: c.origin.line,
        message: `${where}.${c.propertyPath}: the type ${d.unresolved} cannot be resolved from the files read; TypeScript would record it as Object, which TypeORM refuses`,
      });
    }
  }

  /** The tables of one entity: its own, then its join and closure tables. */
  entityTables(ent: EntMeta): TableInput[] {
    return [this.tableOutput(ent, 'table', ent.targetName), ...ent.junctions.map((j) => this.tableOutput(j, 'implicit-join', j.targetName || undefined))];
  }

  views(): NonNullable<SnapshotInput['views']> {
    const views: NonNullable<SnapshotInput['views']> = [];
    for (const ent of this.entities) {
      if (ent.kind !== 'view') continue;
      const namespace = this.namespaceOf(ent);
      views.push({ name: ent.tableName, ormName: ent.targetName, ...(namespace ? { namespace } : {}), origin: { file: ent.args.file, line: ent.origin.line } });
    }
    return views;
  }

  /** Start a version: what the previous version's build kept per version is dropped. */
  beginVersion(): void {
    this.phaseA.clear();
    this.closureMemo.clear();
    this.sigMemo.clear();
    this.fresh = new Set();
    this.reused.clear();
  }

  /** Positions of the entities by key (undefined when keys repeat). */
  private positions(): void {
    const at = new Map<string, number>();
    this.entities.forEach((e, i) => at.set(e.key, i));
    this.entAt = at.size === this.entities.length ? at : undefined;
  }

  /**
   * Collect every entity of the version (taking over those whose inputs did not change) and
   * build the others; the frame it returns holds every part of the output.
   */
  fullStep(files: Map<string, TypeormFileFacts>): Frame {
    this.entities = [];
    this.entityByKey.clear();
    this.schemaArgs.clear();
    this.entAt = undefined;
    let col = this.collectEntities(files);
    let dupKeys = new Set<string>();
    let dups = this.project.capture(() => this.nameEntities(dupKeys));
    const entitySet = this.entitySignature();
    if (entitySet !== this.cache.entitySet) {
      // another entity set: nothing of the previous version's entities is taken over
      this.cache.clearEntities();
      this.cache.entitySet = entitySet;
      this.resetEntities();
      col = this.collectEntities(files);
      dupKeys = new Set();
      dups = this.project.capture(() => this.nameEntities(dupKeys));
    }
    this.positions();
    const fresh = new Set(this.entities.filter((e) => e.kind === 'regular' && !this.reused.has(e)));
    this.project.capture(() => this.buildAll(fresh));
    const candAt = new Map<string, number>();
    col.cands.forEach((c, i) => candAt.set(c.a.key, i));
    const unbuilt = col.candEnts.filter((e): e is EntMeta => !!e && (e.kind !== 'regular' || this.entityByKey.get(e.key) !== e));
    return {
      ...col,
      structure: [...col.structure, ...dups],
      fileAt: new Map(col.files.map((f, i) => [f, i])),
      ...(candAt.size === col.cands.length && this.entAt ? { candAt } : {}),
      unbuilt, dupKeys, dedupe: [], views: this.views(),
    };
  }

  /**
   * The version's changes applied to the previous version's frame, when they leave the entity set
   * as it is: the candidates of the files they reach are read again, the entities they reach are
   * built again (with those whose targets now look otherwise), and nothing else is looked at.
   * Returns the entities built, or null when the set may have changed (then `fullStep`).
   */
  patch(frame: Frame, files: Map<string, TypeormFileFacts>): EntMeta[] | null {
    const { candAt } = frame;
    const dirtyFiles = this.cache.dirtyFiles;
    const dirtyEntities = this.cache.dirtyEntities;
    if (!candAt || !dirtyFiles || !dirtyEntities) return null;
    // metas that are not built depend on their candidate and their ancestors only
    for (const e of frame.unbuilt) {
      if (!e.args.cls) continue;
      const t = this.cache.ancestors.get(e.key);
      if (!t || !this.project.valid(t)) return null;
    }
    // candidates of the files the changes reach
    const lists: Array<[number, Tracked<Candidate[]>]> = [];
    const changed: Array<[number, Candidate]> = [];
    for (const f of dirtyFiles) {
      const at = frame.fileAt.get(f);
      const facts = files.get(f);
      const declares = !!facts && (facts.classes.length > 0 || facts.schemas.length > 0);
      if (at === undefined) {
        if (declares) return null;
        continue;
      }
      if (!declares) return null;
      const t = this.candidatesOf(f, facts);
      const before = frame.lists[at]!;
      if (t === before) continue;
      if (t.value.length !== before.value.length) return null;
      for (let i = 0; i < t.value.length; i++) {
        const now = t.value[i]!;
        const old = before.value[i]!;
        if (now.a.key !== old.a.key || now.schemaFactKey !== old.schemaFactKey) return null;
        if (now.a !== old.a) changed.push([candAt.get(now.a.key)!, now]);
      }
      lists.push([at, t]);
    }
    // entities built again: new arguments, or something they read changed
    const replace: Array<{ ci: number; old: EntMeta; ent: EntMeta; c: Candidate }> = [];
    const seen = new Set<number>();
    const renew = (ci: number, c: Candidate): boolean => {
      seen.add(ci);
      const old = frame.candEnts[ci];
      if (!old) {
        // not selected by the data source (a MongoDB entity is another matter)
        return !frame.candMongo[ci] && !c.a.mongo && !this.selected(c);
      }
      if (c.a.mongo || old.sti || old.args.inheritance || c.a.inheritance || frame.dupKeys.has(old.key)) return false;
      if ((old.kind !== 'regular' && old.kind !== 'view') || c.a.tables[0]!.type !== old.kind || this.entityByKey.get(old.key) !== old) return false;
      const ent = this.newEntMeta(c.a);
      this.nameOne(ent);
      if (setSigOf(ent) !== setSigOf(old) || ent.givenTableName !== old.givenTableName || ent.tableNameWithoutPrefix !== old.tableNameWithoutPrefix) return false;
      replace.push({ ci, old, ent, c });
      return true;
    };
    for (const [ci, c] of changed) if (!renew(ci, c)) return null;
    for (const k of dirtyEntities) {
      const ci = candAt.get(k);
      if (ci === undefined || seen.has(ci)) continue;
      const old = frame.candEnts[ci];
      if (!old || old.kind !== 'regular' || this.entityByKey.get(k) !== old) continue;
      if (!renew(ci, frame.cands[ci]!)) return null;
    }
    // the set is the same: apply
    for (const [at, t] of lists) frame.lists[at] = t;
    for (const [ci, c] of changed) {
      frame.cands[ci] = c;
      if (c.a.schema) this.schemaArgs.set(c.a.key, c.a);
    }
    const fresh = new Set<EntMeta>();
    let views = false;
    for (const { ci, old, ent, c } of replace) {
      frame.candEnts[ci] = ent;
      this.entities[this.posOf(old)] = ent;
      this.entityByKey.set(ent.key, ent);
      if (c.schemaFactKey) this.entityByKey.set(c.schemaFactKey, ent);
      if (ent.kind === 'regular') {
        ent.prevIds = tableIds(old.tables);
        fresh.add(ent);
      } else {
        frame.unbuilt[frame.unbuilt.indexOf(old)] = ent;
        views = true;
      }
    }
    const built = fresh.size > 0 ? this.buildAll(fresh) : [];
    if (views) frame.views = this.views();
    return built;
  }

  /** The version's output from the frame: the tables in entity order, duplicates left out, and the diagnostics in a fresh assembly's order. */
  output(frame: Frame, dedupe: boolean): { tables: TableInput[]; views: NonNullable<SnapshotInput['views']>; diagnostics: Diagnostic[]; joinTables: number; entities: number } {
    let tables: TableInput[] = [];
    let entities = 0;
    for (const e of this.entities) {
      if (e.kind !== 'regular') continue;
      entities++;
      for (const x of e.tables!) tables.push(x);
    }
    if (dedupe) {
      let out = tables;
      frame.dedupe = this.project.capture(() => {
        out = dedupeTables(tables, this.project);
      });
      tables = out;
    }
    let joinTables = 0;
    for (const x of tables) if (x.kind === 'implicit-join') joinTables++;
    // one diagnostic per key, in the order a fresh assembly gives them
    const seen = new Set<string>();
    const diagnostics: Diagnostic[] = [...this.diagnostics];
    const add = (list: DiagList | undefined): void => {
      if (!list) return;
      for (const [k, d] of list) {
        if (seen.has(k)) continue;
        seen.add(k);
        diagnostics.push(d);
      }
    };
    add(this.dsResult?.diags);
    for (const t of frame.lists) if (t.diags.length > 0) add(t.diags);
    for (let i = 0; i < frame.cands.length; i++) add(frame.candMongo[i] ?? frame.candEnts[i]?.ancDiags);
    add(frame.structure);
    for (const e of this.entities) if (e.kind === 'regular' && e.phaseADiags!.length > 0) add(e.phaseADiags);
    for (const e of this.entities) if (e.kind === 'regular' && e.resultDiags!.length > 0) add(e.resultDiags);
    add(frame.dedupe);
    return { tables, views: frame.views, diagnostics, joinTables, entities };
  }

  resetEntities(): void {
    this.entities = [];
    this.entityByKey.clear();
    this.reused.clear();
    this.schemaArgs.clear();
  }

  /** A fingerprint of the entity set: names, kinds and inheritance (what string targets and shared tables depend on). */
  entitySignature(): string {
    let out = '';
    for (const e of this.entities) {
      if (e.setSig === undefined || e.kind === 'entity-child') e.setSig = JSON.stringify([e.key, e.kind, e.targetName, e.tableName, e.schema, e.database, e.parent?.key, e.sti, e.args.tree?.type]);
      out += e.setSig + '\n';
    }
    return out;
  }

  /** A target's own inputs and, through its relations, those of the entities it reaches. */
  closure(ent: EntMeta): Tracked<void> {
    const got = this.closureMemo.get(ent);
    if (got) return got;
    const placeholder: Tracked<void> = { value: undefined, deps: new Map(), diags: [] };
    this.closureMemo.set(ent, placeholder);
    const cached = ent.kind === 'regular' && !this.fresh.has(ent) ? this.cache.entities.get(ent.key)?.result : undefined;
    const t = this.project.track(() => {
      if (cached) {
        for (const p of cached.deps.keys()) this.project.touch(p);
        return;
      }
      if (ent.kind === 'entity-child') {
        this.args(ent.key);
        this.ancestors(ent.key);
        if (ent.parent) this.touchAll(this.closure(ent.parent));
        return;
      }
      const a = this.phaseA.get(ent);
      if (a) this.touchAll(a);
      for (const r of ent.relations) if (r.inverse) this.touchAll(this.closure(r.inverse));
    });
    this.closureMemo.set(ent, t);
    return t;
  }

  /** Count every file a tracked result read as read now (without its diagnostics). */
  touchAll(t: Tracked<void>): void {
    for (const p of t.deps.keys()) this.project.touch(p);
  }

  /**
   * What an entity that relates to `target` takes from it: its table, its key columns (as the
   * join and junction columns copy them), the columns it may reference and its relations' ends.
   * An entity's tables are taken over from the previous version only while these are the same.
   */
  signature(target: EntMeta): string {
    if (target.kind === 'regular' && target.sigA !== undefined) return target.sigA;
    let sig = this.sigMemo.get(target);
    if (sig !== undefined) return sig;
    const owner = target.kind === 'entity-child' && target.parent ? target.parent : target;
    const col = (c: ColMeta): unknown[] => [c.propertyName, c.databaseName, c.type, c.length, c.precision, c.scale, c.enumValues, c.enumName, c.primary];
    sig = JSON.stringify([
      this.tableIdOf(target), target.tableNameWithoutPrefix, target.targetName, target.givenTableName, target.schema, target.database,
      owner.ownColumns.filter((c) => c.primary && c.mode !== 'virtual').map(col), owner.embeddeds.map((e) => e.columns.filter((c) => c.primary).map(col)),
      this.relationsOf(target).map((r) => [r.propertyPath, r.args.onDelete, r.args.onUpdate]),
    ]);
    if (target.kind === 'regular') target.sigA = sig;
    else this.sigMemo.set(target, sig);
    return sig;
  }

  /** A column of a target that a join column or junction column references by name. */
  private useTargetColumn(target: EntMeta, c: ColMeta): void {
    // a single-table child's columns are its parent's (built with the parent)
    if (target.kind === 'entity-child' && target.parent) target = target.parent;
    this.targetsUsed?.set(`${target.key}\u0001${c.propertyName}`, JSON.stringify([c.databaseName, c.type, c.length, c.precision, c.scale, c.enumValues, c.enumName]));
  }

  private columnSignature(target: EntMeta, property: string): string | undefined {
    const owner = target.kind === 'entity-child' && target.parent ? target.parent : target;
    const c = [...owner.ownColumns, ...owner.embeddeds.flatMap((e) => e.columns)].find((x) => x.propertyName === property && x.mode !== 'virtual');
    return c ? JSON.stringify([c.databaseName, c.type, c.length, c.precision, c.scale, c.enumValues, c.enumName]) : undefined;
  }

  /** Whether a primary column is also the join column of one of the entity's own relations. */
  private keyedByRelation(ent: EntMeta): boolean {
    const toOne = (rel: RelMeta): boolean => rel.relationType === 'many-to-one' || rel.relationType === 'one-to-one';
    if (ent.relations.some((rel) => toOne(rel) && rel.args.primary)) return true;
    const pks = ent.ownColumns.filter((c) => c.primary);
    if (pks.length === 0) return false;
    for (const rel of ent.relations) {
      if (!toOne(rel)) continue;
      const names = this.joinColumnArgs(rel).map((j) => j.name).filter((n): n is string => !!n);
      if (rel.inverse) for (const ref of this.primaryColumns(rel.inverse)) names.push(this.ds.naming.joinColumnName(rel.propertyName, ref.propertyName));
      if (pks.some((c) => names.includes(c.databaseNameWithoutPrefixes))) return true;
    }
    return false;
  }

  /** Phase B uses a target: its signature is recorded (and, for a key typed by its own relations, what it reaches). */
  private useTarget(target: EntMeta): void {
    if (target.kind === 'entity-child' && target.parent) {
      this.project.touch(target.args.file);
      return this.useTarget(target.parent);
    }
    this.targetsUsed?.set(target.key, this.signature(target));
    if (target.keyedByRelation) this.touchAll(this.closure(target));
  }

  /** Phase A of one entity: its columns, relations and their targets. */
  private runPhaseA(ent: EntMeta): void {
    const t = this.project.track(() => {
      this.project.touch(ent.args.file);
      this.buildColumns(ent);
      this.buildRelations(ent);
      for (const rel of ent.relations) {
        if (rel.relationType === 'one-to-many') continue;
        const inv = this.resolveTarget(rel);
        if (inv) rel.inverse = inv;
      }
      ent.keyedByRelation = this.keyedByRelation(ent);
    });
    this.phaseA.set(ent, t);
    ent.phaseADiags = t.diags;
  }

  /** Position of an entity in the version's entity order. */
  private posOf(ent: EntMeta): number {
    const at = this.entAt?.get(ent.key);
    return at !== undefined && this.entities[at] === ent ? at : this.entities.indexOf(ent);
  }

  private inOrder(list: Iterable<EntMeta>): EntMeta[] {
    return [...list].map((e) => [this.posOf(e), e] as const).sort((x, y) => x[0] - y[0]).map((x) => x[1]);
  }

  /** Entities taken over that used one of these targets when they were built (all of them when keys are not unique). */
  private usersOf(keys: readonly string[]): EntMeta[] {
    const out = new Set<EntMeta>();
    if (!this.entAt) {
      for (const e of this.entities) if (e.kind === 'regular' && !this.fresh.has(e)) out.add(e);
      return [...out];
    }
    for (const k of keys) {
      for (const u of this.cache.targetUsers.get(k) ?? []) {
        const e = this.entityByKey.get(u);
        if (e && e.kind === 'regular' && !this.fresh.has(e) && this.cache.entities.get(u)?.ent === e) out.add(e);
      }
    }
    return this.inOrder(out);
  }

  /** A new meta for an entity taken over, in its place (same arguments, built again). */
  private replaceEntity(old: EntMeta): EntMeta {
    const ent = this.newEntMeta(old.args);
    ent.prevIds = tableIds(old.tables);
    const at = this.posOf(old);
    this.entities[at] = ent;
    this.entityByKey.set(ent.key, ent);
    this.cache.dropEntity(old.key);
    this.nameOne(ent);
    // a single-table parent keeps its children (the entity set is the same, so are they)
    if (old.sti) {
      ent.sti = true;
      ent.tree = [...old.tree];
      for (const r of this.entities) if (r.parent === old) r.parent = ent;
    }
    return ent;
  }

  /**
   * Build the entities of `fresh` (phase A, then phase B in entity order), and again every entity
   * taken over whose targets now look otherwise (found through the index of who used which
   * target), until nothing changes. The others keep their tables.
   */
  buildAll(fresh: Set<EntMeta>): EntMeta[] {
    this.fresh = fresh;
    const rebuiltKeys = new Set<string>();
    let batch = this.inOrder(fresh);
    while (batch.length > 0) {
      for (const ent of batch) this.runPhaseA(ent);
      for (const ent of batch) rebuiltKeys.add(ent.key);
      this.sigMemo.clear();
      for (const ent of batch) this.signature(ent);
      // an entity taken over whose targets now look otherwise is built again; only targets built again in this version can look otherwise
      const next: EntMeta[] = [];
      for (const old of this.usersOf(batch.map((e) => e.key))) {
        const entry = this.cache.entities.get(old.key)!;
        let same = true;
        for (const [k, sig] of entry.targets) {
          const hash = k.indexOf('\u0001');
          const key = hash < 0 ? k : k.slice(0, hash);
          if (!rebuiltKeys.has(key)) continue;
          const t = this.entityByKey.get(key);
          if (!t || (hash < 0 ? this.signature(t) : this.columnSignature(t, k.slice(hash + 1))) !== sig) {
            same = false;
            break;
          }
        }
        if (same) continue;
        const ent = this.replaceEntity(old);
        fresh.add(ent);
        next.push(ent);
      }
      if (next.length > 0) {
        // references to the replaced entities are resolved again
        for (const ent of fresh) for (const rel of ent.relations) if (rel.inverse) rel.inverse = this.entityByKey.get(rel.inverse.key) ?? rel.inverse;
      }
      batch = next;
    }
    const built = this.inOrder(fresh);
    for (const ent of built) {
      const targets = new Map<string, string>();
      this.targetsUsed = targets;
      const result = this.project.track(() => {
        this.project.replay(this.phaseA.get(ent)!);
        for (const rel of ent.relations) if (rel.inverse) this.useTarget(rel.inverse);
        // per entity, as EntityMetadataBuilder does: its join columns, then its junction tables
        for (const rel of ent.relations) if (rel.inverse && (rel.relationType === 'many-to-one' || rel.relationType === 'one-to-one')) this.buildJoinColumns(rel);
        for (const rel of ent.relations) if (rel.inverse && rel.relationType === 'many-to-many') this.buildJunction(rel);
        if (ent.args.tree?.type === 'closure-table') this.buildClosure(ent);
        this.buildUniques(ent);
        this.buildForeignKeyDecorators(ent);
        this.applyGenerations(ent);
        return this.entityTables(ent);
      });
      this.targetsUsed = null;
      ent.tables = result.value;
      ent.resultDiags = result.diags;
      this.cache.setEntity(ent, result, targets);
    }
    return built;
  }

  private tableOutput(ent: EntMeta, kind: 'table' | 'implicit-join', ormName: string | undefined): TableInput {
    const namespace = this.namespaceOf(ent);
    const columns = this.columnsOf(ent);
    const seen = new Set<string>();
    const outCols: Column[] = [];
    for (const c of columns) {
      if (seen.has(c.databaseName)) continue;
      seen.add(c.databaseName);
      outCols.push(this.outputColumn(c, ent.tableName, ormName));
    }
    const pk = columns.filter((c) => c.primary).map((c) => c.databaseName).filter((n, i, a) => a.indexOf(n) === i);
    if (pk.length === 0 && kind === 'table') {
      this.project.report(`pk\u0000${ent.key}`, {
        severity: 'warning', code: 'typeorm/no-primary-column', file: ent.args.file, line: ent.origin.line,
        message: `${ent.targetName} has no primary column; TypeORM would refuse it (the table is kept without a primary key)`,
      });
    }
    const uniques: UniqueConstraint[] = [];
    const ukeys = new Set<string>();
    for (const u of ent.uniques) {
      const cols = u.columns.map((c) => c.databaseName);
      const k = cols.join('\u0000');
      if (ukeys.has(k)) continue;
      ukeys.add(k);
      uniques.push({ ...(u.name ? { name: u.name } : {}), columns: cols });
    }
    const fkKeys = new Set<string>();
    const foreignKeys = ent.foreignKeys.filter((fk) => {
      const k = `${fk.columns.join('\u0000')}\u0001${fk.referencedTable}`;
      if (fkKeys.has(k)) return false;
      fkKeys.add(k);
      return true;
    });
    return {
      name: ent.tableName,
      ...(namespace ? { namespace } : {}),
      ...(ormName ? { ormName } : {}),
      kind,
      columns: outCols,
      primaryKey: pk,
      foreignKeys,
      uniques,
      origin: { file: ent.args.file, line: ent.origin.line },
    };
  }
}

/**
 * One table per physical name: two owning sides of a many-to-many relation often declare the
 * same join table (`@JoinTable({ name })` on both ends); the database has it once. The first
 * (in entity order) is kept; a second with other columns is a warning.
 */
function dedupeTables(tables: TableInput[], project: Project): TableInput[] {
  const seen = new Map<string, TableInput>();
  const out: TableInput[] = [];
  for (const t of tables) {
    const id = t.namespace ? `${t.namespace}.${t.name}` : t.name;
    const first = seen.get(id);
    if (!first) {
      seen.set(id, t);
      out.push(t);
      continue;
    }
    const cols = (x: TableInput): string => x.columns.map((c) => c.name).sort().join(',');
    const same = cols(first) === cols(t);
    project.report(`dupjoin\u0000${id}\u0000${t.origin?.file}\u0000${t.origin?.line}`, {
      severity: same ? 'info' : 'warning', code: 'typeorm/duplicate-table', ...(t.origin ? { file: t.origin.file, line: t.origin.line } : {}),
      message: same
        ? `the join table ${id} is declared again (by ${t.ormName ?? 'another relation'}), with the same columns; it is one table`
        : `a second table ${id} (${t.ormName ?? 'a join table'}) with other columns (${cols(t)}) than the first (${cols(first)}); the first is kept`,
    });
  }
  return out;
}

/** Directories above a path, nearest first (the repository root as ''). */
function ancestorsOf(p: string): string[] {
  const out: string[] = [];
  let d = posix.dirname(p);
  while (d !== '.' && d !== '/') {
    out.push(d);
    d = posix.dirname(d);
  }
  return out;
}

function generatedKind(s: string | undefined): GeneratedKind | undefined {
  switch (s) {
    case 'increment':
      return 'autoincrement';
    case 'identity':
      return 'identity';
    case 'uuid':
      return 'uuid';
    case 'rowid':
      return 'rowid';
    default:
      return undefined;
  }
}

const factIds = new WeakMap<object, number>();
let nextFactId = 1;
const factId = (f: object | undefined): number => {
  if (!f) return 0;
  let id = factIds.get(f);
  if (!id) factIds.set(f, (id = nextFactId++));
  return id;
};

/**
 * The assembly of a run, version after version: what a version's files share with the previous
 * version's is taken over (each entity's tables are rebuilt only when a file they were read from
 * changed, or a target they used now looks otherwise), so that a long history costs about what
 * its changes cost. The output of every version is what a fresh assembly of its files gives,
 * diagnostics and their order included.
 */
export class TypeormAssembler {
  private readonly cache = new AssemblyCache();
  private readonly settings: TypeormSettings;
  private readonly settingsKey: string;
  private pathsKey = '';
  /** The facts of the current version, by path (kept up to date from the changes). */
  private readonly files = new Map<string, TypeormFileFacts>();
  /** The builder of the current paths and configuration (its memos are checked against each version's changes). */
  private builder: Builder | null = null;
  private frame: Frame | null = null;

  /** The workspace packages of the current version (the package.json files its locate step consulted), by name, and their key. */
  private packages: ReadonlyMap<string, readonly WorkspacePackage[]> = new Map();
  private packagesKey = '';
  /** Data source files the locate step consulted (under --path), and their key. */
  private consultedDataSources: ReadonlySet<string> = new Set();
  private consultedKey = '';

  constructor(options: AdapterOptionValues) {
    this.settings = readSettings(options);
    this.settingsKey = JSON.stringify([this.settings.naming, this.settings.database, [...this.settings.decorators], [...this.settings.assume]]);
  }

  assemble(input: AssembleInput<TypeormFileFacts>): AssembleResult {
    const settings = this.settings;
    const cache = this.cache;
    const files = this.files;
    // the paths whose facts changed (added and removed ones included), with their facts before
    const changed: string[] = [];
    const before = new Map<string, TypeormFileFacts | undefined>();
    let count = 0;
    let added = false;
    // (a consulted source file is a data source among the files --path selects: see `consultedDataSources`)
    const consultedSources = (input.consulted ?? []).filter((f) => f.facts?.kind === 'source' && f.facts.configs.length > 0);
    const consultedKey = consultedSources.map((f) => f.path).sort().join('\u0000');
    for (const f of consultedSources.length > 0 ? [...input.files, ...consultedSources] : input.files) {
      if (!f.facts) continue;
      count++;
      const old = files.get(f.path);
      if (old === f.facts) continue;
      changed.push(f.path);
      before.set(f.path, old);
      if (old === undefined) added = true;
      files.set(f.path, f.facts);
    }
    let pathsChanged = added;
    if (added || count !== files.size) {
      const present = new Set([...input.files, ...consultedSources].filter((f) => f.facts).map((f) => f.path));
      for (const [p, f] of files) {
        if (present.has(p)) continue;
        changed.push(p);
        before.set(p, f);
        files.delete(p);
        pathsChanged = true;
      }
    }
    cache.version++;
    const delta: VersionDelta = { version: cache.version, changed };
    // classes by key, brought up to date for the files that changed
    for (const file of changed) {
      for (const c of before.get(file)?.classes ?? []) cache.classByKey.delete(classKey(file, c.name));
      for (const c of files.get(file)?.classes ?? []) cache.classByKey.set(classKey(file, c.name), { file, cls: c });
    }
    // the data source and tsconfig files, kept up to date from the changed paths
    let configsChanged = false;
    if (cache.version === 1 || changed.some((p) => !files.has(p) || files.get(p)!.configs.length > 0 || files.get(p)!.kind === 'tsconfig' || cache.configFiles.includes(p))) {
      const list = [...files].filter(([, f]) => f.configs.length > 0 || f.kind === 'tsconfig').map(([p]) => p).sort();
      configsChanged = list.join('\u0000') !== cache.configFiles.join('\u0000');
      cache.configFiles = list;
    }
    if (cache.version === 1 || pathsChanged) this.pathsKey = JSON.stringify([...files.keys()].sort());
    // the workspace packages that bare imports resolve into: the package.json files the version's
    // locate step consulted (core hands over their facts: `readsConsulted`)
    let packagesChanged = false;
    const list: WorkspacePackage[] = [];
    for (const f of input.consulted ?? []) {
      // (facts of kind `package` are those of a package.json: see parseTypeormFile)
      const pkg = f.facts?.kind === 'package' ? f.facts.package : undefined;
      if (pkg) list.push(workspacePackage(f.path, pkg));
    }
    const packagesKey = JSON.stringify(list.map((w) => [w.file, w.name, w.entries, w.subpaths ?? []]));
    if (packagesKey !== this.packagesKey) {
      this.packagesKey = packagesKey;
      this.packages = packagesByName(list);
      packagesChanged = true;
    }
    let b = this.builder;
    if (b) b.advance(files, delta);
    // the data source is read again when what it read changed; what every result depends on is
    // the options, the paths (module resolution), the data source and tsconfig files
    if (consultedKey !== this.consultedKey) {
      this.consultedKey = consultedKey;
      this.consultedDataSources = new Set(consultedSources.map((f) => f.path));
      configsChanged = true;
    }
    if (!b || cache.version === 1 || pathsChanged || configsChanged || packagesChanged || !b.dsResult || !b.project.valid(b.dsResult)) {
      const nb = new Builder(files, settings, cache, delta, this.packages, this.consultedDataSources);
      const ds = nb.readDataSourceTracked(files, cache.configFiles);
      const global = JSON.stringify([this.settingsKey, this.pathsKey, this.packagesKey, [...ds.deps].map(([p, f]) => [p, typeof f === 'string' ? f : factId(f)])]);
      if (!b || global !== cache.global) {
        cache.clear();
        cache.global = global;
        cache.entitySet = '';
        cache.sortedPaths = [...files.keys()].sort();
        this.builder = b = nb;
        this.frame = null;
      } else {
        // the same data source: the builder and its memos stay
        b.dsResult = ds;
      }
    }
    const ds = b.dsResult!;
    if (ds.value.failed) return { failed: true, diagnostics: [...settings.diagnostics, ds.value.failed] };
    if (cache.version > 1 && cache.fileCandidates.size > 0) cache.markDirty(changed, (p) => exportSignature(before.get(p)) !== exportSignature(files.get(p)));
    else {
      cache.dirtyFiles = null;
      cache.dirtyEntities = null;
    }
    b.beginVersion();
    let frame = this.frame;
    const built = frame ? b.patch(frame, files) : null;
    let dedupe = true;
    if (frame && built) dedupe = frame.dedupe.length > 0 || built.some((e) => e.prevIds === undefined || e.prevIds !== tableIds(e.tables));
    else {
      b.beginVersion();
      this.frame = frame = b.fullStep(files);
    }
    const out = b.output(frame, dedupe);
    const diagnostics = [...settings.diagnostics, ...out.diagnostics];
    for (const m of input.missing) {
      diagnostics.push({ severity: 'warning', code: 'typeorm/file-left-out', file: m, message: `${m} could not be read; entities it declares are missing from this version` });
    }
    return {
      snapshot: { tables: out.tables, views: out.views },
      diagnostics,
      counters: { entities: out.entities, views: out.views.length, joinTables: out.joinTables },
    };
  }
}

/** Build the snapshot of one version from the facts of its files (no state kept between calls). */
export function assembleTypeorm(input: AssembleInput<TypeormFileFacts>, options: AdapterOptionValues): AssembleResult {
  return new TypeormAssembler(options).assemble(input);
}

export { schemaKey };
