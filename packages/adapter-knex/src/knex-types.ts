import { withPrecision, type GeneratedKind, type NeutralType } from '@schema-strata/core/extract';

/** Database families whose type mappings differ in Knex's column compilers. */
export type Dialect = 'postgresql' | 'mysql' | 'sqlite' | 'mssql' | 'oracle';

export const DIALECTS: readonly Dialect[] = ['postgresql', 'mysql', 'sqlite', 'mssql', 'oracle'];

/** The dialect of a Knex `client` name (Knex's own client aliases), or undefined when unknown. */
export function dialectOf(client: string | undefined): Dialect | undefined {
  if (!client) return undefined;
  const c = client.toLowerCase();
  if (['pg', 'postgres', 'postgresql', 'pgnative', 'pg-native', 'cockroachdb', 'redshift'].includes(c)) return 'postgresql';
  if (['mysql', 'mysql2', 'mariadb', 'mariasql'].includes(c)) return 'mysql';
  if (['sqlite', 'sqlite3', 'better-sqlite3'].includes(c)) return 'sqlite';
  if (['mssql', 'tedious'].includes(c)) return 'mssql';
  if (['oracle', 'oracledb'].includes(c)) return 'oracle';
  if (DIALECTS.includes(c as Dialect)) return c as Dialect;
  return undefined;
}

/**
 * What a Knex instance's client says about the database: `knex.client.dialect`,
 * `knex.client.driverName`, and `knex.client.config.client` (the configuration's `client` as
 * written, absent when the configuration names it as `dialect`).
 */
export interface KnexClientInfo {
  dialect: string;
  driverName: string;
  configClient?: string;
}

/**
 * `dialect` and `driverName` of each client name Knex accepts, from Knex 3.3's own source:
 * lib/constants.js (`SUPPORTED_CLIENTS`; `CLIENT_ALIASES` pg and postgresql -> postgres,
 * sqlite -> sqlite3), lib/dialects/index.js (the class of each name), and the prototype of each
 * class in lib/dialects/<name>/index.js: mysql2 and mariadb inherit MySQL's dialect, cockroachdb
 * and pgnative PostgreSQL's, better-sqlite3 SQLite3's. These are the prototype's values, which a
 * migration sees: Knex runs migrations in a transaction by default, whose client is made from
 * the class's prototype (lib/execution/transaction.js `makeTxClient`), so pgnative's driverName
 * reads 'pg' there (its constructor sets 'pgnative' on the instance only). Knex compares client
 * names case-sensitively and no longer accepts `oracle`.
 */
const KNEX_CLIENTS: Readonly<Record<string, readonly [dialect: string, driverName: string]>> = Object.freeze({
  pg: ['postgresql', 'pg'],
  postgres: ['postgresql', 'pg'],
  postgresql: ['postgresql', 'pg'],
  pgnative: ['postgresql', 'pg'],
  cockroachdb: ['postgresql', 'cockroachdb'],
  redshift: ['redshift', 'pg-redshift'],
  mysql: ['mysql', 'mysql'],
  mysql2: ['mysql', 'mysql2'],
  mariadb: ['mysql', 'mariadb'],
  sqlite: ['sqlite3', 'sqlite3'],
  sqlite3: ['sqlite3', 'sqlite3'],
  'better-sqlite3': ['sqlite3', 'better-sqlite3'],
  mssql: ['mssql', 'mssql'],
  oracledb: ['oracle', 'oracledb'],
});

/** The client names Knex accepts. */
export const KNEX_CLIENT_NAMES: readonly string[] = Object.freeze(Object.keys(KNEX_CLIENTS));

/**
 * What `knex.client` holds for a configured client name (`configKey` 'dialect' when the
 * configuration names the client as `dialect`), or undefined for a name Knex does not accept.
 */
