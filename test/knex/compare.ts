// Put the adapter's replay and an introspected database in one comparable form: tables by
// name, columns in order with nullability and default, primary key, foreign keys and unique
// constraints. What each engine cannot show is normalised away here, and said so.
import type { NeutralType, Table } from '@schema-strata/core';
import type { DbTable } from './oracle.js';

export interface ComparableTable {
  columns: string[];
  nullability: Record<string, boolean>;
  defaults: Record<string, string | null>;
  primaryKey: string[];
  foreignKeys: string[];
  uniques: string[];
}
export type Comparable = Record<string, ComparableTable>;

export interface Ignore {
  table: string;
  column: string;
}

const up = (s: string | undefined): string => {
  const v = (s ?? '').toUpperCase();
  return v === 'NO ACTION' ? '' : v;
};

function fkText(cols: string[], table: string, refCols: string[], onDelete?: string, onUpdate?: string): string {
  const del = up(onDelete);
  const upd = up(onUpdate);
  return `${cols.join(',')} -> ${table}(${refCols.join(',')})${del ? ` on delete ${del}` : ''}${upd ? ` on update ${upd}` : ''}`;
}

/** The replay's default as the database would show it (strings unquoted; booleans as SQLite stores them when `engine` is sqlite). */
function replayDefault(d: string | undefined, engine: 'sqlite' | 'pg'): string | null {
  if (d === undefined) return null;
  if (d.startsWith('"')) return JSON.parse(d) as string;
  if (engine === 'sqlite' && (d === 'true' || d === 'false')) return d === 'true' ? '1' : '0';
  return d;
}

/** A default as SQLite's table_info shows it, unquoted. */
function sqliteDefault(d: string | null): string | null {
  if (d === null || d.toUpperCase() === 'NULL') return null;
  const m = /^'(.*)'$/s.exec(d);
  return m ? m[1]!.replace(/''/g, "'") : d;
}

