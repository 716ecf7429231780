import { createHash } from 'node:crypto';
import type { Column, ForeignKey, NeutralType, Snapshot, SnapshotInput, Table, UniqueConstraint, ViewRef } from './types.js';
import { tableId } from './types.js';

/**
 * Canonical JSON: object keys sorted, `undefined` left out, arrays kept in order.
 * The same value always gives the same string, whatever order its keys were set in.
 * (Built by concatenation, without the intermediate arrays of map and join: it serialises every
 * new table of every version. An `undefined` element of an array is `null`, a hole is nothing,
 * as `map` and `join` gave.)
 */
export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== 'object') {
    return JSON.stringify(value);
  }
  if (Array.isArray(value)) {
    let out = '[';
    for (let i = 0; i < value.length; i++) {
      if (i > 0) out += ',';
      const v: unknown = value[i];
      if (v !== undefined) out += canonicalJson(v);
      else if (i in value) out += 'null';
    }
    return out + ']';
  }
  const obj = value as Record<string, unknown>;
  const keys = Object.keys(obj);
  let n = 0;
  for (let i = 0; i < keys.length; i++) if (obj[keys[i]!] !== undefined) keys[n++] = keys[i]!;
  keys.length = n;
  keys.sort();
  let out = '{';
  for (let i = 0; i < n; i++) {
    const k = keys[i]!;
    if (i > 0) out += ',';
    out += quotedKey(k) + ':' + canonicalJson(obj[k]);
  }
  return out + '}';
}

/** JSON.stringify of a property name, remembered (the model has few of them). */
const quotedKeys = new Map<string, string>();
function quotedKey(k: string): string {
  let q = quotedKeys.get(k);
  if (q === undefined) {
    q = JSON.stringify(k);
    if (quotedKeys.size < 4096) quotedKeys.set(k, q);
  }
  return q;
}

/**
 * Whether two values have the same canonical JSON, compared in place: objects by their defined
 * properties whatever their order, arrays element by element; what is not plain (an `undefined`
 * array element or a hole, a primitive) is decided by the canonical JSON itself.
 */
export function canonicalEqual(a: unknown, b: unknown): boolean {
  if (a === b) return true;
  if (a === null || b === null || typeof a !== 'object' || typeof b !== 'object') return canonicalJson(a) === canonicalJson(b);
  const arr = Array.isArray(a);
  if (arr !== Array.isArray(b)) return false;
  if (arr) {
    const x = a as unknown[];
    const y = b as unknown[];
    if (x.length !== y.length) return false;
    for (let i = 0; i < x.length; i++) {
      if (x[i] === undefined || y[i] === undefined) return canonicalJson(x) === canonicalJson(y);
      if (!canonicalEqual(x[i], y[i])) return false;
    }
    return true;
  }
  const x = a as Record<string, unknown>;
  const y = b as Record<string, unknown>;
  let defined = 0;
  for (const k of Object.keys(x)) {
    const v = x[k];
    if (v === undefined) continue;
    defined++;
    const w = y[k];
    if (w === undefined || !Object.prototype.propertyIsEnumerable.call(y, k) || !canonicalEqual(v, w)) return false;
  }
  for (const k of Object.keys(y)) if (y[k] !== undefined) defined--;
  return defined === 0;
}

/** A short content hash: the first 24 hex digits of SHA-256. */
export function contentHash(text: string): string {
  return createHash('sha256').update(text).digest('hex').slice(0, 24);
}

const byString = (a: string, b: string): number => (a < b ? -1 : a > b ? 1 : 0);

function fkKey(fk: ForeignKey): string {
  return `${fk.columns.join('\u0000')}\u0001${fk.referencedTable}\u0001${fk.referencedColumns.join('\u0000')}`;
}

function uniqueKey(u: UniqueConstraint): string {
  return u.columns.join('\u0000');
}

/**
 * The parts of a column that carry meaning for the database: not where it was found (origin)
 * and not what the ORM code calls it (a field renamed while its column name stays is no change).
 */
