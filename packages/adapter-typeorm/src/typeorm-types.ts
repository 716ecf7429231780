import { withPrecision, type NeutralType } from '@schema-strata/core/extract';

/**
 * Column types: what TypeORM records as a column's type (a type name as written, or the
 * constructor TypeScript's decorator metadata gives), how each driver normalises it (rewritten
 * from the drivers' `normalizeType` and `mappedDataTypes`), and the neutral type of the result.
 */

/** A column's type before normalisation: a type name as written (`varchar`), or a constructor (`String`, a class name). */
export type ColumnTypeRef = string | { ctor: string };

/** Families of TypeORM drivers whose type rules this adapter knows. */
export type DriverFamily = 'postgres' | 'mysql' | 'sqlite' | 'mssql' | 'mongodb' | 'other';

/** The data source types TypeORM 0.3 has a driver for (its DriverFactory); another `type` is some other tool's configuration. */
export const DATA_SOURCE_TYPES: ReadonlySet<string> = new Set([
  'aurora-mysql', 'aurora-postgres', 'better-sqlite3', 'capacitor', 'cockroachdb', 'cordova', 'expo', 'mariadb', 'mongodb', 'mssql',
  'mysql', 'nativescript', 'oracle', 'postgres', 'react-native', 'sap', 'sqlite', 'sqljs', 'spanner',
]);

export function driverFamily(type: string | undefined): DriverFamily {
  switch (type) {
    case undefined:
    case 'postgres':
    case 'cockroachdb':
    case 'aurora-postgres':
      return 'postgres';
    case 'mysql':
    case 'mariadb':
    case 'aurora-mysql':
      return 'mysql';
    case 'sqlite':
    case 'better-sqlite3':
    case 'sqljs':
    case 'capacitor':
    case 'cordova':
    case 'expo':
    case 'nativescript':
    case 'react-native':
      return 'sqlite';
    case 'mssql':
      return 'mssql';
    case 'mongodb':
      return 'mongodb';
    default:
      return 'other';
  }
}

/** The driver's types for special columns (`mappedDataTypes` of each driver). */
export interface MappedTypes {
  createDate: string;
  createDateDefault: string;
  createDatePrecision?: number;
  updateDate: string;
  deleteDate: string;
  version: string;
  treeLevel: string;
  /** Longest identifier the driver allows for junction table names (0: no limit). */
  maxAliasLength: number;
  /** The default schema, normalised away (design: namespace normalised to the default). */
  defaultSchema?: string;
}

export function mappedTypes(family: DriverFamily): MappedTypes {
  switch (family) {
    case 'mysql':
      return { createDate: 'datetime', createDateDefault: 'CURRENT_TIMESTAMP(6)', createDatePrecision: 6, updateDate: 'datetime', deleteDate: 'datetime', version: 'int', treeLevel: 'int', maxAliasLength: 63 };
    case 'sqlite':
      return { createDate: 'datetime', createDateDefault: "datetime('now')", updateDate: 'datetime', deleteDate: 'datetime', version: 'integer', treeLevel: 'integer', maxAliasLength: 0 };
    case 'mssql':
      return { createDate: 'datetime2', createDateDefault: 'getdate()', updateDate: 'datetime2', deleteDate: 'datetime2', version: 'int', treeLevel: 'int', maxAliasLength: 128, defaultSchema: 'dbo' };
    default:
      return { createDate: 'timestamp', createDateDefault: 'now()', updateDate: 'timestamp', deleteDate: 'timestamp', version: 'int4', treeLevel: 'int4', maxAliasLength: 63, defaultSchema: 'public' };
  }
}

const isCtor = (t: ColumnTypeRef | undefined, name: string): boolean => typeof t === 'object' && t.ctor === name;

