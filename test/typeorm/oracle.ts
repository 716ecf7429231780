/**
 * The oracle of the TypeORM adapter: TypeORM itself. The same entity sources are compiled with
 * TypeScript (experimentalDecorators and emitDecoratorMetadata on, so that TypeORM sees the
 * `design:type` metadata a real build gives), loaded, and TypeORM builds its own entity metadata
 * with a DataSource (no database connection: `buildMetadatas()`). The result is reduced to the
 * physical facts the adapter reports, and the adapter's snapshot is compared with it.
 */
import 'reflect-metadata';
import { createRequire } from 'node:module';
import { posix } from 'node:path';
import vm from 'node:vm';
import ts from 'typescript';
import { DataSource, EntitySchema, type DataSourceOptions } from 'typeorm';
import type { Snapshot, SnapshotInput, Table } from '@schema-strata/core';

const requireHere = createRequire(import.meta.url);

export interface OracleColumn {
  name: string;
  /** TypeORM's normalised type (the driver's `normalizeType`). */
  type: string;
  length: string;
  precision?: number | null;
  scale?: number;
  nullable: boolean;
  isArray: boolean;
  enumValues?: string[];
  generated?: string;
  /** The default as TypeORM holds it: a literal, or the text a default function returns. */
  default?: string | number | boolean | null | unknown[];
}

export interface OracleTable {
  name: string;
  schema?: string;
  kind: 'table' | 'junction' | 'closure';
  columns: OracleColumn[];
  primaryKey: string[];
  foreignKeys: Array<{ columns: string[]; referencedTable: string; referencedColumns: string[]; onDelete: string; onUpdate: string }>;
  uniques: string[][];
  /** Join columns of relations that create no constraint (createForeignKeyConstraints: false). */
  ormOnly: Array<{ columns: string[]; referencedTable: string }>;
}

export interface OracleResult {
  tables: OracleTable[];
  views: string[];
}

export interface OracleOptions {
  naming?: 'default' | 'snake';
  entityPrefix?: string;
  schema?: string;
  /** strictNullChecks of the compilation (the fixture's tsconfig says it). */
  strict?: boolean;
  /** tsconfig paths of the compilation. */
  baseUrl?: string;
  paths?: Record<string, string[]>;
}

/** TypeScript's compiler options as a project building its entities would set them. */
function compilerOptions(o: OracleOptions): ts.CompilerOptions {
  return {
    target: ts.ScriptTarget.ES2021,
    module: ts.ModuleKind.CommonJS,
    moduleResolution: ts.ModuleResolutionKind.Node10,
    experimentalDecorators: true,
    emitDecoratorMetadata: true,
    strict: !!o.strict,
    strictPropertyInitialization: false,
    esModuleInterop: true,
    skipLibCheck: true,
    noEmitOnError: false,
    types: [],
    lib: ['lib.es2021.d.ts'],
    ...(o.baseUrl !== undefined ? { baseUrl: '/repo/' + o.baseUrl } : {}),
    ...(o.paths ? { paths: o.paths, ...(o.baseUrl === undefined ? { baseUrl: '/repo' } : {}) } : {}),
  };
}

const libCache = new Map<string, ts.SourceFile>();