/** A default as PostgreSQL shows it, without casts and quotes; sequences (serial) are left out (they are the `generated` flag). */
export function pgDefault(d: string | null): string | null {
  if (d === null || d.toUpperCase() === 'NULL' || /^NULL::/i.test(d)) return null;
  if (/^nextval\(/.test(d)) return null;
  let s = d;
  for (;;) {
    const n = s.replace(/::[a-z][a-z0-9_ ]*(\(\d+(,\s*\d+)?\))?(\[\])?$/i, '');
    if (n === s) break;
    s = n;
  }
  const m = /^'(.*)'$/s.exec(s);
  return m ? m[1]!.replace(/''/g, "'") : s;
}

/** The replay's tables in comparable form. */
export function fromReplay(tables: Table[], engine: 'sqlite' | 'pg', ignore: Ignore[] = []): Comparable {
  const nameOf = new Map(tables.map((t) => [t.id, t.namespace ? `${t.namespace}.${t.name}` : t.name]));
  const out: Comparable = {};
  for (const t of tables) {
    const name = t.namespace ? `${t.namespace}.${t.name}` : t.name;
    const cols = t.columns.filter((c) => !ignore.some((i) => i.table === name && i.column === c.name));
    out[name] = {
      columns: cols.map((c) => c.name),
      nullability: Object.fromEntries(cols.map((c) => [c.name, c.nullable])),
      defaults: Object.fromEntries(cols.map((c) => [c.name, replayDefault(c.default, engine)])),
      primaryKey: t.primaryKey,
      foreignKeys: t.foreignKeys
        .map((f) => fkText(f.columns, nameOf.get(f.referencedTable) ?? f.referencedTable, f.referencedColumns, f.onDelete, f.onUpdate))
        .sort(),
      uniques: t.uniques.map((u) => u.columns.join(',')).sort(),
    };
  }
  return out;
}

/**
 * An introspected database in comparable form. SQLite quirk (SQLite manual, "CREATE TABLE",
 * PRIMARY KEY): a primary key does not make a column NOT NULL, as it does elsewhere; a primary
 * key column is compared as not nullable.
 */
export function fromDatabase(db: DbTable[], engine: 'sqlite' | 'pg', ignore: Ignore[] = []): Comparable {
  const out: Comparable = {};
  for (const t of db) {
    const name = t.schema ? `${t.schema}.${t.name}` : t.name;
    const cols = t.columns.filter((c) => !ignore.some((i) => i.table === name && i.column === c.name));
    out[name] = {
      columns: cols.map((c) => c.name),
      nullability: Object.fromEntries(cols.map((c) => [c.name, c.nullable && !t.primaryKey.includes(c.name)])),
      defaults: Object.fromEntries(cols.map((c) => [c.name, engine === 'sqlite' ? sqliteDefault(c.default) : pgDefault(c.default)])),
      primaryKey: t.primaryKey,
      foreignKeys: t.foreignKeys.map((f) => fkText(f.columns, f.table, f.refColumns, f.onDelete, f.onUpdate)).sort(),
      uniques: t.uniques.map((u) => u.join(',')).sort(),
    };
  }
  return out;
}

/**
 * The neutral type of a PostgreSQL column as information_schema describes it (PostgreSQL
 * manual, "Data Types"); a `col in (...)` check on a text column is Knex's non-native enum.
 * A time or timestamp precision of 6 is PostgreSQL's default and counts as unstated.
 */
export function neutralOfPg(t: DbTable, column: string): NeutralType {
  const c = t.columns.find((x) => x.name === column)!;
  const pg = c.pg!;
  const tp = pg.timePrecision !== null && pg.timePrecision !== 6 ? { precision: pg.timePrecision } : {};
  if (t.enums[column]) return { kind: 'enum', name: t.enums[column]!.name, values: t.enums[column]!.values };
  switch (pg.dataType) {
    case 'integer':
      return { kind: 'integer' };
    case 'smallint':
      return { kind: 'smallint' };
    case 'bigint':
      return { kind: 'bigint' };
    case 'character varying':
    case 'character':
      return pg.length !== null ? { kind: 'string', length: pg.length } : { kind: 'string' };
    case 'text':
      return t.checks[column] ? { kind: 'enum', values: t.checks[column]! } : { kind: 'text' };
    case 'numeric':
      return pg.precision !== null ? { kind: 'decimal', precision: pg.precision, scale: pg.scale ?? 0 } : { kind: 'decimal' };
    case 'real':
      return { kind: 'float' };
    case 'double precision':
      return { kind: 'double' };
    case 'boolean':
      return { kind: 'boolean' };
    case 'date':
      return { kind: 'date' };
    case 'time without time zone':
      return { kind: 'time', ...tp };
    case 'time with time zone':
      return { kind: 'time', withZone: true, ...tp };
    case 'timestamp with time zone':
      return { kind: 'timestamp', withZone: true, ...tp };
    case 'timestamp without time zone':
      return { kind: 'timestamp', withZone: false, ...tp };
    case 'bytea':
      return { kind: 'binary' };
    case 'json':
    case 'jsonb':
      return { kind: 'json' };
    case 'uuid':
      return { kind: 'uuid' };
    case 'ARRAY': {
      const of = UDT[pg.udt.replace(/^_/, '')];
      return of ? { kind: 'array', of } : { kind: 'other', raw: pg.udt };
    }
    default:
      return { kind: 'other', raw: pg.udt };
  }
}

/** Element types of PostgreSQL arrays by their udt name (PostgreSQL manual, "Arrays"; pg_type names). */
const UDT: Record<string, NeutralType> = {
  text: { kind: 'text' },
  varchar: { kind: 'string' },
  int2: { kind: 'smallint' },
  int4: { kind: 'integer' },
  int8: { kind: 'bigint' },
  bool: { kind: 'boolean' },
  uuid: { kind: 'uuid' },
  jsonb: { kind: 'json' },
};
