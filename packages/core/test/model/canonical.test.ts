import { describe, expect, it } from 'vitest';
import { canonicalJson, canonicalSnapshot, formatType, sameType, tableStorageKey } from '../../src/model/canonical.js';
import { SnapshotStore } from '../../src/history/snapshot-store.js';
import type { Column, Table } from '../../src/model/types.js';

const col = (name: string, extra: Partial<Column> = {}): Column => ({ name, type: { kind: 'integer' }, nativeType: 'Int', nullable: false, ...extra });
const table = (over: Partial<Table> = {}): Table => ({
  id: 'loans', name: 'loans', kind: 'table', primaryKey: ['id'], uniques: [], foreignKeys: [],
  columns: [col('id'), col('member_id'), col('tool_id')], ...over,
});

describe('canonical JSON', () => {
  it('does not depend on the order in which keys were set', () => {
    expect(canonicalJson({ b: 1, a: [{ y: 2, x: 1 }] })).toBe(canonicalJson({ a: [{ x: 1, y: 2 }], b: 1 }));
    expect(canonicalJson({ a: undefined, b: null })).toBe('{"b":null}');
  });

  it('the storage key does not depend on key order either', () => {
    const a = table();
    const b: Table = JSON.parse(JSON.stringify({ uniques: [], foreignKeys: [], primaryKey: ['id'], kind: 'table', columns: a.columns, name: 'loans', id: 'loans' }));
    expect(tableStorageKey(b)).toBe(tableStorageKey(a));
  });
});

describe('content hashes', () => {
  it('origins and column order change neither the meaning hash nor the "no change" decision', () => {
    const store = new SnapshotStore();
    const one = store.fromInput({ tables: [table({ origin: { file: 'a.prisma', line: 3 } })] }).snapshot;
    const moved = store.fromInput({ tables: [table({ origin: { file: 'b.prisma', line: 30 }, columns: [col('tool_id'), col('id'), col('member_id')] })] }).snapshot;
    expect(moved.meaningHash).toBe(one.meaningHash);
    // the storage hash keeps the declared order (so that output shows the order as written)
    expect(moved.hash).not.toBe(one.hash);
  });

  it('a class renamed while its table name stays has the same meaning (design: no change at all)', () => {
    const store = new SnapshotStore();
    const a = store.fromInput({ tables: [table({ ormName: 'Loan' })] }).snapshot;
    const b = store.fromInput({ tables: [table({ ormName: 'Borrowing' })] }).snapshot;
    expect(b.meaningHash).toBe(a.meaningHash);
  });

  it('any change of meaning changes the hash', () => {
    const base = canonicalSnapshot({ tables: [table()] }).hash;
    const variants: Table[] = [
      table({ name: 'loan' }),
      table({ columns: [col('id'), col('member_id', { nullable: true }), col('tool_id')] }),
      table({ columns: [col('id'), col('member_id', { default: '0' }), col('tool_id')] }),
      table({ columns: [col('id'), col('member_id', { type: { kind: 'bigint' } }), col('tool_id')] }),
      table({ primaryKey: ['id', 'member_id'] }),
      table({ uniques: [{ columns: ['member_id'] }] }),
      table({ foreignKeys: [{ columns: ['member_id'], referencedTable: 'members', referencedColumns: ['id'], enforcement: 'database' }] }),
    ];
    const hashes = new Set(variants.map((t) => canonicalSnapshot({ tables: [t] }).hash));
    expect(hashes.size).toBe(variants.length);
    expect(hashes.has(base)).toBe(false);
  });

  it('tables come out sorted by id, whatever order the adapter gave', () => {
    const s = canonicalSnapshot({ tables: [table({ id: 'tools', name: 'tools' }), table({ id: 'members', name: 'members' }), table()] });
    expect(s.tables.map((t) => t.id)).toEqual(['loans', 'members', 'tools']);
  });
});

describe('neutral types', () => {
  it('a type change is a change of kind, length, precision or scale; enum values are not part of it', () => {
    expect(sameType({ kind: 'string', length: 80 }, { kind: 'string', length: 160 })).toBe(false);
    expect(sameType({ kind: 'decimal', precision: 8, scale: 2 }, { kind: 'decimal', precision: 10, scale: 2 })).toBe(false);
    expect(sameType({ kind: 'enum', name: 'Condition', values: ['A'] }, { kind: 'enum', name: 'Condition', values: ['A', 'B'] })).toBe(true);
    expect(sameType({ kind: 'json' }, { kind: 'json' })).toBe(true);
  });

  it('prints types in one readable form', () => {
    expect(formatType({ kind: 'array', of: { kind: 'string', length: 20 } })).toBe('array(string(20))');
    expect(formatType({ kind: 'timestamp', withZone: true, precision: 3 })).toBe('timestamp(3) with zone');
    expect(formatType({ kind: 'decimal', precision: 10, scale: 2 })).toBe('decimal(10,2)');
  });
});