export function knexClient(name: string | undefined, configKey: 'client' | 'dialect' = 'client'): KnexClientInfo | undefined {
  const c = name !== undefined && Object.prototype.hasOwnProperty.call(KNEX_CLIENTS, name) ? KNEX_CLIENTS[name] : undefined;
  if (!c) return undefined;
  // one object per name and key: a session tells a change of client by identity
  const key = `${configKey}|${name}`;
  let info = clientMemo.get(key);
  if (!info) {
    info = Object.freeze({ dialect: c[0], driverName: c[1], ...(configKey === 'client' ? { configClient: name } : {}) });
    clientMemo.set(key, info);
  }
  return info;
}
const clientMemo = new Map<string, KnexClientInfo>();

/** The default namespace (database schema) of a dialect: a table in it gets no namespace. */
export function defaultNamespace(d: Dialect): string | undefined {
  if (d === 'postgresql') return 'public';
  if (d === 'mssql') return 'dbo';
  if (d === 'sqlite') return 'main';
  return undefined;
}

/** A resolved argument of a column method: plain JSON-like data. */
export type ArgValue = string | number | boolean | null | undefined | ArgValue[] | { [k: string]: ArgValue } | RawSql | KnexFunction | Opaque;

/** `knex.raw(sql)` as a value. */
export class RawSql {
  constructor(readonly sql: string) {}
}
/** `knex.fn.now()` and friends. */
export class KnexFunction {
  constructor(readonly name: string, readonly args: ArgValue[]) {}
}
/** A value the replay could not know; its source text. */
export class Opaque {
  constructor(readonly text: string) {}
}

/** Column methods of Knex's table builder (lib/schema/tablebuilder.js `columnTypes`). */
export const COLUMN_METHODS = new Set([
  'tinyint', 'smallint', 'mediumint', 'int', 'integer', 'bigint', 'biginteger', 'bigInteger', 'decimal', 'float', 'double', 'real',
  'bit', 'boolean', 'bool', 'serial', 'date', 'datetime', 'dateTime', 'timestamp', 'time', 'year', 'geometry', 'geography', 'point',
  'char', 'varchar', 'string', 'tinytext', 'tinyText', 'text', 'mediumtext', 'mediumText', 'longtext', 'longText', 'binary', 'varbinary',
  'tinyblob', 'tinyBlob', 'mediumblob', 'mediumBlob', 'blob', 'longblob', 'longBlob', 'enum', 'enu', 'set', 'increments',
  'bigincrements', 'bigIncrements', 'json', 'jsonb', 'uuid', 'specificType',
  // spatial types of PostGIS-minded plugins and newer Knex typings, compiled as their own name
  'multipoint', 'linestring', 'multilinestring', 'polygon', 'multipolygon', 'geometrycollection',
]);

/** Knex's default length of `string()` / `varchar()` columns. */
export const DEFAULT_STRING_LENGTH = 255;

export interface ColumnTypeInfo {
  type: NeutralType;
  /** The type as written: the builder method and its arguments, e.g. `string(120)`. */
  native: string;
  generated?: GeneratedKind;
  /** `increments` / `bigIncrements`: a primary key unless `{ primaryKey: false }`. */
  increments?: { primaryKey: boolean };
  /** For `enu(..., { useNative: true })`: the native enum type it creates or uses. */
  nativeEnum?: { name: string; values?: string[]; existing: boolean; schema?: string };
}

const num = (v: ArgValue): number | undefined => (typeof v === 'number' && Number.isFinite(v) ? v : typeof v === 'string' && /^\d+$/.test(v) ? Number(v) : undefined);
const isPlainObject = (v: ArgValue): v is { [k: string]: ArgValue } =>
  typeof v === 'object' && v !== null && !Array.isArray(v) && !(v instanceof RawSql) && !(v instanceof KnexFunction) && !(v instanceof Opaque);