/** The type as the driver normalises it (the drivers' `normalizeType`); a class or unknown constructor keeps its name. */
export function normalizeType(family: DriverFamily, t: ColumnTypeRef | undefined): string {
  if (t === undefined) return '';
  switch (family) {
    case 'mysql':
      if (isCtor(t, 'Number') || t === 'integer') return 'int';
      if (isCtor(t, 'String')) return 'varchar';
      if (isCtor(t, 'Date')) return 'datetime';
      if (isCtor(t, 'Buffer')) return 'blob';
      if (isCtor(t, 'Boolean')) return 'tinyint';
      if (t === 'uuid') return 'varchar';
      if (t === 'simple-array' || t === 'simple-json') return 'text';
      if (t === 'simple-enum') return 'enum';
      if (t === 'double precision' || t === 'real') return 'double';
      if (t === 'dec' || t === 'numeric' || t === 'fixed') return 'decimal';
      if (t === 'bool' || t === 'boolean') return 'tinyint';
      if (t === 'nvarchar' || t === 'national varchar') return 'varchar';
      if (t === 'nchar' || t === 'national char') return 'char';
      break;
    case 'sqlite':
      if (isCtor(t, 'Number') || t === 'int') return 'integer';
      if (isCtor(t, 'String')) return 'varchar';
      if (isCtor(t, 'Date')) return 'datetime';
      if (isCtor(t, 'Boolean')) return 'boolean';
      if (t === 'uuid') return 'varchar';
      if (t === 'simple-array' || t === 'simple-json') return 'text';
      if (t === 'simple-enum') return 'varchar';
      break;
    case 'mssql':
      if (isCtor(t, 'Number') || t === 'integer') return 'int';
      if (isCtor(t, 'String')) return 'nvarchar';
      if (isCtor(t, 'Date')) return 'datetime';
      if (isCtor(t, 'Boolean')) return 'bit';
      if (isCtor(t, 'Buffer')) return 'binary';
      if (t === 'uuid') return 'uniqueidentifier';
      if (t === 'simple-array' || t === 'simple-json') return 'ntext';
      if (t === 'simple-enum') return 'nvarchar';
      if (t === 'dec') return 'decimal';
      if (t === 'double precision') return 'float';
      if (t === 'rowversion') return 'timestamp';
      break;
    default:
      if (isCtor(t, 'Number') || t === 'int' || t === 'int4') return 'integer';
      if (isCtor(t, 'String') || t === 'varchar') return 'character varying';
      if (isCtor(t, 'Date') || t === 'timestamp') return 'timestamp without time zone';
      if (t === 'timestamptz') return 'timestamp with time zone';
      if (t === 'time') return 'time without time zone';
      if (t === 'timetz') return 'time with time zone';
      if (isCtor(t, 'Boolean') || t === 'bool') return 'boolean';
      if (t === 'simple-array' || t === 'simple-json') return 'text';
      if (t === 'simple-enum') return 'enum';
      if (t === 'int2') return 'smallint';
      if (t === 'int8') return 'bigint';
      if (t === 'decimal') return 'numeric';
      if (t === 'float8' || t === 'float') return 'double precision';
      if (t === 'float4') return 'real';
      if (t === 'char') return 'character';
      if (t === 'varbit') return 'bit varying';
      break;
  }
  return typeof t === 'string' ? t : t.ctor;
}

/** PostgreSQL driver's `supportedDataTypes` (TypeORM 0.3). */
const POSTGRES_TYPES = new Set([
  'int', 'int2', 'int4', 'int8', 'smallint', 'integer', 'bigint', 'decimal', 'numeric', 'real', 'float', 'float4', 'float8',
  'double precision', 'money', 'character varying', 'varchar', 'character', 'char', 'text', 'citext', 'hstore', 'bytea', 'bit',
  'varbit', 'bit varying', 'timetz', 'timestamptz', 'timestamp', 'timestamp without time zone', 'timestamp with time zone', 'date',
  'time', 'time without time zone', 'time with time zone', 'interval', 'bool', 'boolean', 'enum', 'point', 'line', 'lseg', 'box',
  'path', 'polygon', 'circle', 'cidr', 'inet', 'macaddr', 'macaddr8', 'tsvector', 'tsquery', 'uuid', 'xml', 'json', 'jsonb',
  'jsonpath', 'int4range', 'int8range', 'numrange', 'tsrange', 'tstzrange', 'daterange', 'int4multirange', 'int8multirange',
  'nummultirange', 'tsmultirange', 'tstzmultirange', 'datemultirange', 'geometry', 'geography', 'cube', 'ltree', 'vector', 'halfvec',
]);

/** Whether the driver accepts the normalised type (TypeORM's metadata validator refuses the data source otherwise). */
export function isSupportedType(family: DriverFamily, normalized: string, t: ColumnTypeRef | undefined): boolean {
  if (typeof t === 'object' && !['String', 'Number', 'Boolean', 'Date', 'Buffer'].includes(t.ctor)) return false;
  if (family === 'postgres') return POSTGRES_TYPES.has(normalized);
  return normalized !== '';
}

export interface TypeFacets {
  length?: string;
  precision?: number;
  scale?: number;
  isArray?: boolean;
  enumValues?: Array<string | number>;
  enumName?: string;
  /** The column holds a generated uuid (MySQL stores it as varchar(36)). */
  generatedUuid?: boolean;
}

const num = (s: string | undefined): number | undefined => {
  if (s === undefined || s === '') return undefined;
  const n = Number(s);
  return Number.isFinite(n) ? n : undefined;
};