export function columnMeaning(c: Column): Omit<Column, 'origin' | 'ormName'> {
  const { origin: _origin, ormName: _ormName, ...rest } = c;
  return rest;
}

/**
 * The meaning of a table, in canonical form: columns sorted by name, foreign keys by their
 * columns, uniques by their columns; origins and ORM-level names left out. Two tables with the
 * same meaning get the same hash even when their columns were declared in another order, at
 * other lines, or under another class name (design.md: a class renamed while its mapped table
 * name stays is no change at all).
 */
export function tableMeaning(t: Table): unknown {
  return {
    id: t.id,
    name: t.name,
    namespace: t.namespace,
    kind: t.kind,
    columns: [...t.columns].sort((a, b) => byString(a.name, b.name)).map(columnMeaning),
    primaryKey: t.primaryKey,
    foreignKeys: [...t.foreignKeys].sort((a, b) => byString(fkKey(a), fkKey(b))),
    uniques: [...t.uniques].sort((a, b) => byString(uniqueKey(a), uniqueKey(b))),
  };
}

function normType(t: NeutralType): unknown {
  const o: Record<string, unknown> = { kind: t.kind };
  const a = t as Record<string, unknown>;
  for (const k of ['length', 'precision', 'scale', 'withZone', 'name', 'values', 'raw'] as const) if (a[k] !== undefined) o[k] = a[k];
  if (t.kind === 'array') o.of = normType(t.of);
  return o;
}

function normColumn(c: Column): unknown {
  const o: Record<string, unknown> = { name: c.name };
  if (c.id !== undefined) o.id = c.id;
  if (c.ormName !== undefined) o.ormName = c.ormName;
  o.type = normType(c.type);
  o.nativeType = c.nativeType;
  o.nullable = c.nullable;
  if (c.default !== undefined) o.default = c.default;
  if (c.generated !== undefined) o.generated = c.generated;
  return o;
}

function normForeignKey(f: ForeignKey): unknown {
  const o: Record<string, unknown> = {};
  if (f.name !== undefined) o.name = f.name;
  o.columns = f.columns;
  o.referencedTable = f.referencedTable;
  o.referencedColumns = f.referencedColumns;
  if (f.onDelete !== undefined) o.onDelete = f.onDelete;
  if (f.onUpdate !== undefined) o.onUpdate = f.onUpdate;
  o.enforcement = f.enforcement;
  return o;
}

/**
 * The storage key of a table without origins: JSON with a fixed key order (columns in
 * declaration order). Equal tables give equal keys whatever order their properties were set in;
 * properties outside the neutral model are not part of it.
 */
export function tableStorageKey(t: Table): string {
  const o: Record<string, unknown> = { id: t.id, name: t.name };
  if (t.namespace !== undefined) o.namespace = t.namespace;
  if (t.ormName !== undefined) o.ormName = t.ormName;
  o.kind = t.kind;
  o.columns = t.columns.map(normColumn);
  o.primaryKey = t.primaryKey;
  o.foreignKeys = t.foreignKeys.map(normForeignKey);
  o.uniques = t.uniques.map((u) => (u.name !== undefined ? { name: u.name, columns: u.columns } : { columns: u.columns }));
  return JSON.stringify(o);
}

export function tableHash(t: Table): string {
  return contentHash(canonicalJson(tableMeaning(t)));
}

export function viewMeaning(v: ViewRef): unknown {
  return { id: v.id, name: v.name, namespace: v.namespace, ormName: v.ormName };
}

/** Hash of a snapshot from the hashes of its tables and its views. */
export function snapshotHashOf(tableHashes: string[], views: ViewRef[]): string {
  return snapshotHashOfJson(JSON.stringify(tableHashes), viewsJson(views));
}

/** The part of a snapshot's hashes its views give: their canonical JSON, or nothing without views. */
export function viewsJson(views: ViewRef[]): string {
  return views.length ? canonicalJson(views.map(viewMeaning)) : '';
}

