import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { normalizeType } from '@schema-strata/adapter-typeorm';

const require = createRequire(import.meta.url);

// reference: the drivers' own normalizeType (TypeORM 0.3), called on column-like objects
const drivers = {
  postgres: require('typeorm/driver/postgres/PostgresDriver').PostgresDriver,
  mysql: require('typeorm/driver/mysql/MysqlDriver').MysqlDriver,
  sqlite: require('typeorm/driver/sqlite-abstract/AbstractSqliteDriver').AbstractSqliteDriver,
  mssql: require('typeorm/driver/sqlserver/SqlServerDriver').SqlServerDriver,
} as const;
const self = { options: { type: 'mysql' }, uuidColumnTypeSuported: false, version: '8.0.0' };

const written = [
  'int', 'int4', 'integer', 'int2', 'int8', 'smallint', 'bigint', 'decimal', 'numeric', 'dec', 'float', 'float4', 'float8', 'real',
  'double precision', 'varchar', 'character varying', 'nvarchar', 'char', 'nchar', 'text', 'uuid', 'date', 'time', 'timetz', 'timestamp',
  'timestamptz', 'datetime', 'rowversion', 'bool', 'boolean', 'json', 'jsonb', 'simple-array', 'simple-json', 'simple-enum', 'enum', 'bytea', 'varbit', 'tinyint',
];
const ctors = { String, Number, Boolean, Date, Buffer } as const;

describe("column types normalised as TypeORM's drivers normalise them", () => {
  for (const [family, Driver] of Object.entries(drivers)) {
    it(family, () => {
      const theirs = (t: unknown): string => Driver.prototype.normalizeType.call(self, { type: t });
      for (const t of written) expect(normalizeType(family as never, t), `${family} ${t}`).toBe(theirs(t));
      for (const [name, ctor] of Object.entries(ctors)) {
        const expected = theirs(ctor);
        expect(normalizeType(family as never, { ctor: name }), `${family} ${name}`).toBe(typeof expected === 'function' ? name : expected);
      }
    });
  }
});