/** Compile source files (repository path -> text) in memory; returns emitted JavaScript by repository path. */
export function compile(files: Record<string, string>, o: OracleOptions = {}): Map<string, string> {
  const options = compilerOptions(o);
  const root = '/repo/';
  const inMemory = new Map(Object.entries(files).filter(([p]) => /\.[cm]?tsx?$/.test(p) && !p.endsWith('.d.ts')).map(([p, t]) => [root + p, t]));
  const host = ts.createCompilerHost(options, true);
  const origGet = host.getSourceFile.bind(host);
  host.getSourceFile = (name, lang, onError, create) => {
    const text = inMemory.get(name);
    if (text !== undefined) return ts.createSourceFile(name, text, lang, true);
    let sf = libCache.get(name);
    if (!sf) {
      sf = origGet(name, lang, onError, create);
      if (sf) libCache.set(name, sf);
    }
    return sf;
  };
  host.fileExists = (name) => inMemory.has(name) || (name.includes('/node_modules/typescript/lib/') && ts.sys.fileExists(name));
  host.readFile = (name) => inMemory.get(name) ?? (name.includes('/node_modules/typescript/lib/') ? ts.sys.readFile(name) : undefined);
  host.directoryExists = (d) => [...inMemory.keys()].some((k) => k.startsWith(d.endsWith('/') ? d : d + '/')) || ts.sys.directoryExists(d);
  const out = new Map<string, string>();
  host.writeFile = (name, text) => {
    out.set(name, text);
  };
  const program = ts.createProgram({ rootNames: [...inMemory.keys()], options: { ...options, outDir: '/out', rootDir: '/repo' }, host });
  program.emit();
  const js = new Map<string, string>();
  for (const [name, text] of out) {
    if (!name.endsWith('.js')) continue;
    const rel = name.slice('/out/'.length).replace(/\.js$/, '');
    const src = [...inMemory.keys()].map((k) => k.slice(root.length)).find((k) => k.replace(/\.[cm]?tsx?$/, '') === rel);
    if (src) js.set(src, text);
  }
  return js;
}

/** Load compiled modules (CommonJS) in this process; packages resolve from the test workspace. */
export function load(js: Map<string, string>, o: OracleOptions = {}): Map<string, Record<string, unknown>> {
  const cache = new Map<string, { exports: Record<string, unknown> }>();
  const options = compilerOptions(o);
  const exists = (p: string): boolean => js.has(p);
  const resolveLocal = (from: string, spec: string): string | undefined => {
    const r = ts.resolveModuleName(spec, '/repo/' + from, options, {
      fileExists: (f) => f.startsWith('/repo/') && exists(f.slice('/repo/'.length)),
      readFile: () => undefined,
      directoryExists: (d) => [...js.keys()].some((k) => ('/repo/' + k).startsWith(d.endsWith('/') ? d : d + '/')),
    });
    const f = r.resolvedModule?.resolvedFileName;
    return f && f.startsWith('/repo/') ? f.slice('/repo/'.length) : undefined;
  };
  const run = (path: string): Record<string, unknown> => {
    const got = cache.get(path);
    if (got) return got.exports;
    const mod = { exports: {} as Record<string, unknown> };
    cache.set(path, mod);
    const fn = vm.runInThisContext(`(function (exports, require, module, __filename, __dirname) {${js.get(path)}\n})`, { filename: '/repo/' + path }) as (
      e: unknown, r: (s: string) => unknown, m: unknown, f: string, d: string,
    ) => void;
    const req = (spec: string): unknown => {
      const local = resolveLocal(path, spec);
      if (local) return run(local);
      return requireHere(spec);
    };
    fn(mod.exports, req, mod, '/repo/' + path, '/repo/' + posix.dirname(path));
    return mod.exports;
  };
  const all = new Map<string, Record<string, unknown>>();
  for (const p of [...js.keys()].sort()) all.set(p, run(p));
  return all;
}

/** TypeORM's own metadata of the entity classes and schemas the modules export. */
export async function typeormMetadata(modules: Map<string, Record<string, unknown>>, o: OracleOptions = {}): Promise<DataSource> {
  const entities: Array<Function | EntitySchema> = [];
  for (const exp of modules.values()) {
    for (const v of Object.values(exp)) {
      if (typeof v === 'function' || v instanceof EntitySchema) entities.push(v as Function | EntitySchema);
    }
  }
  const options: DataSourceOptions = {
    type: 'postgres',
    entities,
    ...(o.naming === 'snake' ? { namingStrategy: new (requireHere('typeorm-naming-strategies').SnakeNamingStrategy)() } : {}),
    ...(o.entityPrefix ? { entityPrefix: o.entityPrefix } : {}),
    ...(o.schema ? { schema: o.schema } : {}),
  };
  const ds = new DataSource(options);
  // building the metadata needs no connection (the method is protected in TypeORM's typings)
  await (ds as unknown as { buildMetadatas(): Promise<void> }).buildMetadatas();
  return ds;
}

