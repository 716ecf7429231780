import type { NeutralType } from '@schema-strata/core/extract';

export type Provider = 'postgresql' | 'mysql' | 'sqlite' | 'sqlserver' | 'cockroachdb' | 'mongodb' | string;

const num = (s: string | undefined): number | undefined => {
  if (s === undefined) return undefined;
  const n = Number(s);
  return Number.isFinite(n) ? n : undefined;
};

function withLength<T extends { kind: 'string' | 'binary' }>(t: T, arg: string | undefined): NeutralType {
  const n = num(arg);
  return (n !== undefined ? { ...t, length: n } : t) as NeutralType;
}

/**
 * The neutral type of a `@db.X(args)` native type, or undefined when it is not one we map
 * (then the scalar's mapping is used).
 */
function fromNative(scalar: string, name: string, args: string[]): NeutralType | undefined {
  const [a0, a1] = args;
  switch (name) {
    case 'VarChar':
    case 'NVarChar':
    case 'Char':
    case 'NChar':
    case 'String':
      if (a0 === 'max' || a0 === 'MAX') return { kind: 'text' };
      return withLength({ kind: 'string' }, a0);
    case 'Text':
    case 'NText':
    case 'TinyText':
    case 'MediumText':
    case 'LongText':
    case 'Citext':
      return { kind: 'text' };
    case 'Uuid':
    case 'UniqueIdentifier':
      return { kind: 'uuid' };
    case 'SmallInt':
    case 'TinyInt':
    case 'UnsignedSmallInt':
    case 'UnsignedTinyInt':
    case 'Int2':
      return scalar === 'Boolean' ? { kind: 'boolean' } : { kind: 'smallint' };
    case 'Integer':
    case 'Int':
    case 'Int4':
    case 'MediumInt':
    case 'UnsignedInt':
    case 'UnsignedMediumInt':
      return { kind: 'integer' };
    case 'BigInt':
    case 'Int8':
    case 'UnsignedBigInt':
      return { kind: 'bigint' };
    case 'Real':
    case 'Float4':
    case 'Float':
      return scalar === 'Float' && name === 'Float' && a0 !== undefined && Number(a0) > 24 ? { kind: 'double' } : { kind: 'float' };
    case 'DoublePrecision':
    case 'Double':
    case 'Float8':
      return { kind: 'double' };
    case 'Decimal':
    case 'Numeric': {
      const t: NeutralType = { kind: 'decimal' };
      if (num(a0) !== undefined) t.precision = num(a0);
      if (num(a1) !== undefined) t.scale = num(a1);
      return t;
    }
    case 'Money':
    case 'SmallMoney':
      return { kind: 'other', raw: name.toLowerCase() };
    case 'Boolean':
    case 'Bool':
      return { kind: 'boolean' };
    case 'Bit':
      return scalar === 'Boolean' ? { kind: 'boolean' } : { kind: 'other', raw: `bit${a0 ? `(${a0})` : ''}` };
    case 'Date':
      return { kind: 'date' };
    case 'Time': {
      const t: NeutralType = { kind: 'time' };
      if (num(a0) !== undefined) t.precision = num(a0);
      return t;
    }
    case 'Timetz': {
      const t: NeutralType = { kind: 'time', withZone: true };
      if (num(a0) !== undefined) t.precision = num(a0);
      return t;
    }
    case 'Timestamp': {
      const t: NeutralType = { kind: 'timestamp', withZone: false };
      if (num(a0) !== undefined) t.precision = num(a0);
      return t;
    }
    case 'Timestamptz':
    case 'DateTimeOffset': {
      const t: NeutralType = { kind: 'timestamp', withZone: true };
      if (num(a0) !== undefined) t.precision = num(a0);
      return t;
    }
    case 'DateTime':
    case 'DateTime2':
    case 'SmallDateTime': {
      const t: NeutralType = { kind: 'datetime' };
      if (num(a0) !== undefined) t.precision = num(a0);
      return t;
    }
    case 'Json':
    case 'JsonB':
      return { kind: 'json' };
    case 'ByteA':
    case 'Blob':
    case 'TinyBlob':
    case 'MediumBlob':
    case 'LongBlob':
    case 'Image':
      return { kind: 'binary' };
    case 'Binary':
    case 'VarBinary':
      if (a0 === 'max' || a0 === 'MAX') return { kind: 'binary' };
      return withLength({ kind: 'binary' }, a0);
    default:
      return { kind: 'other', raw: `${name}${args.length ? `(${args.join(',')})` : ''}`.toLowerCase() };
  }
}

/**
 * The neutral type of a Prisma scalar with no native type attribute, on a given provider, per
 * Prisma's documented default mappings (Prisma schema reference, "Model field scalar types").
 */
function fromScalar(scalar: string, provider: Provider): NeutralType {
  switch (scalar) {
    case 'String':
      if (provider === 'mysql') return { kind: 'string', length: 191 };
      if (provider === 'sqlserver') return { kind: 'string', length: 1000 };
      return { kind: 'text' };
    case 'Int':
      return { kind: 'integer' };
    case 'BigInt':
      return { kind: 'bigint' };
    case 'Float':
      return { kind: 'double' };
    case 'Decimal':
      if (provider === 'sqlserver') return { kind: 'decimal', precision: 32, scale: 16 };
      if (provider === 'sqlite') return { kind: 'decimal' };
      return { kind: 'decimal', precision: 65, scale: 30 };
    case 'Boolean':
      return { kind: 'boolean' };
    case 'DateTime':
      if (provider === 'postgresql' || provider === 'cockroachdb') return { kind: 'timestamp', withZone: false, precision: 3 };
      if (provider === 'mysql') return { kind: 'datetime', precision: 3 };
      return { kind: 'datetime' };
    case 'Json':
      return { kind: 'json' };
    case 'Bytes':
      return { kind: 'binary' };
    default:
      return { kind: 'other', raw: scalar };
  }
}

export function neutralScalarType(scalar: string, native: [string, string[]] | null | undefined, provider: Provider): NeutralType {
  if (native) {
    const t = fromNative(scalar, native[0], native[1] ?? []);
    if (t) return t;
  }
  return fromScalar(scalar, provider);
}

/** The type as written: `String @db.VarChar(200)`, `Int[]`, `Role`. */
export function nativeTypeText(type: string, list: boolean, native: [string, string[]] | null | undefined): string {
  let s = type + (list ? '[]' : '');
  if (native) s += ` @db.${native[0]}${native[1] && native[1].length ? `(${native[1].join(', ')})` : ''}`;
  return s;
}

/** The text of a default from the engine's data model, as Prisma schema syntax. */
export function defaultText(d: unknown, kind: string): string | undefined {
  if (d === undefined || d === null) return undefined;
  if (Array.isArray(d)) return `[${d.map((x) => defaultText(x, kind) ?? '').join(', ')}]`;
  if (typeof d === 'object') {
    const f = d as { name?: string; args?: unknown[] };
    if (f.name) {
      const args = (f.args ?? []).filter((a) => !(f.name === 'uuid' && a === 4) && !(f.name === 'cuid' && a === 1));
      return `${f.name}(${args.map((a) => JSON.stringify(a)).join(', ')})`;
    }
    return JSON.stringify(d);
  }
  if (typeof d === 'string') return kind === 'enum' ? d : JSON.stringify(d);
  return String(d);
}
