// Column types against Knex's own column compilers, compiled without a connection
// (`knex({ client }).schema.createTable(...).toString()`): for PostgreSQL and MySQL, the SQL type
// Knex writes for each column method is read back (PostgreSQL and MySQL manuals' type names) and
// compared with the adapter's neutral type for that dialect. Covers what neither database run
// shows here: spatial types (no PostGIS in PGlite), MySQL's unsigned, datetime and timestamp
// precision, text sizes.
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import type { NeutralType } from '@schema-strata/core';
import { columnType, type Dialect } from '@schema-strata/adapter-knex';

const require = createRequire(import.meta.url);
const Knex = require('knex') as typeof import('knex').knex;

/** The SQL Knex writes for one column. */
function compiled(client: string, method: string, args: unknown[], modifiers: string[] = []): string {
  const k = Knex({ client });
  const sql = k.schema
    .createTable('t', (t) => {
      let c = (t as unknown as Record<string, (...a: unknown[]) => Record<string, () => unknown>>)[method]!('c', ...args);
      for (const m of modifiers) c = (c[m] as () => typeof c)();
    })
    .toString();
  const m = /\((?:`c`|"c") (.*?)(?:, constraint|\)[;\n]|\)$| primary key| not null| null)/.exec(sql);
  return (m ? m[1]! : sql).trim();
}

/** The neutral type of an SQL type as Knex writes it (type names of the PostgreSQL and MySQL manuals). */
function fromSql(sql: string): NeutralType {
  const s = sql.toLowerCase();
  const n = (re: RegExp): number[] => (re.exec(s)?.slice(1) ?? []).filter(Boolean).map(Number);
  if (/^(serial|integer|int|mediumint)\b/.test(s) && !/^int\(/.test(s)) return { kind: 'integer' };
  if (/^int\(/.test(s)) return { kind: 'integer' };
  if (/^(smallint|tinyint)\b/.test(s)) return { kind: 'smallint' };
  if (/^(bigserial|bigint)\b/.test(s)) return { kind: 'bigint' };
  if (/^varchar|^char\b/.test(s)) return { kind: 'string', length: n(/\((\d+)\)/)[0]! };
  if (/^enum\(|check \(/.test(s)) return { kind: 'enum', values: [...sql.matchAll(/'([^']*)'/g)].map((x) => x[1]!) };
  if (/^(text|mediumtext|longtext|tinytext)\b/.test(s)) return { kind: 'text' };
  if (/^(real|float)\b/.test(s)) return { kind: 'float' };
  if (/^double/.test(s)) return { kind: 'double' };
  if (/^decimal/.test(s)) {
    const [p, sc] = n(/\((\d+), ?(\d+)\)/);
    return p === undefined ? { kind: 'decimal' } : { kind: 'decimal', precision: p, scale: sc! };
  }
  if (/^boolean/.test(s)) return { kind: 'boolean' };
  if (/^date\b/.test(s) && !/^datetime/.test(s)) return { kind: 'date' };
  if (/^timestamptz/.test(s)) return withP({ kind: 'timestamp', withZone: true }, n(/\((\d+)\)/)[0]);
  if (/^timestamp/.test(s)) return withP({ kind: 'timestamp', withZone: false }, n(/\((\d+)\)/)[0]);
  if (/^datetime/.test(s)) return withP({ kind: 'datetime' }, n(/\((\d+)\)/)[0]);
  if (/^time\b/.test(s)) return withP({ kind: 'time' }, n(/\((\d+)\)/)[0]);
  if (/^(bytea|blob|varbinary|binary)\b/.test(s)) return n(/\((\d+)\)/)[0] !== undefined ? { kind: 'binary', length: n(/\((\d+)\)/)[0]! } : { kind: 'binary' };
  if (/^jsonb?\b/.test(s)) return { kind: 'json' };
  if (/^uuid|^char\(36\)/.test(s)) return { kind: 'uuid' };
  if (/^enum\(|check \(/.test(s)) return { kind: 'enum', values: [...sql.matchAll(/'([^']*)'/g)].map((x) => x[1]!) };
  return { kind: 'other', raw: s.split(/[ (]/)[0]! };
}

function withP<T extends NeutralType>(t: T, p: number | undefined): T {
  return p === undefined ? t : { ...t, precision: p };
}

const clean = (t: NeutralType): unknown => JSON.parse(JSON.stringify(t));

const COLUMNS: Array<[string, unknown[]]> = [
  ['increments', []], ['bigIncrements', []], ['integer', []], ['bigInteger', []], ['smallint', []], ['tinyint', []], ['mediumint', []],
  ['string', []], ['string', [120]], ['text', []], ['text', ['longtext']], ['float', []], ['double', []], ['decimal', []], ['decimal', [10, 3]],
  ['boolean', []], ['date', []], ['datetime', []], ['datetime', [{ useTz: false }]], ['datetime', [{ precision: 3 }]], ['timestamp', []],
  ['timestamp', [{ useTz: false, precision: 6 }]], ['time', []], ['binary', []], ['binary', [16]], ['json', []], ['jsonb', []], ['uuid', []],
  ['enu', [['GOOD', 'WORN']]], ['geometry', []], ['geography', []], ['point', []],
];

describe("column types against Knex's column compilers (compiled without a connection)", () => {
  for (const [client, dialect] of [['pg', 'postgresql'], ['mysql2', 'mysql']] as Array<[string, Dialect]>) {
    it(`${client}: the type Knex writes is the adapter's neutral type`, () => {
      const skip = new Set(dialect === 'mysql' ? ['jsonb', 'geography', 'uuid'] : []);
      for (const [method, args] of COLUMNS) {
        if (skip.has(method)) continue;
        const sql = compiled(client, method, args);
        const ours = columnType(method, args as never[], dialect).type;
        expect(clean(ours), `${method}(${JSON.stringify(args)}) -> ${sql}`).toEqual(clean(fromSql(sql)));
      }
    });
  }

  it('mysql: unsigned is in the SQL and in the native type, not in the neutral type', () => {
    expect(compiled('mysql2', 'integer', [], ['unsigned'])).toMatch(/int unsigned/);
    const plain = columnType('integer', [], 'mysql');
    expect(plain.type).toEqual({ kind: 'integer' });
  });
});