/** An argument as it would be written in code, for the native type text. */
export function argText(v: ArgValue): string {
  if (v === undefined) return 'undefined';
  if (v === null) return 'null';
  if (typeof v === 'string') return `'${v.replace(/\\/g, '\\\\').replace(/'/g, "\\'")}'`;
  if (typeof v === 'number' || typeof v === 'boolean') return String(v);
  if (Array.isArray(v)) return `[${v.map(argText).join(', ')}]`;
  if (v instanceof RawSql) return `raw(${argText(v.sql)})`;
  if (v instanceof KnexFunction) return `fn.${v.name}(${v.args.map(argText).join(', ')})`;
  if (v instanceof Opaque) return v.text;
  const keys = Object.keys(v).filter((k) => v[k] !== undefined).sort();
  return `{ ${keys.map((k) => `${k}: ${argText(v[k])}`).join(', ')} }`;
}

function nativeText(method: string, args: ArgValue[]): string {
  // trailing undefined arguments are not written
  let n = args.length;
  while (n > 0 && args[n - 1] === undefined) n--;
  return n === 0 ? method : `${method}(${args.slice(0, n).map(argText).join(', ')})`;
}

/** `datetime` / `timestamp` options: the positional `withoutTz` flag or `{ useTz, precision }`. */
function timeOptions(a: ArgValue, b: ArgValue): { useTz?: boolean; precision?: number } {
  if (isPlainObject(a)) {
    return {
      ...(typeof a.useTz === 'boolean' ? { useTz: a.useTz } : {}),
      ...(num(a.precision ?? undefined) !== undefined ? { precision: num(a.precision ?? undefined)! } : {}),
    };
  }
  return { ...(typeof a === 'boolean' ? { useTz: !a } : {}), ...(num(b) !== undefined ? { precision: num(b)! } : {}) };
}

/**
 * The neutral type of a Knex column method on a dialect, following Knex's column compilers
 * (lib/schema/columncompiler.js and lib/dialects/<dialect>/schema/*-columncompiler.js).
 * `args` are the method's arguments after the column name.
 */
