import { describe, expect, it } from 'vitest';
import { detectRenames, nameSimilarity, type HistoryStep } from '../../src/changes/rename-heuristic.js';
import type { Column, Table } from '../../src/model/types.js';

const col = (name: string, extra: Partial<Column> = {}): Column => ({ name, type: { kind: 'integer' }, nativeType: 'Int', nullable: false, ...extra });
const t = (id: string, cols: string[], over: Partial<Table> = {}): Table => ({ id, name: id, kind: 'table', columns: cols.map((c) => col(c)), primaryKey: ['id'], foreignKeys: [], uniques: [], ...over });
const steps = (...versions: Array<Table[] | null>): HistoryStep[] => versions.map((tables, index) => ({ index, key: tables ? `k${index}` : null, tables: tables ?? [] }));

describe('rename heuristic', () => {
  it('name similarity is 1 - Levenshtein distance / longer length', () => {
    expect(nameSimilarity('tool_kit', 'tool_kits')).toBeCloseTo(1 - 1 / 9, 12);
    expect(nameSimilarity('joined_on', 'joined_at')).toBeCloseTo(1 - 2 / 9, 12);
    expect(nameSimilarity('', '')).toBe(1);
  });
  it('a table renamed keeps its id; foreign keys pointing at it do not change', () => {
    const loans = (target: string) => t('loans', ['id', 'kit_id'], { foreignKeys: [{ columns: ['kit_id'], referencedTable: target, referencedColumns: ['id'], enforcement: 'database' }] });
    const { changes, matches } = detectRenames(steps([t('tool_kit', ['id', 'label']), loans('tool_kit')], [t('tool_kits', ['id', 'label']), loans('tool_kits')]));
    expect(changes.filter((c) => c.version === 1)).toEqual([
      { version: 1, kind: 'table-renamed', table: 'tool_kit', before: 'tool_kit', after: 'tool_kits', basis: 'heuristic', evidence: matches[0]!.evidence },
    ]);
    expect(matches[0]).toMatchObject({ kind: 'table', columnOverlap: 1, score: (1 - 1 / 9 + 1) / 2 });
  });
  it('the id carries on: a later change to the renamed table is a change of the first id', () => {
    const { changes } = detectRenames(steps([t('tool_kit', ['id', 'label'])], [t('tool_kits', ['id', 'label'])], [t('tool_kits', ['id', 'label', 'size'])]));
    expect(changes.filter((c) => c.version === 2).map((c) => [c.kind, c.table, c.column])).toEqual([['column-added', 'tool_kit', 'size']]);
  });
  it('too few shared columns, or a name too far: removal and addition', () => {
    expect(detectRenames(steps([t('tool_kit', ['id', 'a', 'b', 'c'])], [t('tool_kits', ['id', 'x', 'y', 'z'])])).matches).toEqual([]);
    expect(detectRenames(steps([t('kits', ['id', 'label'])], [t('equipment_sets', ['id', 'label'])])).matches).toEqual([]);
  });
  it('a match is dropped when the old name comes back while the renamed table lives (the ids would clash)', () => {
    const { matches, changes } = detectRenames(steps([t('tool_kit', ['id', 'label'])], [t('tool_kits', ['id', 'label'])], [t('tool_kit', ['id', 'label']), t('tool_kits', ['id', 'label'])]));
    expect(matches).toEqual([]);
    expect(changes.filter((c) => c.version === 1).map((c) => [c.kind, c.table])).toEqual([['table-removed', 'tool_kit'], ['table-added', 'tool_kits']]);
  });
  it('a column renamed: same type and similar names; the primary key over it does not change', () => {
    const before = t('members', ['member_no', 'name'], { primaryKey: ['member_no'] });
    const after = t('members', ['member_nr', 'name'], { primaryKey: ['member_nr'] });
    const { changes } = detectRenames(steps([before], [after]));
    expect(changes.filter((c) => c.version === 1).map((c) => [c.kind, c.column, c.before, c.basis])).toEqual([['column-renamed', 'member_nr', 'member_no', 'heuristic']]);
  });
  it('a column of another type is never a rename', () => {
    const { changes } = detectRenames(steps([t('members', ['id', 'joined_on'])], [{ ...t('members', ['id']), columns: [col('id'), col('joined_at', { type: { kind: 'date' } })] }]));
    expect(changes.filter((c) => c.version === 1).map((c) => c.kind)).toEqual(['column-added', 'column-removed']);
  });
  it('absent versions and unchanged ones make no changes', () => {
    const { changes } = detectRenames([
      { index: 0, key: 'a', tables: [t('members', ['id'])] },
      { index: 1, key: null, tables: [] },
      { index: 2, key: 'a', tables: [t('members', ['id'])] },
    ]);
    expect(changes.map((c) => [c.version, c.kind])).toEqual([[0, 'table-added']]);
  });
});
