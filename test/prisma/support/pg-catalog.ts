/**
 * Reads back what a PostgreSQL database really holds, from its catalogs (information_schema
 * and pg_catalog), in a shape close to the neutral model, so that a test can compare it with
 * an adapter's snapshot. Types are read as PostgreSQL prints them (`format_type`) and mapped to
 * neutral types here, independently of the adapter's own mapping from Prisma types.
 */
import type { PGlite } from '@electric-sql/pglite';
import type { NeutralType, ReferentialAction } from '@schema-strata/core';

export interface DbColumn {
  name: string;
  /** `format_type(atttypid, atttypmod)`, e.g. `character varying(200)`. */
  sqlType: string;
  type: NeutralType;
  nullable: boolean;
  /** `information_schema.columns.column_default`. */
  default: string | null;
  position: number;
}

export interface DbForeignKey {
  name: string;
  columns: string[];
  /** `namespace.table`, the namespace left out when it is `public`. */
  referencedTable: string;
  referencedColumns: string[];
  onDelete: ReferentialAction;
  onUpdate: ReferentialAction;
}

export interface DbTable {
  /** `namespace.table`, the namespace left out when it is `public`. */
  id: string;
  columns: DbColumn[];
  primaryKey: string[];
  /** Column lists of unique indexes and constraints other than the primary key. */
  uniques: string[][];
  foreignKeys: DbForeignKey[];
}

export interface DbSchema {
  tables: Map<string, DbTable>;
  /** Views and materialized views, by id. */
  views: string[];
  /** Enum types by `namespace.name` (public left out): labels in order. */
  enums: Map<string, string[]>;
}

const qualify = (ns: string, name: string): string => (ns === 'public' ? name : `${ns}.${name}`);

/** PostgreSQL's confdeltype / confupdtype codes (pg_constraint, PostgreSQL docs, "pg_constraint"). */
const ACTION: Record<string, ReferentialAction> = { a: 'no action', r: 'restrict', c: 'cascade', n: 'set null', d: 'set default' };

/** The neutral type of a type as PostgreSQL prints it. */
export function neutralFromSql(sqlType: string, enumLabels?: string[], enumName?: string): NeutralType {
  if (sqlType.endsWith('[]')) return { kind: 'array', of: neutralFromSql(sqlType.slice(0, -2), enumLabels, enumName) };
  if (enumLabels) return { kind: 'enum', name: enumName, values: enumLabels };
  let m: RegExpExecArray | null;
  switch (sqlType) {
    case 'integer': return { kind: 'integer' };
    case 'smallint': return { kind: 'smallint' };
    case 'bigint': return { kind: 'bigint' };
    case 'real': return { kind: 'float' };
    case 'double precision': return { kind: 'double' };
    case 'boolean': return { kind: 'boolean' };
    case 'text':
    case 'citext': // case-insensitive text (an extension type): text in the neutral model, as the adapter maps @db.Citext
      return { kind: 'text' };
    case 'uuid': return { kind: 'uuid' };
    case 'date': return { kind: 'date' };
    case 'json':
    case 'jsonb': return { kind: 'json' };
    case 'bytea': return { kind: 'binary' };
  }
  if ((m = /^numeric(?:\((\d+),(\d+)\))?$/.exec(sqlType))) {
    return m[1] ? { kind: 'decimal', precision: Number(m[1]), scale: Number(m[2]) } : { kind: 'decimal' };
  }
  if ((m = /^(?:character varying|character)(?:\((\d+)\))?$/.exec(sqlType))) {
    return m[1] ? { kind: 'string', length: Number(m[1]) } : { kind: 'string' };
  }
  if ((m = /^time(?:\((\d)\))? (with|without) time zone$/.exec(sqlType))) {
    const t: NeutralType = m[2] === 'with' ? { kind: 'time', withZone: true } : { kind: 'time' };
    if (m[1]) t.precision = Number(m[1]);
    return t;
  }
  if ((m = /^timestamp(?:\((\d)\))? (with|without) time zone$/.exec(sqlType))) {
    const t: NeutralType = { kind: 'timestamp', withZone: m[2] === 'with' };
    if (m[1]) t.precision = Number(m[1]);
    return t;
  }
  return { kind: 'other', raw: sqlType };
}