export function columnType(method: string, args: ArgValue[], d: Dialect, enums?: { get(key: string): string[] | undefined }): ColumnTypeInfo {
  const native = nativeText(method, args);
  const [a0, a1] = args;
  const m = method.toLowerCase();
  switch (m) {
    case 'increments':
    case 'bigincrements': {
      const opts = isPlainObject(a0) ? a0 : {};
      return {
        type: { kind: m === 'increments' ? 'integer' : 'bigint' },
        native,
        generated: 'autoincrement',
        increments: { primaryKey: opts.primaryKey !== false },
      };
    }
    case 'serial':
      return { type: { kind: 'integer' }, native, generated: 'autoincrement' };
    case 'int':
    case 'integer':
    case 'mediumint':
      return { type: { kind: 'integer' }, native };
    case 'smallint':
    case 'tinyint':
      return { type: { kind: 'smallint' }, native };
    case 'bigint':
    case 'biginteger':
      return { type: { kind: 'bigint' }, native };
    case 'text':
    case 'tinytext':
    case 'mediumtext':
    case 'longtext':
      return { type: { kind: 'text' }, native };
    case 'string':
    case 'varchar':
    case 'char': {
      const n = num(a0);
      return { type: { kind: 'string', length: n ?? DEFAULT_STRING_LENGTH }, native };
    }
    case 'float':
    case 'real':
      return { type: { kind: 'float' }, native };
    case 'double':
      return { type: { kind: 'double' }, native };
    case 'decimal': {
      if (a0 === null) return { type: d === 'postgresql' ? { kind: 'decimal' } : { kind: 'decimal', precision: 8, scale: 2 }, native };
      return { type: { kind: 'decimal', precision: num(a0) ?? 8, scale: num(a1) ?? 2 }, native };
    }
    case 'boolean':
    case 'bool':
      return { type: { kind: 'boolean' }, native };
    case 'date':
      return { type: { kind: 'date' }, native };
    case 'time': {
      // only Knex's MySQL compiler writes a precision; the others write plain `time` (Oracle: a timestamp)
      if (d === 'oracle') return { type: { kind: 'timestamp', withZone: true }, native };
      const p = d === 'mysql' ? (isPlainObject(a0) ? num(a0.precision ?? undefined) : num(a0)) : undefined;
      return { type: withPrecision({ kind: 'time' }, p), native };
    }
    case 'datetime':
    case 'timestamp': {
      if (d === 'postgresql' || d === 'oracle') {
        const o = timeOptions(a0, a1);
        return { type: withPrecision({ kind: 'timestamp', withZone: o.useTz ?? true }, o.precision), native };
      }
      if (d === 'mssql') {
        const o = timeOptions(a0, a1);
        return { type: o.useTz ? withPrecision({ kind: 'timestamp', withZone: true }, o.precision) : withPrecision({ kind: 'datetime' }, o.precision), native };
      }
      if (d === 'mysql') {
        const p = isPlainObject(a0) ? num(a0.precision ?? undefined) : num(a0);
        return { type: m === 'timestamp' ? withPrecision({ kind: 'timestamp', withZone: false }, p) : withPrecision({ kind: 'datetime' }, p), native };
      }
      return { type: { kind: 'datetime' }, native };
    }
    case 'binary':
    case 'varbinary': {
      // PostgreSQL's bytea and SQLite's blob have no length
      const n = d === 'postgresql' || d === 'sqlite' ? undefined : num(a0);
      return { type: n !== undefined ? { kind: 'binary', length: n } : { kind: 'binary' }, native };
    }
    case 'tinyblob':
    case 'mediumblob':
    case 'blob':
    case 'longblob':
      return { type: { kind: 'binary' }, native };
    case 'enum':
    case 'enu': {
      const opts = isPlainObject(a1) ? a1 : {};
      const listed = Array.isArray(a0) ? a0.filter((x): x is string | number => typeof x === 'string' || typeof x === 'number').map(String) : undefined;
      if (opts.useNative === true && typeof opts.enumName === 'string') {
        const existing = opts.existingType === true;
        const values = listed ?? (existing ? enums?.get(opts.enumName) : undefined) ?? [];
        return {
          type: { kind: 'enum', name: opts.enumName, values },
          native,
          nativeEnum: { name: opts.enumName, ...(listed ? { values: listed } : {}), existing, ...(typeof opts.schemaName === 'string' ? { schema: opts.schemaName } : {}) },
        };
      }
      return { type: { kind: 'enum', values: listed ?? [] }, native };
    }
    case 'set':
      return { type: { kind: 'other', raw: 'set' }, native };
    case 'json':
    case 'jsonb':
      return { type: { kind: 'json' }, native };
    case 'uuid':
      return { type: { kind: 'uuid' }, native };
    case 'specifictype':
      return { type: sqlType(typeof a0 === 'string' ? a0 : ''), native: typeof a0 === 'string' ? a0 : native };
    default:
      // geometry, geography, point, bit, year and the other spatial types: their own name
      return { type: { kind: 'other', raw: m }, native };
  }
}

/**
 * The neutral type of an SQL type as written in `specificType(name, 'type')`. Names follow
 * the PostgreSQL, MySQL, SQLite and SQL Server manuals (common practice).
 */