/** The physical facts TypeORM's metadata gives, in the adapter's terms. */
export function oracleTables(ds: DataSource): OracleResult {
  const driver = ds.driver;
  const tables: OracleTable[] = [];
  const views: string[] = [];
  for (const m of ds.entityMetadatas) {
    if (m.tableType === 'entity-child') continue;
    if (m.tableType === 'view') {
      views.push(m.tableName);
      continue;
    }
    const seen = new Set<string>();
    const columns: OracleColumn[] = [];
    for (const c of m.columns) {
      if (c.isVirtualProperty || seen.has(c.databaseName)) continue;
      seen.add(c.databaseName);
      columns.push({
        name: c.databaseName,
        type: driver.normalizeType(c),
        length: c.length ? String(c.length) : '',
        ...(c.precision !== undefined ? { precision: c.precision } : {}),
        ...(c.scale !== undefined ? { scale: c.scale } : {}),
        nullable: c.isPrimary ? false : c.isNullable,
        isArray: c.isArray,
        ...(c.enum ? { enumValues: c.enum.map(String) } : {}),
        ...(c.isGenerated ? { generated: c.generationStrategy } : {}),
        ...(c.default !== undefined ? { default: typeof c.default === 'function' ? String((c.default as () => unknown)()) : (c.default as OracleColumn['default']) } : {}),
      });
    }
    const uniques = [
      ...m.uniques.map((u) => u.columns.map((c) => c.databaseName)),
      ...m.indices.filter((i) => i.isUnique && !i.where).map((i) => i.columns.map((c) => c.databaseName)),
    ];
    const ormOnly = m.relations
      .filter((r) => !r.createForeignKeyConstraints && r.joinColumns.length > 0 && (r.isManyToOne || r.isOneToOneOwner))
      .map((r) => ({ columns: r.joinColumns.map((c) => c.databaseName), referencedTable: r.inverseEntityMetadata.tablePath }));
    tables.push({
      name: m.tableName,
      ...(m.schema ? { schema: m.schema } : {}),
      kind: m.tableType === 'junction' ? 'junction' : m.tableType === 'closure-junction' ? 'closure' : 'table',
      columns,
      primaryKey: m.primaryColumns.map((c) => c.databaseName),
      foreignKeys: m.foreignKeys.map((fk) => ({
        columns: fk.columnNames, referencedTable: fk.referencedTablePath, referencedColumns: fk.referencedColumnNames,
        onDelete: fk.onDelete ?? 'NO ACTION', onUpdate: fk.onUpdate ?? 'NO ACTION',
      })),
      uniques,
      ormOnly,
    });
  }
  return { tables, views };
}

/** Compile, load and build: TypeORM's view of a set of source files. */
export async function oracle(files: Record<string, string>, o: OracleOptions = {}): Promise<OracleResult> {
  const js = compile(files, o);
  const modules = load(js, o);
  const ds = await typeormMetadata(modules, o);
  return oracleTables(ds);
}

const sameList = (a: readonly string[], b: readonly string[]): boolean => a.length === b.length && a.every((x, i) => x === b[i]);
const sortedKey = (a: readonly string[]): string => [...a].sort().join(',');

/**
 * Differences between the adapter's tables and TypeORM's (empty when they agree). Types are
 * compared by TypeORM's own normalisation of the type the adapter reports (`nativeType`), with
 * length, precision and scale, and by the neutral type family a careful reader maps each
 * PostgreSQL type to (listed here, independent of the adapter's mapping).
 */
