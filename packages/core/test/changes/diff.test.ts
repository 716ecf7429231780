import { describe, expect, it } from 'vitest';
import { diffSnapshots } from '../../src/changes/diff-snapshots.js';
import type { Column, Table } from '../../src/model/types.js';

const col = (name: string, extra: Partial<Column> = {}): Column => ({ name, type: { kind: 'integer' }, nativeType: 'Int', nullable: false, ...extra });
const t = (id: string, columns: Column[], over: Partial<Table> = {}): Table => ({ id, name: id, kind: 'table', columns, primaryKey: ['id'], foreignKeys: [], uniques: [], ...over });
const snap = (...tables: Table[]) => ({ tables: tables.map((table) => ({ table })) });
const kinds = (cs: ReturnType<typeof diffSnapshots>) => cs.map((c) => `${c.kind} ${c.table}${c.column ? '.' + c.column : ''}${c.before !== undefined ? ` ${c.before}` : ''}${c.after !== undefined ? ` > ${c.after}` : ''}`);

describe('changes between two snapshots', () => {
  it('reports every column-level kind once', () => {
    const before = snap(t('tools', [col('id'), col('name', { type: { kind: 'string', length: 80 } }), col('note', { nullable: true }), col('state', { type: { kind: 'enum', name: 'S', values: ['A'] } }), col('gone')], { uniques: [] }));
    const after = snap(t('tools', [col('id'), col('name', { type: { kind: 'string', length: 160 } }), col('note', { default: "''" }), col('state', { type: { kind: 'enum', name: 'S', values: ['A', 'B'] } }), col('added')], { uniques: [{ columns: ['name'] }] }));
    expect(kinds(diffSnapshots(3, before, after))).toEqual([
      'column-added tools.added > integer',
      'column-removed tools.gone integer',
      'column-type-changed tools.name string(80) > string(160)',
      'column-nullability-changed tools.note nullable > not null',
      'column-default-changed tools.note > \'\'',
      'column-unique-changed tools.name not unique > unique',
      'column-enum-values-changed tools.state A > A|B',
    ]);
  });

  it('a stated rename counts once, as a rename, not also as the key changes it implies', () => {
    const members = t('members', [col('id')]);
    const before = snap(members, t('loans', [col('id'), col('member_id')], { primaryKey: ['id', 'member_id'], foreignKeys: [{ columns: ['member_id'], referencedTable: 'members', referencedColumns: ['id'], enforcement: 'database' }] }));
    const after = snap(members, t('loans', [col('id'), col('borrower_id', { id: 'member_id' })], { name: 'borrowings', primaryKey: ['id', 'borrower_id'], foreignKeys: [{ columns: ['borrower_id'], referencedTable: 'members', referencedColumns: ['id'], enforcement: 'database' }] }));
    expect(kinds(diffSnapshots(1, before, after))).toEqual(['table-renamed loans loans > borrowings', 'column-renamed loans.borrower_id member_id > borrower_id']);
  });

  it('foreign keys: identity is (table, columns); a change of target or action is a change', () => {
    const fk = { columns: ['tool_id'], referencedTable: 'tools', referencedColumns: ['id'], enforcement: 'database' as const };
    const before = snap(t('loans', [col('id'), col('tool_id'), col('member_id')], { foreignKeys: [fk, { ...fk, columns: ['member_id'], referencedTable: 'members' }] }));
    const after = snap(t('loans', [col('id'), col('tool_id'), col('member_id')], { foreignKeys: [{ ...fk, onDelete: 'cascade' }] }));
    expect(kinds(diffSnapshots(2, before, after))).toEqual([
      'foreign-key-removed loans (member_id) -> members(id)',
      'foreign-key-changed loans (tool_id) -> tools(id) > (tool_id) -> tools(id) on delete cascade',
    ]);
  });

  it('tables added and removed; the first snapshot lists its tables as added', () => {
    expect(kinds(diffSnapshots(0, null, snap(t('a', [col('id')]))))).toEqual(['table-added a > 1 columns']);
    expect(kinds(diffSnapshots(4, snap(t('a', [col('id')])), snap(t('b', [col('id')]))))).toEqual(['table-removed a 1 columns', 'table-added b > 1 columns']);
  });
});