/** The neutral type of a normalised column type. */
export function neutralType(family: DriverFamily, normalized: string, written: ColumnTypeRef | undefined, f: TypeFacets): NeutralType {
  const base = baseNeutral(family, normalized, written, f);
  return f.isArray ? { kind: 'array', of: base } : base;
}

function baseNeutral(family: DriverFamily, n: string, written: ColumnTypeRef | undefined, f: TypeFacets): NeutralType {
  const length = num(f.length);
  const boolWritten = isCtor(written, 'Boolean') || written === 'bool' || written === 'boolean';
  switch (n) {
    case 'integer':
    case 'int':
    case 'int4':
    case 'mediumint':
      return { kind: 'integer' };
    case 'smallint':
    case 'int2':
      return { kind: 'smallint' };
    case 'tinyint':
      return boolWritten ? { kind: 'boolean' } : { kind: 'smallint' };
    case 'bigint':
    case 'int8':
      return { kind: 'bigint' };
    case 'numeric':
    case 'decimal':
    case 'dec':
    case 'fixed': {
      const t: NeutralType = { kind: 'decimal' };
      if (f.precision !== undefined && f.precision !== null) t.precision = f.precision;
      if (f.scale !== undefined && f.scale !== null) t.scale = f.scale;
      return t;
    }
    case 'real':
    case 'float4':
      return { kind: 'float' };
    case 'float':
      return family === 'mysql' ? { kind: 'float' } : { kind: 'double' };
    case 'double precision':
    case 'double':
    case 'float8':
      return { kind: 'double' };
    case 'boolean':
    case 'bool':
    case 'bit':
      if (n === 'bit' && family !== 'mssql') return { kind: 'other', raw: length ? `bit(${length})` : 'bit' };
      return { kind: 'boolean' };
    case 'character varying':
    case 'varchar':
    case 'nvarchar':
    case 'varchar2':
    case 'nvarchar2': {
      const len = length ?? (family === 'mysql' ? (f.generatedUuid ? 36 : 255) : undefined);
      return len !== undefined ? { kind: 'string', length: len } : { kind: 'string' };
    }
    case 'text':
    case 'tinytext':
    case 'mediumtext':
    case 'longtext':
    case 'ntext':
    case 'clob':
      return { kind: 'text' };
    case 'uuid':
    case 'uniqueidentifier':
      return { kind: 'uuid' };
    case 'date':
      return { kind: 'date' };
    case 'time':
    case 'time without time zone':
      return withPrecision({ kind: 'time' as const }, f.precision);
    case 'time with time zone':
      return withPrecision({ kind: 'time' as const, withZone: true }, f.precision);
    case 'timestamp without time zone':
      return withPrecision({ kind: 'timestamp' as const, withZone: false }, f.precision);
    case 'timestamp with time zone':
      return withPrecision({ kind: 'timestamp' as const, withZone: true }, f.precision);
    case 'timestamp':
      return withPrecision({ kind: 'timestamp' as const, withZone: false }, f.precision);
    case 'datetime':
    case 'datetime2':
    case 'smalldatetime':
      return withPrecision({ kind: 'datetime' as const }, f.precision);
    case 'datetimeoffset':
      return withPrecision({ kind: 'timestamp' as const, withZone: true }, f.precision);
    case 'json':
    case 'jsonb':
      return { kind: 'json' };
    case 'bytea':
    case 'blob':
    case 'tinyblob':
    case 'mediumblob':
    case 'longblob':
    case 'binary':
    case 'varbinary':
    case 'image':
      return length !== undefined ? { kind: 'binary', length } : { kind: 'binary' };
    case 'enum': {
      const values = (f.enumValues ?? []).map(String);
      return f.enumName ? { kind: 'enum', name: f.enumName, values } : { kind: 'enum', values };
    }
    default: {
      const facets = length !== undefined ? `(${length})` : f.precision !== undefined && f.precision !== null ? `(${f.precision}${f.scale !== undefined ? `,${f.scale}` : ''})` : '';
      return { kind: 'other', raw: n + facets };
    }
  }
}

/** The type as written, with its facets: `varchar(120)`, `decimal(10,2)`, `String`, `int[]`. */
export function nativeTypeText(t: ColumnTypeRef | undefined, f: TypeFacets): string {
  let s = t === undefined ? '' : typeof t === 'string' ? t : t.ctor;
  if (f.length) s += `(${f.length})`;
  else if (f.precision !== undefined && f.precision !== null) s += `(${f.precision}${f.scale !== undefined && f.scale !== null ? `,${f.scale}` : ''})`;
  if (f.isArray) s += '[]';
  return s;
}