export function compareWithOracle(snapshot: Pick<Snapshot, 'tables'> | SnapshotInput, o: OracleResult, ds?: DataSource): string[] {
  const out: string[] = [];
  const ours = new Map<string, (typeof snapshot.tables)[number]>();
  for (const t of snapshot.tables) ours.set(t.namespace ? `${t.namespace}.${t.name}` : t.name, t);
  // a table TypeORM describes twice (a join table both ends declare) is one table: the first description counts
  const theirs = new Map<string, OracleTable>();
  for (const t of o.tables) {
    const k = t.schema && t.schema !== 'public' ? `${t.schema}.${t.name}` : t.name;
    if (!theirs.has(k)) theirs.set(k, t);
  }
  for (const k of theirs.keys()) if (!ours.has(k)) out.push(`table ${k}: TypeORM has it, the adapter does not`);
  for (const k of ours.keys()) if (!theirs.has(k)) out.push(`table ${k}: the adapter has it, TypeORM does not`);
  for (const [k, t] of theirs) {
    const a = ours.get(k);
    if (!a) continue;
    const expectKind = t.kind === 'table' ? 'table' : 'implicit-join';
    if (a.kind !== expectKind) out.push(`${k}: kind ${a.kind}, TypeORM ${t.kind}`);
    const cols = new Map(a.columns.map((c) => [c.name, c]));
    for (const c of t.columns) {
      const ac = cols.get(c.name);
      if (!ac) {
        out.push(`${k}.${c.name}: missing from the adapter`);
        continue;
      }
      const where = `${k}.${c.name}`;
      if (ac.nullable !== c.nullable) out.push(`${where}: nullable ${ac.nullable}, TypeORM ${c.nullable}`);
      const family = pgFamily(c.type);
      if (family !== ac.type.kind && !(ac.type.kind === 'array' && c.isArray)) out.push(`${where}: neutral ${ac.type.kind}, TypeORM's ${c.type} is ${family}`);
      if (c.isArray !== (ac.type.kind === 'array')) out.push(`${where}: array ${ac.type.kind === 'array'}, TypeORM ${c.isArray}`);
      if (ds) {
        const native = ac.nativeType.replace(/\[\]$/, '').replace(/\(.*\)$/, '');
        const ctor = ({ String, Number, Boolean, Date, Buffer, Object } as Record<string, unknown>)[native];
        const normalised = ds.driver.normalizeType({ type: (ctor ?? native) as never });
        if (normalised !== c.type) out.push(`${where}: TypeORM normalises the adapter's ${ac.nativeType} to ${normalised}, its own column is ${c.type}`);
      }
      const t0 = ac.type.kind === 'array' ? ac.type.of : ac.type;
      if (c.length && 'length' in t0 && String(t0.length ?? '') !== c.length) out.push(`${where}: length ${String((t0 as { length?: number }).length)}, TypeORM ${c.length}`);
      if (c.length && !('length' in t0) && !['uuid', 'integer', 'bigint'].includes(t0.kind)) out.push(`${where}: TypeORM length ${c.length}, the adapter has none (${t0.kind})`);
      if (t0.kind === 'decimal') {
        if ((t0.precision ?? null) !== (c.precision ?? null)) out.push(`${where}: precision ${t0.precision}, TypeORM ${c.precision}`);
        if ((t0.scale ?? null) !== (c.scale ?? null)) out.push(`${where}: scale ${t0.scale}, TypeORM ${c.scale}`);
      }
      if (t0.kind === 'enum' && c.enumValues && !sameList(t0.values, c.enumValues)) out.push(`${where}: enum ${t0.values.join('|')}, TypeORM ${c.enumValues.join('|')}`);
      const gen = { increment: 'autoincrement', identity: 'identity', uuid: 'uuid', rowid: 'rowid' }[c.generated ?? ''] ;
      if ((gen ?? undefined) !== (ac.generated && ac.generated !== 'computed' ? ac.generated : undefined)) out.push(`${where}: generated ${ac.generated}, TypeORM ${c.generated}`);
      if (!sameDefault(ac.default, c.default, t0.kind === 'enum')) out.push(`${where}: default ${ac.default}, TypeORM ${JSON.stringify(c.default)}`);
    }
    for (const c of a.columns) if (!t.columns.some((x) => x.name === c.name)) out.push(`${k}.${c.name}: the adapter has it, TypeORM does not`);
    if (!sameList(a.primaryKey, t.primaryKey)) out.push(`${k}: primary key (${a.primaryKey.join(',')}), TypeORM (${t.primaryKey.join(',')})`);
    const ourFks = a.foreignKeys.filter((f) => f.enforcement === 'database').map((f) => `${f.columns.join(',')}->${f.referencedTable}(${f.referencedColumns.join(',')}) ${f.onDelete}/${f.onUpdate}`).sort();
    const theirFks = t.foreignKeys.map((f) => `${f.columns.join(',')}->${f.referencedTable.replace(/^public\./, '')}(${f.referencedColumns.join(',')}) ${f.onDelete.toLowerCase()}/${f.onUpdate.toLowerCase()}`).sort();
    if (ourFks.join('; ') !== theirFks.join('; ')) out.push(`${k}: foreign keys [${ourFks.join('; ')}], TypeORM [${theirFks.join('; ')}]`);
    const ourOrm = a.foreignKeys.filter((f) => f.enforcement === 'orm').map((f) => `${f.columns.join(',')}->${f.referencedTable}`).sort();
    const theirOrm = t.ormOnly.map((f) => `${f.columns.join(',')}->${f.referencedTable.replace(/^public\./, '')}`).sort();
    if (t.kind === 'table' && ourOrm.join('; ') !== theirOrm.join('; ')) out.push(`${k}: ORM-only keys [${ourOrm.join('; ')}], TypeORM's relations without constraints [${theirOrm.join('; ')}]`);
    const ourU = [...new Set(a.uniques.map((u) => sortedKey(u.columns)))].sort();
    const theirU = [...new Set(t.uniques.map(sortedKey))].sort();
    if (ourU.join(' ') !== theirU.join(' ')) out.push(`${k}: uniques [${ourU.join(' ')}], TypeORM [${theirU.join(' ')}]`);
  }
  return out;
}

