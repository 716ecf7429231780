/**
 * Drives Prisma's own schema engine (the WebAssembly build of its migration engine,
 * `@prisma/schema-engine-wasm`, pinned in test/package.json to the engine version the adapter
 * ships) offline, to render the SQL that `prisma migrate diff --from-empty --to-schema` would
 * print for a schema. The engine talks to a database through a driver adapter; here every query
 * it sends is run in PGlite (PostgreSQL compiled to WebAssembly), so nothing is faked.
 */
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import * as bg from '@prisma/schema-engine-wasm/schema_engine_bg';
import { bindMigrationAwareSqlAdapterFactory, ColumnTypeEnum } from '@prisma/driver-adapter-utils';
import { PGlite } from '@electric-sql/pglite';

type Exports = Record<string, unknown>;
type Bg = typeof bg & { __wbg_set_wasm(exports: Exports): void };
/** The WebAssembly global (Node's; @types/node 20 does not declare it). */
const wasmApi = (globalThis as unknown as {
  WebAssembly: { compile(b: Uint8Array): Promise<object>; instantiate(m: object, imports: Record<string, unknown>): Promise<{ exports: Exports }> };
}).WebAssembly;

let ready: Promise<void> | null = null;
let engineDb: PGlite | null = null;

/** Load the engine's wasm module once per process. */
function loadEngine(): Promise<void> {
  if (!ready) {
    ready = (async () => {
      const dir = dirname(fileURLToPath(import.meta.resolve('@prisma/schema-engine-wasm/schema_engine_bg')));
      const module = await wasmApi.compile(readFileSync(join(dir, 'schema_engine_bg.wasm')));
      const instance = await wasmApi.instantiate(module, { './schema_engine_bg.js': bg });
      (bg as Bg).__wbg_set_wasm(instance.exports);
      (instance.exports.__wbindgen_start as () => void)();
    })();
  }
  return ready;
}

/** PostgreSQL type OIDs to the driver adapter's column types (the shape Prisma's pg adapter returns). */
const OID_TYPES: Record<number, number> = {
  16: ColumnTypeEnum.Boolean,
  20: ColumnTypeEnum.Int64,
  21: ColumnTypeEnum.Int32,
  23: ColumnTypeEnum.Int32,
  26: ColumnTypeEnum.Int64,
  700: ColumnTypeEnum.Float,
  701: ColumnTypeEnum.Double,
  1700: ColumnTypeEnum.Numeric,
  1082: ColumnTypeEnum.Date,
  1083: ColumnTypeEnum.Time,
  1114: ColumnTypeEnum.DateTime,
  1184: ColumnTypeEnum.DateTime,
  114: ColumnTypeEnum.Json,
  3802: ColumnTypeEnum.Json,
  17: ColumnTypeEnum.Bytes,
  2950: ColumnTypeEnum.Uuid,
  1000: ColumnTypeEnum.BooleanArray,
  1005: ColumnTypeEnum.Int32Array,
  1007: ColumnTypeEnum.Int32Array,
  1016: ColumnTypeEnum.Int64Array,
  1009: ColumnTypeEnum.TextArray,
  1015: ColumnTypeEnum.TextArray,
  1003: ColumnTypeEnum.TextArray,
};

function toWire(v: unknown, type: number): unknown {
  if (v === null || v === undefined) return null;
  if (Array.isArray(v)) return v.map((x) => toWire(x, type >= 64 && type < 128 ? type - 64 : type));
  if (v instanceof Date) return v.toISOString();
  if (typeof v === 'bigint') return String(v);
  if (type === ColumnTypeEnum.Int64 || type === ColumnTypeEnum.Numeric || type === ColumnTypeEnum.Text) return String(v);
  return v;
}

interface EngineQuery {
  sql: string;
  args: unknown[];
}

/** A driver adapter that runs every query of the engine in a PGlite database. */
function pgliteAdapter(db: PGlite) {
  const queryable = {
    provider: 'postgres' as const,
    adapterName: 'pglite-oracle',
    async queryRaw(q: EngineQuery) {
      const r = await db.query<unknown[]>(q.sql, q.args, { rowMode: 'array' });
      const types = r.fields.map((f) => OID_TYPES[f.dataTypeID] ?? ColumnTypeEnum.Text);
      return {
        columnNames: r.fields.map((f) => f.name),
        columnTypes: types,
        rows: r.rows.map((row) => row.map((v, i) => toWire(v, types[i]!))),
      };
    },
    async executeRaw(q: EngineQuery) {
      const r = await db.query(q.sql, q.args);
      return r.affectedRows ?? 0;
    },
  };
  const connection = {
    ...queryable,
    getConnectionInfo: () => ({ supportsRelationJoins: false, schemaName: 'public' }),
    async executeScript(script: string) {
      await db.exec(script);
    },
    async startTransaction() {
      await db.exec('BEGIN');
      return {
        ...queryable,
        options: { usePhantomQuery: false },
        commit: async () => void (await db.exec('COMMIT')),
        rollback: async () => void (await db.exec('ROLLBACK')),
      };
    },
    dispose: async () => undefined,
  };
  return bindMigrationAwareSqlAdapterFactory({
    provider: 'postgres',
    adapterName: 'pglite-oracle',
    connect: async () => connection,
    connectToShadowDb: async () => connection,
  } as never);
}

/**
 * The SQL Prisma's schema engine renders to create a schema from an empty database (what
 * `prisma migrate diff --from-empty --to-schema-datamodel --script` prints). The schema is one
 * text or the files of a multi-file schema; it must be acceptable to the current engine (pass
 * each text through the adapter's `modernise()` first).
 */
export async function renderCreateSql(schema: string | Array<{ path: string; text: string }>): Promise<string> {
  await loadEngine();
  const files = typeof schema === 'string' ? [{ path: 'schema.prisma', text: schema }] : schema;
  // the engine only asks the database for its version here (a diff from empty applies nothing),
  // so one PGlite serves every rendering of the process
  engineDb ??= new PGlite();
  const engine = await bg.SchemaEngine.new({ datamodels: files.map((f) => [f.path, f.text]) } as never, () => {}, pgliteAdapter(engineDb) as never);
  try {
    const result = await engine.diff({
      from: { tag: 'empty' },
      to: { tag: 'schemaDatamodel', files: files.map((f) => ({ path: f.path, content: f.text })) },
      script: true,
      exitCode: null,
      filters: { externalTables: [], externalEnums: [] },
    } as never);
    return result.stdout ?? '';
  } finally {
    engine.free();
  }
}

/** The engine's version string (for reports). */
export async function schemaEngineVersion(): Promise<string> {
  await loadEngine();
  return bg.version();
}