export function sqlType(raw: string): NeutralType {
  const s = raw.trim().toLowerCase().replace(/\s+/g, ' ');
  if (s.endsWith('[]')) return { kind: 'array', of: sqlType(s.slice(0, -2)) };
  const m = /^([a-z_][a-z0-9_ ]*?)\s*(?:\(([^)]*)\))?(\s+.*)?$/.exec(s);
  if (!m) return { kind: 'other', raw: s };
  const name = m[1]!.trim();
  const params = (m[2] ?? '').split(',').map((x) => x.trim()).filter(Boolean);
  const rest = (m[3] ?? '').trim();
  const p0 = params[0] !== undefined && /^\d+$/.test(params[0]) ? Number(params[0]) : undefined;
  const p1 = params[1] !== undefined && /^\d+$/.test(params[1]) ? Number(params[1]) : undefined;
  switch (name) {
    case 'int':
    case 'integer':
    case 'int4':
    case 'mediumint':
    case 'serial':
    case 'serial4':
      return { kind: 'integer' };
    case 'smallint':
    case 'int2':
    case 'tinyint':
    case 'smallserial':
      return { kind: 'smallint' };
    case 'bigint':
    case 'int8':
    case 'bigserial':
    case 'serial8':
      return { kind: 'bigint' };
    case 'varchar':
    case 'character varying':
    case 'nvarchar':
    case 'char':
    case 'character':
    case 'nchar':
    case 'bpchar':
      return params[0] === 'max' ? { kind: 'text' } : p0 !== undefined ? { kind: 'string', length: p0 } : { kind: 'string' };
    case 'text':
    case 'citext':
    case 'tinytext':
    case 'mediumtext':
    case 'longtext':
    case 'ntext':
    case 'clob':
      return { kind: 'text' };
    case 'boolean':
    case 'bool':
      return { kind: 'boolean' };
    case 'numeric':
    case 'decimal':
      return { kind: 'decimal', ...(p0 !== undefined ? { precision: p0 } : {}), ...(p1 !== undefined ? { scale: p1 } : {}) };
    case 'real':
    case 'float4':
      return { kind: 'float' };
    case 'double precision':
    case 'double':
    case 'float8':
      return { kind: 'double' };
    case 'float':
      return p0 !== undefined && p0 > 24 ? { kind: 'double' } : { kind: 'float' };
    case 'date':
      return { kind: 'date' };
    case 'time':
    case 'timetz':
      return withPrecision({ kind: 'time', ...(name === 'timetz' || rest === 'with time zone' ? { withZone: true } : {}) }, p0);
    case 'timestamp':
    case 'timestamptz':
      return withPrecision({ kind: 'timestamp', withZone: name === 'timestamptz' || rest === 'with time zone' }, p0);
    case 'datetime':
    case 'datetime2':
    case 'smalldatetime':
      return withPrecision({ kind: 'datetime' }, p0);
    case 'datetimeoffset':
      return withPrecision({ kind: 'timestamp', withZone: true }, p0);
    case 'json':
    case 'jsonb':
      return { kind: 'json' };
    case 'uuid':
    case 'uniqueidentifier':
      return { kind: 'uuid' };
    case 'bytea':
    case 'blob':
    case 'tinyblob':
    case 'mediumblob':
    case 'longblob':
      return { kind: 'binary' };
    case 'binary':
    case 'varbinary':
      return p0 !== undefined ? { kind: 'binary', length: p0 } : { kind: 'binary' };
    default:
      return { kind: 'other', raw: s };
  }
}

/** The default of a column as text: strings JSON-quoted, raw SQL as written, `fn.now()` as Knex compiles it. */
export function defaultText(v: ArgValue): string | undefined {
  if (v === undefined || v === null) return undefined;
  if (typeof v === 'string') return JSON.stringify(v);
  if (typeof v === 'number' || typeof v === 'boolean') return String(v);
  if (v instanceof RawSql) return v.sql;
  if (v instanceof KnexFunction) {
    if (v.name === 'now') return typeof v.args[0] === 'number' ? `CURRENT_TIMESTAMP(${v.args[0]})` : 'CURRENT_TIMESTAMP';
    return `${v.name}()`;
  }
  if (v instanceof Opaque) return v.text;
  return JSON.stringify(toJson(v));
}

function toJson(v: ArgValue): unknown {
  if (Array.isArray(v)) return v.map(toJson);
  if (isPlainObject(v)) {
    const out: Record<string, unknown> = {};
    for (const k of Object.keys(v).sort()) out[k] = toJson(v[k]);
    return out;
  }
  if (v instanceof RawSql || v instanceof KnexFunction || v instanceof Opaque) return defaultText(v);
  return v;
}