/** The adapter writes string defaults as JSON strings (enum values bare), function defaults as the SQL they return. */
function sameDefault(ours: string | undefined, theirs: OracleColumn['default'], isEnum: boolean): boolean {
  if (theirs === undefined || theirs === null) return ours === undefined;
  if (ours === undefined) return false;
  if (Array.isArray(theirs)) return ours === `[${theirs.map((x) => JSON.stringify(x)).join(', ')}]`;
  if (typeof theirs === 'string') return ours === theirs || (!isEnum && ours === JSON.stringify(theirs));
  return ours === String(theirs);
}

/**
 * The neutral family of each PostgreSQL type TypeORM normalises to (PostgreSQL documentation,
 * "Data Types"; the family names are the neutral model's).
 */
export function pgFamily(t: string): string {
  const m: Record<string, string> = {
    integer: 'integer', int: 'integer', int4: 'integer', smallint: 'smallint', int2: 'smallint', bigint: 'bigint', int8: 'bigint',
    numeric: 'decimal', decimal: 'decimal', real: 'float', float4: 'float', 'double precision': 'double', float8: 'double',
    boolean: 'boolean', bool: 'boolean', 'character varying': 'string', varchar: 'string', text: 'text', uuid: 'uuid', date: 'date',
    'time without time zone': 'time', 'time with time zone': 'time', 'timestamp without time zone': 'timestamp',
    'timestamp with time zone': 'timestamp', json: 'json', jsonb: 'json', bytea: 'binary', enum: 'enum',
  };
  return m[t] ?? 'other';
}

export type { Table };