/** Introspect every user table, view and enum of the database. */
export async function introspect(db: PGlite): Promise<DbSchema> {
  const userNs = `n.nspname NOT IN ('pg_catalog', 'information_schema') AND n.nspname NOT LIKE 'pg_toast%'`;
  const enums = new Map<string, string[]>();
  const enumRows = await db.query<{ ns: string; name: string; labels: string[] }>(
    `SELECT n.nspname AS ns, t.typname AS name, array_agg(e.enumlabel ORDER BY e.enumsortorder) AS labels
       FROM pg_type t JOIN pg_enum e ON e.enumtypid = t.oid JOIN pg_namespace n ON n.oid = t.typnamespace
      GROUP BY n.nspname, t.typname`,
  );
  for (const r of enumRows.rows) enums.set(qualify(r.ns, r.name), r.labels);

  const rels = await db.query<{ ns: string; name: string; kind: string }>(
    `SELECT n.nspname AS ns, c.relname AS name, c.relkind AS kind
       FROM pg_class c JOIN pg_namespace n ON n.oid = c.relnamespace
      WHERE c.relkind IN ('r', 'p', 'v', 'm') AND ${userNs}`,
  );
  const tables = new Map<string, DbTable>();
  const views: string[] = [];
  for (const r of rels.rows) {
    const id = qualify(r.ns, r.name);
    if (r.kind === 'v' || r.kind === 'm') views.push(id);
    else tables.set(id, { id, columns: [], primaryKey: [], uniques: [], foreignKeys: [] });
  }

  // columns: nullability and default from information_schema; the exact type from pg_catalog
  const cols = await db.query<{
    ns: string; tbl: string; name: string; pos: number; nullable: string; dflt: string | null;
    sqltype: string; typtype: string; elemtype: string | null; typns: string; typname: string; elemns: string | null; elemname: string | null;
  }>(
    `SELECT c.table_schema AS ns, c.table_name AS tbl, c.column_name AS name, c.ordinal_position AS pos,
            c.is_nullable AS nullable, c.column_default AS dflt,
            format_type(a.atttypid, a.atttypmod) AS sqltype, t.typtype AS typtype,
            et.typtype AS elemtype, tn.nspname AS typns, t.typname AS typname, en.nspname AS elemns, et.typname AS elemname
       FROM information_schema.columns c
       JOIN pg_namespace n ON n.nspname = c.table_schema
       JOIN pg_class k ON k.relname = c.table_name AND k.relnamespace = n.oid
       JOIN pg_attribute a ON a.attrelid = k.oid AND a.attname = c.column_name
       JOIN pg_type t ON t.oid = a.atttypid
       JOIN pg_namespace tn ON tn.oid = t.typnamespace
       LEFT JOIN pg_type et ON et.oid = t.typelem AND t.typelem <> 0
       LEFT JOIN pg_namespace en ON en.oid = et.typnamespace
      WHERE ${userNs}
      ORDER BY c.table_schema, c.table_name, c.ordinal_position`,
  );
  for (const r of cols.rows) {
    const t = tables.get(qualify(r.ns, r.tbl));
    if (!t) continue;
    let type: NeutralType;
    if (r.typtype === 'e') type = neutralFromSql('x', enums.get(qualify(r.typns, r.typname)), r.typname);
    else if (r.elemtype === 'e') type = { kind: 'array', of: neutralFromSql('x', enums.get(qualify(r.elemns!, r.elemname!)), r.elemname!) };
    else type = neutralFromSql(r.sqltype);
    t.columns.push({ name: r.name, sqlType: r.sqltype, type, nullable: r.nullable === 'YES', default: r.dflt, position: r.pos });
  }

  // keys: pg_constraint (primary keys, foreign keys) and pg_index (unique indexes), columns in key order
  const keys = await db.query<{
    ns: string; tbl: string; name: string; type: string; cols: string[]; refns: string | null; reftbl: string | null;
    refcols: string[] | null; del: string; upd: string;
  }>(
    `SELECT n.nspname AS ns, c.relname AS tbl, con.conname AS name, con.contype AS type,
            ARRAY(SELECT a.attname FROM unnest(con.conkey) WITH ORDINALITY AS k(attnum, ord)
                   JOIN pg_attribute a ON a.attrelid = con.conrelid AND a.attnum = k.attnum ORDER BY k.ord) AS cols,
            rn.nspname AS refns, rc.relname AS reftbl,
            CASE WHEN con.contype = 'f' THEN ARRAY(SELECT a.attname FROM unnest(con.confkey) WITH ORDINALITY AS k(attnum, ord)
                   JOIN pg_attribute a ON a.attrelid = con.confrelid AND a.attnum = k.attnum ORDER BY k.ord) END AS refcols,
            con.confdeltype AS del, con.confupdtype AS upd
       FROM pg_constraint con
       JOIN pg_class c ON c.oid = con.conrelid JOIN pg_namespace n ON n.oid = c.relnamespace
       LEFT JOIN pg_class rc ON rc.oid = con.confrelid LEFT JOIN pg_namespace rn ON rn.oid = rc.relnamespace
      WHERE con.contype IN ('p', 'f') AND ${userNs}`,
  );
  for (const r of keys.rows) {
    const t = tables.get(qualify(r.ns, r.tbl));
    if (!t) continue;
    if (r.type === 'p') t.primaryKey = r.cols;
    else {
      t.foreignKeys.push({
        name: r.name,
        columns: r.cols,
        referencedTable: qualify(r.refns!, r.reftbl!),
        referencedColumns: r.refcols!,
        onDelete: ACTION[r.del]!,
        onUpdate: ACTION[r.upd]!,
      });
    }
  }
  const uniques = await db.query<{ ns: string; tbl: string; cols: string[] }>(
    `SELECT n.nspname AS ns, c.relname AS tbl,
            ARRAY(SELECT a.attname FROM unnest(i.indkey::int2[]) WITH ORDINALITY AS k(attnum, ord)
                   JOIN pg_attribute a ON a.attrelid = i.indrelid AND a.attnum = k.attnum ORDER BY k.ord) AS cols
       FROM pg_index i JOIN pg_class c ON c.oid = i.indrelid JOIN pg_namespace n ON n.oid = c.relnamespace
      WHERE i.indisunique AND NOT i.indisprimary AND ${userNs}`,
  );
  for (const r of uniques.rows) tables.get(qualify(r.ns, r.tbl))?.uniques.push(r.cols);
  return { tables, views, enums };
}

/**
 * How PostgreSQL itself spells a type: create a scratch column of that type and read it back
 * with `format_type` (so that `varbit` and `bit varying` compare equal). Undefined when
 * PostgreSQL does not know the type.
 */
let probes = 0;
export async function canonicalSqlType(db: PGlite, type: string): Promise<string | undefined> {
  // a table of its own per call: callers may ask for several types at once
  const table = `oracle_type_probe_${++probes}`;
  try {
    await db.exec(`CREATE TEMP TABLE ${table} (c ${type})`);
    const r = await db.query<{ t: string }>(
      `SELECT format_type(a.atttypid, a.atttypmod) AS t FROM pg_attribute a WHERE a.attrelid = '${table}'::regclass AND a.attname = 'c'`,
    );
    return r.rows[0]?.t;
  } catch {
    return undefined;
  } finally {
    await db.exec(`DROP TABLE IF EXISTS ${table}`);
  }
}
