// The oracle of the Knex adapter: Knex itself. The fixture migrations (our own files) are
// transpiled to CommonJS with TypeScript and run for real, in Knex's own order (its file-system
// migration source, lib/migrations/migrate/sources/fs-migrations.js, over the directories the
// fixture's knexfile names), on SQLite (better-sqlite3) or on PostgreSQL (PGlite); the
// database is introspected after each migration.
import { cpSync, mkdirSync, mkdtempSync, symlinkSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { dirname, extname, isAbsolute, join, resolve } from 'node:path';
import ts from 'typescript';
import type { Knex as KnexType } from 'knex';
import type { PGlite } from '@electric-sql/pglite';

const require = createRequire(import.meta.url);
const Knex = require('knex') as typeof import('knex').knex;
const { FsMigrations } = require('knex/lib/migrations/migrate/sources/fs-migrations.js') as {
  FsMigrations: new (dirs: string[], sortDirsSeparately?: boolean, loadExtensions?: string[]) => {
    getMigrations(le?: string[]): Promise<Array<{ file: string; directory: string }>>;
    getMigrationName(m: { file: string }): string;
  };
};
const ClientPG = require('knex/lib/dialects/postgres/index.js') as new (config: unknown) => object;

export interface DbColumn {
  name: string;
  nullable: boolean;
  /** Default as the database shows it. */
  default: string | null;
  /** Declared type (SQLite) or information_schema data (PostgreSQL). */
  type: string;
  pg?: { dataType: string; udt: string; length: number | null; precision: number | null; scale: number | null; timePrecision: number | null; comment: string | null };
}

export interface DbForeignKey {
  columns: string[];
  table: string;
  refColumns: string[];
  onDelete?: string;
  onUpdate?: string;
}

export interface DbTable {
  schema?: string;
  name: string;
  columns: DbColumn[];
  primaryKey: string[];
  foreignKeys: DbForeignKey[];
  uniques: string[][];
  /** Allowed values of text columns with a `col in (...)` check (Knex's non-native enums). */
  checks: Record<string, string[]>;
  /** Native enum types of columns (PostgreSQL). */
  enums: Record<string, { name: string; values: string[] }>;
}

export interface OracleRun {
  /** Migration names in the order Knex ran them. */
  migrations: string[];
  /** The database after each migration (when asked), else only after the last. */
  after: Array<{ migration: string; tables: DbTable[] }>;
  final: DbTable[];
}

const SOURCE = new Set(['.js', '.cjs', '.mjs', '.ts', '.cts', '.mts']);
const KNEX_TABLES = new Set(['knex_migrations', 'knex_migrations_lock', 'sqlite_sequence']);

/** Write files to disk and their CommonJS translation beside it (TypeScript's transpileModule). */
function writeFiles(src: string, out: string, files: Iterable<[string, string]>): void {
  for (const [path, text] of files) {
    const file = join(src, path);
    mkdirSync(dirname(file), { recursive: true });
    writeFileSync(file, text);
    if (!SOURCE.has(extname(path))) continue;
    const js = ts.transpileModule(text, {
      // the module kind follows the extension for .mjs/.mts: name every file .js/.ts so that all become CommonJS
      fileName: path.replace(/\.[mc]?(js|ts)$/, '.$1'),
      compilerOptions: { module: ts.ModuleKind.CommonJS, target: ts.ScriptTarget.ES2020, esModuleInterop: true, allowJs: true },
    }).outputText;
    const target = join(out, path.slice(0, -extname(path).length) + '.js');
    mkdirSync(dirname(target), { recursive: true });
    writeFileSync(target, js);
  }
}

function materialise(tree: Map<string, string>): { src: string; out: string } {
  const root = mkdtempSync(join(tmpdir(), 'strata-knex-oracle-'));
  const src = join(root, 'src');
  const out = join(root, 'out');
  writeFiles(src, out, tree);
  mkdirSync(join(out, 'node_modules'), { recursive: true });
  symlinkSync(dirname(require.resolve('knex/package.json')), join(out, 'node_modules', 'knex'));
  writeFileSync(join(out, 'package.json'), '{"type":"commonjs"}\n');
  return { src, out };
}

const outPath = (src: string, out: string, file: string): string => {
  const rel = file.slice(src.length + 1);
  return join(out, rel.slice(0, -extname(rel).length) + '.js');
};

/** A Knex client for PostgreSQL that sends its queries to a PGlite instance (no network, no server). */
class ClientPGlite extends ClientPG {
  _driver(): object {
    return {};
  }
  async _acquireOnlyConnection(): Promise<PGlite> {
    return (this as unknown as { config: { connection: { pglite: PGlite } } }).config.connection.pglite;
  }
  async acquireRawConnection(): Promise<PGlite> {
    const connection = await this._acquireOnlyConnection();
    await this.setSchemaSearchPath(connection);
    return connection;
  }
  async destroyRawConnection(): Promise<void> {}
  async checkVersion(): Promise<string> {
    return '17.0';
  }
  /** Knex's own statement for a configured `searchPath` (lib/dialects/postgres: setSchemaSearchPath), run through PGlite. */
  async setSchemaSearchPath(connection: PGlite): Promise<boolean> {
    const path = (this as unknown as { searchPath?: string | string[] }).searchPath;
    if (!path) return true;
    const list = (Array.isArray(path) ? path : [path]).map((s) => `"${s.replace(/"/g, '""')}"`).join(',');
    await connection.exec(`set search_path to ${list}`);
    return true;
  }
  validateConnection(): boolean {
    return true;
  }
  async _query(connection: PGlite, obj: { sql: string; bindings?: unknown[]; response?: unknown }): Promise<unknown> {
    const r = await connection.query(obj.sql, (obj.bindings ?? []) as unknown[]);
    const command = (/^\s*(\w+)/.exec(obj.sql)?.[1] ?? '').toUpperCase();
    obj.response = { rows: r.rows, rowCount: r.affectedRows ?? r.rows.length, command };
    return obj;
  }
}

/** Drop everything a previous run left in a PGlite database. */
export async function resetPg(pg: PGlite): Promise<void> {
  const schemas = await pg.query<{ nspname: string }>(
    `select nspname from pg_namespace where nspname not in ('pg_catalog', 'information_schema', 'pg_toast') and nspname not like 'pg_temp%' and nspname not like 'pg_toast%'`,
  );
  for (const s of schemas.rows) await pg.exec(`drop schema "${s.nspname}" cascade`);
  await pg.exec('create schema public');
}

export interface RunOptions {
  engine: 'sqlite' | 'pglite';
  pglite?: PGlite;
  /** Knexfile environment whose migration settings are used. */
  environment: string;
  /** Base-schema setup files run before the migrations (their exported function). */
  init?: string[];
  /** Introspect after every migration (else only at the end). */
  each?: boolean;
  /**
   * PGlite: the client name `knex.client.config.client` holds, as for a project configured with
   * that string (Knex's Client constructor keeps the configuration, `this.config = { ...config }`,
   * lib/client.js); the run itself passes Knex a client class, which would be there instead.
   */
  clientName?: string;
  /** PGlite: the connection's `searchPath`, as a knexfile configures it. */
  searchPath?: string[];
  /**
   * Workspace packages of the tree, installed as a package manager links them
   * (`node_modules/NAME` -> the package's directory), and built as their build would: the
   * compiled files of `dir/src` copied to `dir/build` (what `tsc` does with that rootDir and
   * outDir), so that Node loads the package by its package.json's `main`.
   */
  packages?: Array<{ name: string; dir: string; build: string }>;
}

/**
 * A project on disk with its database, as Knex's CLI would use it from the knexfile's directory:
 * `migrate()` runs the pending migrations (as `knex migrate:latest`, one by one), `add()` brings
 * in the files of a later commit that only adds files (then the same database goes on).
 */
export class KnexProject {
  /** Every migration run on this database, in order. */
  readonly ran: string[] = [];
  private constructor(
    private readonly src: string,
    private readonly out: string,
    private readonly knex: KnexType,
    private readonly opts: RunOptions,
  ) {}

  static async open(tree: Map<string, string>, opts: RunOptions): Promise<KnexProject> {
    const { src, out } = materialise(tree);
    for (const p of opts.packages ?? []) {
      writeFileSync(join(out, p.dir, 'package.json'), tree.get(`${p.dir}/package.json`)!);
      cpSync(join(out, p.dir, 'src'), join(out, p.dir, p.build), { recursive: true });
      const link = join(out, 'node_modules', p.name);
      mkdirSync(dirname(link), { recursive: true });
      symlinkSync(join(out, p.dir), link);
    }
    const knexfile = [...tree.keys()].find((p) => /^knexfile\.(js|ts|cjs|mjs)$/.test(p));
    let migrationsConfig: { directory?: string | string[]; loadExtensions?: string[]; sortDirsSeparately?: boolean } = {};
    if (knexfile) {
      const mod = require(outPath(src, out, join(src, knexfile))) as { default?: Record<string, KnexType.Config> } & Record<string, KnexType.Config>;
      const config = (mod.default ?? mod) as Record<string, KnexType.Config>;
      const env = (config[opts.environment] ?? config) as KnexType.Config;
      migrationsConfig = (env.migrations ?? {}) as typeof migrationsConfig;
    }
    // Knex's CLI works in the knexfile's directory: relative directories are relative to it
    const dirs = (Array.isArray(migrationsConfig.directory) ? migrationsConfig.directory : [migrationsConfig.directory ?? './migrations']).map((d) =>
      isAbsolute(d) ? d.replace(out, src) : resolve(src, d),
    );
    const fsSource = new FsMigrations(dirs, migrationsConfig.sortDirsSeparately ?? false, migrationsConfig.loadExtensions);
    const migrationSource = {
      // Knex hands its default loadExtensions to a custom source; the knexfile's own apply here, as they would with Knex's CLI
      getMigrations: () => fsSource.getMigrations(migrationsConfig.loadExtensions),
      getMigrationName: (m: { file: string }) => fsSource.getMigrationName(m),
      getMigration: async (m: { file: string; directory: string }) => require(outPath(src, out, join(m.directory, m.file))),
    };
    const migrations = { migrationSource };
    const knex =
      opts.engine === 'sqlite'
        ? Knex({ client: 'better-sqlite3', connection: { filename: join(src, '..', 'oracle.sqlite3') }, useNullAsDefault: true, migrations })
        : Knex({ client: ClientPGlite as never, connection: { pglite: opts.pglite } as never, pool: { min: 1, max: 1 }, migrations, ...(opts.searchPath ? { searchPath: opts.searchPath } : {}) });
    if (opts.clientName !== undefined) (knex.client as { config: { client: unknown } }).config.client = opts.clientName;
    const project = new KnexProject(src, out, knex, opts);
    try {
      for (const file of opts.init ?? []) {
        const mod = require(outPath(src, out, join(src, file))) as ((k: KnexType) => Promise<void>) & { default?: (k: KnexType) => Promise<void>; up?: (k: KnexType) => Promise<void> };
        const fn = mod.up ?? mod.default ?? mod;
        await fn(knex);
      }
    } catch (e) {
      await knex.destroy();
      throw e;
    }
    return project;
  }

  /** Write the files a later commit adds. */
  add(files: Iterable<[string, string]>): void {
    writeFiles(this.src, this.out, files);
  }

  /** Names of the migrations Knex has not run yet, in its order. */
  async pending(): Promise<string[]> {
    const [, pending] = (await this.knex.migrate.list()) as [unknown[], Array<{ file: string }>];
    return pending.map((p) => p.file);
  }

  /** Run the pending migrations one by one; the database after each (when asked) and at the end. */
  async migrate(each = false): Promise<OracleRun> {
    const introspect = (): Promise<DbTable[]> => (this.opts.engine === 'sqlite' ? introspectSqlite(this.knex) : introspectPg(this.opts.pglite!));
    const names: string[] = [];
    const after: OracleRun['after'] = [];
    for (const file of await this.pending()) {
      await this.knex.migrate.up();
      names.push(file);
      this.ran.push(file);
      if (each) after.push({ migration: file, tables: await introspect() });
    }
    return { migrations: names, after, final: await introspect() };
  }

  close(): Promise<void> {
    return this.knex.destroy();
  }
}

/** Run the migrations of a tree for real with Knex on a new database. */
export async function runKnex(tree: Map<string, string>, opts: RunOptions): Promise<OracleRun> {
  const project = await KnexProject.open(tree, opts);
  try {
    return await project.migrate(opts.each);
  } finally {
    await project.close();
  }
}

// ------------------------------------------------------------------ SQLite introspection

async function introspectSqlite(knex: KnexType): Promise<DbTable[]> {
  const all = (sql: string): Promise<Array<Record<string, unknown>>> => knex.raw(sql) as unknown as Promise<Array<Record<string, unknown>>>;
  const names = (await all(`select name, sql from sqlite_master where type = 'table' order by name`)).filter((r) => !KNEX_TABLES.has(String(r.name)));
  const out: DbTable[] = [];
  for (const r of names) {
    const name = String(r.name);
    const q = name.replace(/"/g, '""');
    const cols = await all(`pragma table_info("${q}")`);
    const fks = await all(`pragma foreign_key_list("${q}")`);
    const idx = await all(`pragma index_list("${q}")`);
    const byId = new Map<number, DbForeignKey>();
    for (const f of fks) {
      const id = Number(f.id);
      const fk = byId.get(id) ?? { columns: [], table: String(f.table), refColumns: [], onDelete: String(f.on_delete), onUpdate: String(f.on_update) };
      fk.columns.push(String(f.from));
      fk.refColumns.push(String(f.to));
      byId.set(id, fk);
    }
    const uniques: string[][] = [];
    for (const i of idx) {
      if (Number(i.unique) !== 1 || i.origin === 'pk') continue;
      const info = await all(`pragma index_info("${String(i.name).replace(/"/g, '""')}")`);
      uniques.push(info.sort((a, b) => Number(a.seqno) - Number(b.seqno)).map((x) => String(x.name)));
    }
    const checks: Record<string, string[]> = {};
    const sql = String(r.sql ?? '');
    for (const m of sql.matchAll(/[`"]?(\w+)[`"]?\s+in\s*\(((?:'[^']*'\s*,?\s*)+)\)/gi)) {
      checks[m[1]!] = [...m[2]!.matchAll(/'([^']*)'/g)].map((x) => x[1]!);
    }
    out.push({
      name,
      columns: cols.map((c) => ({ name: String(c.name), nullable: Number(c.notnull) === 0, default: c.dflt_value === null ? null : String(c.dflt_value), type: String(c.type) })),
      primaryKey: cols.filter((c) => Number(c.pk) > 0).sort((a, b) => Number(a.pk) - Number(b.pk)).map((c) => String(c.name)),
      foreignKeys: [...byId.values()],
      uniques,
      checks,
      enums: {},
    });
  }
  return out;
}

// ------------------------------------------------------------------ PostgreSQL introspection

const ACTION: Record<string, string> = { a: 'NO ACTION', r: 'RESTRICT', c: 'CASCADE', n: 'SET NULL', d: 'SET DEFAULT' };

async function introspectPg(pg: PGlite): Promise<DbTable[]> {
  const rows = async <T>(sql: string): Promise<T[]> => (await pg.query<T>(sql)).rows;
  const tables = await rows<{ table_schema: string; table_name: string }>(
    `select table_schema, table_name from information_schema.tables where table_type = 'BASE TABLE' and table_schema not in ('pg_catalog', 'information_schema') order by table_schema, table_name`,
  );
  const cols = await rows<Record<string, string | number | null>>(
    `select c.table_schema, c.table_name, c.column_name, c.is_nullable, c.column_default, c.data_type, c.udt_name, c.udt_schema,
            c.character_maximum_length, c.numeric_precision, c.numeric_scale, c.datetime_precision,
            col_description(format('%I.%I', c.table_schema, c.table_name)::regclass, c.ordinal_position::int) as comment
       from information_schema.columns c where c.table_schema not in ('pg_catalog', 'information_schema') order by c.ordinal_position`,
  );
  const cons = await rows<{ schema: string; table: string; contype: string; cols: string[] | string; ref_schema: string | null; ref_table: string | null; ref_cols: string[] | string | null; del: string; upd: string; def: string }>(
    `select ns.nspname as schema, cl.relname as table, c.contype,
            array(select a.attname::text from unnest(c.conkey) with ordinality k(n, i) join pg_attribute a on a.attrelid = c.conrelid and a.attnum = k.n order by k.i) as cols,
            rns.nspname as ref_schema, rcl.relname as ref_table,
            array(select a.attname::text from unnest(c.confkey) with ordinality k(n, i) join pg_attribute a on a.attrelid = c.confrelid and a.attnum = k.n order by k.i) as ref_cols,
            c.confdeltype as del, c.confupdtype as upd, pg_get_constraintdef(c.oid) as def
       from pg_constraint c join pg_class cl on cl.oid = c.conrelid join pg_namespace ns on ns.oid = cl.relnamespace
       left join pg_class rcl on rcl.oid = c.confrelid left join pg_namespace rns on rns.oid = rcl.relnamespace
      where c.contype in ('p', 'f', 'c', 'u')`,
  );
  const uidx = await rows<{ schema: string; table: string; cols: string[] | string }>(
    `select ns.nspname as schema, cl.relname as table,
            array(select a.attname::text from unnest(i.indkey::int2[]) with ordinality k(n, o) join pg_attribute a on a.attrelid = i.indrelid and a.attnum = k.n order by k.o) as cols
       from pg_index i join pg_class cl on cl.oid = i.indrelid join pg_namespace ns on ns.oid = cl.relnamespace
      where i.indisunique and not i.indisprimary and not exists (select 1 from pg_constraint c where c.conindid = i.indexrelid)
        and ns.nspname not in ('pg_catalog', 'information_schema', 'pg_toast')`,
  );
  const enums = await rows<{ schema: string; name: string; label: string }>(
    `select n.nspname as schema, t.typname as name, e.enumlabel as label from pg_type t join pg_enum e on e.enumtypid = t.oid join pg_namespace n on n.oid = t.typnamespace order by t.typname, e.enumsortorder`,
  );
  const enumValues = new Map<string, string[]>();
  for (const e of enums) enumValues.set(`${e.schema}.${e.name}`, [...(enumValues.get(`${e.schema}.${e.name}`) ?? []), e.label]);
  const arr = (v: string[] | string | null): string[] => (v === null ? [] : Array.isArray(v) ? v : v.replace(/^\{|\}$/g, '').split(',').filter(Boolean));
  const out: DbTable[] = [];
  for (const t of tables) {
    if (KNEX_TABLES.has(t.table_name)) continue;
    const mine = <X extends { schema?: unknown; table?: unknown; table_schema?: unknown; table_name?: unknown }>(x: X): boolean =>
      (x.schema ?? x.table_schema) === t.table_schema && (x.table ?? x.table_name) === t.table_name;
    const tc = cons.filter(mine);
    const checks: Record<string, string[]> = {};
    for (const c of tc.filter((x) => x.contype === 'c')) {
      const m = /\(\(?"?(\w+)"?\s*=\s*ANY\s*\(\(?ARRAY\[(.*)\]\)?/.exec(c.def) ?? /"?(\w+)"?\s+in\s*\((.*)\)/i.exec(c.def);
      if (m) checks[m[1]!] = [...m[2]!.matchAll(/'([^']*)'/g)].map((x) => x[1]!);
    }
    const tcols = cols.filter(mine);
    const colEnums: DbTable['enums'] = {};
    for (const c of tcols) {
      if (c.data_type === 'USER-DEFINED' && enumValues.has(`${c.udt_schema}.${c.udt_name}`)) {
        colEnums[String(c.column_name)] = { name: String(c.udt_name), values: enumValues.get(`${c.udt_schema}.${c.udt_name}`)! };
      }
    }
    out.push({
      ...(t.table_schema !== 'public' ? { schema: t.table_schema } : {}),
      name: t.table_name,
      columns: tcols.map((c) => ({
        name: String(c.column_name),
        nullable: c.is_nullable === 'YES',
        default: c.column_default === null ? null : String(c.column_default),
        type: String(c.data_type),
        pg: {
          dataType: String(c.data_type),
          udt: String(c.udt_name),
          length: c.character_maximum_length === null ? null : Number(c.character_maximum_length),
          precision: c.numeric_precision === null ? null : Number(c.numeric_precision),
          scale: c.numeric_scale === null ? null : Number(c.numeric_scale),
          timePrecision: c.datetime_precision === null ? null : Number(c.datetime_precision),
          comment: c.comment === null ? null : String(c.comment),
        },
      })),
      primaryKey: arr(tc.find((x) => x.contype === 'p')?.cols ?? null),
      foreignKeys: tc.filter((x) => x.contype === 'f').map((x) => ({
        columns: arr(x.cols),
        table: x.ref_schema && x.ref_schema !== 'public' ? `${x.ref_schema}.${x.ref_table}` : String(x.ref_table),
        refColumns: arr(x.ref_cols),
        onDelete: ACTION[x.del],
        onUpdate: ACTION[x.upd],
      })),
      uniques: [...tc.filter((x) => x.contype === 'u').map((x) => arr(x.cols)), ...uidx.filter(mine).map((x) => arr(x.cols))],
      checks,
      enums: colEnums,
    });
  }
  return out;
}