/** `snapshotHashOf` from the JSON text of the list of table hashes and `viewsJson` of the views. */
export function snapshotHashOfJson(tableHashesJson: string, viewsText: string): string {
  return contentHash(`${tableHashesJson}|${viewsText}`);
}

const HEX = /^[0-9a-f]*$/;

/** Whether a string has only lower-case hex digits (as every hash of ours has). */
export function isHex(s: string): boolean {
  return HEX.test(s);
}

/**
 * The JSON text of a list of strings of hex digits, as `JSON.stringify` writes it: none of their
 * characters needs escaping, so a join does without the scan (the caller vouches for the digits).
 */
export function hexListJson(list: readonly string[]): string {
  return list.length === 0 ? '[]' : `["${list.join('","')}"]`;
}

/**
 * Put an adapter's output in canonical order: ids filled in, tables and views sorted by id,
 * foreign keys and uniques sorted by their columns. Columns keep their declaration order.
 */
export function canonicalOrder(input: SnapshotInput): { tables: Table[]; views: ViewRef[] } {
  const tables: Table[] = input.tables.map((t) => ({
    ...t,
    id: t.id ?? tableId(t.name, t.namespace),
    foreignKeys: [...t.foreignKeys].sort((a, b) => byString(fkKey(a), fkKey(b))),
    uniques: [...t.uniques].sort((a, b) => byString(uniqueKey(a), uniqueKey(b))),
  }));
  tables.sort((a, b) => byString(a.id, b.id));
  const views: ViewRef[] = (input.views ?? []).map((v) => ({ ...v, id: v.id ?? tableId(v.name, v.namespace) }));
  views.sort((a, b) => byString(a.id, b.id));
  return { tables, views };
}

/** Canonical order plus the content hash of the snapshot's meaning. */
export function canonicalSnapshot(input: SnapshotInput): Snapshot {
  const { tables, views } = canonicalOrder(input);
  const hash = snapshotHashOf(tables.map(tableHash), views);
  return { tables, views, hash };
}

/** Text form of a neutral type, e.g. `string(200)`, `decimal(10,2)`, `array(uuid)`. */
export function formatType(t: NeutralType): string {
  switch (t.kind) {
    case 'decimal':
      return t.precision !== undefined ? `decimal(${t.precision}${t.scale !== undefined ? `,${t.scale}` : ''})` : 'decimal';
    case 'string':
      return t.length !== undefined ? `string(${t.length})` : 'string';
    case 'binary':
      return t.length !== undefined ? `binary(${t.length})` : 'binary';
    case 'timestamp':
      return `timestamp${t.precision !== undefined ? `(${t.precision})` : ''}${t.withZone ? ' with zone' : ''}`;
    case 'datetime':
      return `datetime${t.precision !== undefined ? `(${t.precision})` : ''}`;
    case 'time':
      return `time${t.precision !== undefined ? `(${t.precision})` : ''}${t.withZone ? ' with zone' : ''}`;
    case 'enum':
      return t.name ? `enum(${t.name})` : `enum(${t.values.join('|')})`;
    case 'array':
      return `array(${formatType(t.of)})`;
    case 'other':
      return `other(${t.raw})`;
    default:
      return t.kind;
  }
}

/**
 * The neutral type without what is not part of a type change: an enum's values (a change of
 * values is its own change kind), so that `sameType` compares kind, length, precision, scale.
 */
export function typeShape(t: NeutralType): unknown {
  if (t.kind === 'enum') return { kind: 'enum', name: t.name ?? null };
  if (t.kind === 'array') return { kind: 'array', of: typeShape(t.of) };
  return t;
}

export function sameType(a: NeutralType, b: NeutralType): boolean {
  return canonicalEqual(typeShape(a), typeShape(b));
}

/** The enum values of a type (also inside an array), or undefined when it is not an enum. */
export function enumValues(t: NeutralType): string[] | undefined {
  if (t.kind === 'enum') return t.values;
  if (t.kind === 'array') return enumValues(t.of);
  return undefined;
}
