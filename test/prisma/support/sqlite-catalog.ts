/**
 * Runs SQL in SQLite (sql.js: SQLite compiled to WebAssembly) and reads back what the database
 * holds through SQLite's own PRAGMAs (table_info, foreign_key_list, index_list, index_info), in
 * the comparable shape of compare.ts.
 */
import initSqlJs, { type Database } from 'sql.js';
import type { NeutralType } from '@schema-strata/core';
import { canonicalJson } from '@schema-strata/core';
import { normaliseDbDefault, type ComparableTable } from './compare.js';

let sql: Awaited<ReturnType<typeof initSqlJs>> | null = null;

/** A new in-memory SQLite database with `script` run in it. */
export async function sqliteWith(script: string): Promise<Database> {
  sql ??= await initSqlJs();
  const db = new sql.Database();
  db.exec('PRAGMA foreign_keys = ON;');
  db.exec(script);
  return db;
}

/**
 * The neutral type of a declared SQLite column type, as Prisma's engine writes them. SQLite
 * keeps the declared name; REAL is an 8-byte IEEE float (SQLite docs, "Datatypes In SQLite").
 */
export function neutralFromSqlite(declared: string): NeutralType {
  switch (declared.toUpperCase()) {
    case 'INTEGER': return { kind: 'integer' };
    case 'BIGINT': return { kind: 'bigint' };
    case 'TEXT': return { kind: 'text' };
    case 'REAL': return { kind: 'double' };
    case 'DECIMAL': return { kind: 'decimal' };
    case 'BOOLEAN': return { kind: 'boolean' };
    case 'DATETIME': return { kind: 'datetime' };
    case 'JSONB':
    case 'JSON': return { kind: 'json' };
    case 'BLOB': return { kind: 'binary' };
    default: return { kind: 'other', raw: declared };
  }
}

const ACTIONS: Record<string, string> = { 'NO ACTION': 'no action', RESTRICT: 'restrict', CASCADE: 'cascade', 'SET NULL': 'set null', 'SET DEFAULT': 'set default' };

function rows(db: Database, query: string): Array<Record<string, unknown>> {
  const [r] = db.exec(query);
  if (!r) return [];
  return r.values.map((v) => Object.fromEntries(r.columns.map((c, i) => [c, v[i]])));
}

const quote = (name: string): string => `"${name.replace(/"/g, '""')}"`;

/** Every user table of the database in comparable form, by name. */
export function fromSqlite(db: Database): Record<string, ComparableTable> {
  const out: Record<string, ComparableTable> = {};
  const tables = rows(db, "SELECT name, sql FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name");
  for (const t of tables) {
    const name = String(t.name);
    const ddl = String(t.sql);
    const info = rows(db, `PRAGMA table_info(${quote(name)})`);
    const pk = info.filter((c) => Number(c.pk) > 0).sort((a, b) => Number(a.pk) - Number(b.pk)).map((c) => String(c.name));
    const columns = info.map((c) => {
      const col = String(c.name);
      // an INTEGER PRIMARY KEY AUTOINCREMENT column is SQLite's rowid: generated, with no default clause
      const auto = new RegExp(`${quote(col).replace(/[.*+?^${}()|[\]\\]/g, '\\$&')} INTEGER NOT NULL PRIMARY KEY AUTOINCREMENT`).test(ddl);
      return {
        name: col,
        type: canonicalJson(neutralFromSqlite(String(c.type))),
        nullable: Number(c.notnull) === 0,
        default: auto ? 'autoincrement()' : normaliseDbDefault(c.dflt_value === null ? null : String(c.dflt_value)),
      };
    });
    const uniques = rows(db, `PRAGMA index_list(${quote(name)})`)
      .filter((i) => Number(i.unique) === 1 && i.origin !== 'pk')
      .map((i) => rows(db, `PRAGMA index_info(${quote(String(i.name))})`).sort((a, b) => Number(a.seqno) - Number(b.seqno)).map((c) => String(c.name)).join(','))
      .sort();
    const byId = new Map<number, Array<Record<string, unknown>>>();
    for (const f of rows(db, `PRAGMA foreign_key_list(${quote(name)})`)) {
      const list = byId.get(Number(f.id)) ?? [];
      list.push(f);
      byId.set(Number(f.id), list);
    }
    const foreignKeys = [...byId.values()]
      .map((parts) => {
        parts.sort((a, b) => Number(a.seq) - Number(b.seq));
        return {
          columns: parts.map((p) => String(p.from)),
          referencedTable: String(parts[0]!.table),
          referencedColumns: parts.map((p) => String(p.to)),
          onDelete: ACTIONS[String(parts[0]!.on_delete)] ?? String(parts[0]!.on_delete),
          onUpdate: ACTIONS[String(parts[0]!.on_update)] ?? String(parts[0]!.on_update),
        };
      })
      .sort((a, b) => (canonicalJson(a) < canonicalJson(b) ? -1 : 1));
    out[name] = { columns, primaryKey: pk, uniques, foreignKeys };
  }
  return out;
}
