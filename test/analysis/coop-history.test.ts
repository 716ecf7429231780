import { describe, expect, test } from 'vitest';
import { DirectedGraph } from 'graphology';
import {
  CHANGE_KINDS,
  analyzeDocument,
  analyzeTimeline,
  documentFromSnapshots,
  timelineOf,
  topologyClassOf,
  versionGraph,
  type Analysis,
  type InterchangeDocument,
} from '@schema-strata/core';
import { coopSnapshotVersions } from '../fixtures/analysis/coop-story.js';
import { checkAgainstHandWorked } from '../fixtures/analysis/check-hand-worked.js';
import { R } from '../fixtures/analysis/r-reference.js';

const stated = (): InterchangeDocument => documentFromSnapshots(coopSnapshotVersions({ stated: true }));
const physical = (): InterchangeDocument => documentFromSnapshots(coopSnapshotVersions({ stated: false }));
const close = (got: number, want: number, rel = 1e-9): void => expect(Math.abs(got - want) / Math.abs(want), `${got} vs ${want}`).toBeLessThanOrEqual(rel);

describe('the hand-worked co-op history (neutral snapshots, renames stated)', () => {
  const doc = stated();
  const a = analyzeDocument(doc);

  test('the fixture has what it promises: >= 12 tables, >= 10 versions, every change kind, every class', () => {
    expect(a.tables.length).toBeGreaterThanOrEqual(12);
    expect(doc.versions.length).toBeGreaterThanOrEqual(10);
    expect(new Set(doc.changes.map((c) => c.kind))).toEqual(new Set(CHANGE_KINDS));
    expect(new Set(a.tables.map((t) => t.graph!.class))).toEqual(new Set(['isolated', 'source', 'sink', 'intermediate']));
  });

  test('every measure as worked out by hand', () => checkAgainstHandWorked(a));

  test('statistics: chi-square 9 on 3 df and V = 0.75 by hand; p-values as R computes them', () => {
    const b = a.statistics.classByBirthGroup;
    // expected counts by hand: row total x 8 / 16
    expect(b.table.expected).toEqual([[1.5, 1.5], [2.5, 2.5], [2, 2], [2, 2]]);
    expect(b.table.rowPercent[1]).toEqual([0, 100]);
    expect(b.table.columnPercent.map((r) => r[0])).toEqual([37.5, 0, 25, 37.5]);
    if (!b.chiSquare.computable || !b.cramersV.computable || !b.exact.computable || !b.cramersV.biasCorrected.computable) throw new Error('not computable');
    expect(b.chiSquare.statistic).toBe(9); // (1.5^2/1.5)*2 + (2.5^2/2.5)*2 + 0 + (1/2)*2
    expect(b.chiSquare.df).toBe(3);
    close(b.chiSquare.pValue, R.chisq.birth.p);
    expect(b.cramersV.value).toBe(0.75); // sqrt(9 / 16)
    close(b.cramersV.biasCorrected.value, Math.sqrt((9 / 16 - 3 / 15) / (2 - 1 / 15 - 1))); // by hand from Bergsma's formula
    expect(b.exact.method).toBe('exact');
    close(b.exact.pValue, R.fisher.birth);
    const d = a.statistics.classByActivityBand;
    if (!d.chiSquare.computable || !d.cramersV.computable || !d.exact.computable || d.cramersV.biasCorrected.computable !== true) throw new Error('not computable');
    close(d.chiSquare.statistic, 71 / 14); // sum of (O - E)^2 / E worked out by hand
    close(d.chiSquare.pValue, R.chisq.band.p);
    close(d.cramersV.value, Math.sqrt(71 / 14 / 32));
    expect(d.cramersV.biasCorrected.value).toBe(0); // phi^2 = 71/224 < (3 * 2) / 15
    close(d.exact.pValue, R.fisher.band);
    const s = a.statistics.degreeVersusUpdates;
    if (!s.computable) throw new Error(s.reason);
    close(s.rho, 182.5 / Math.sqrt(318 * 305)); // centred average ranks, by hand
    close(s.pValue, R.spearman.fixture.p);
    const k = a.statistics.updatesByClass;
    if (!k.computable) throw new Error(k.reason);
    // rank sums by class: isolated 23 (3), source 43.5 (5), sink 21.5 (4), intermediate 48 (4); ties 7, 4, 3 of 16
    const h = ((12 / (16 * 17)) * (23 ** 2 / 3 + 43.5 ** 2 / 5 + 21.5 ** 2 / 4 + 48 ** 2 / 4) - 3 * 17) / (1 - (336 + 60 + 24) / (16 ** 3 - 16));
    close(k.statistic, h);
    close(k.pValue, R.kruskal.fixture.p);
    expect(k.groups.map((g) => g.meanRank)).toEqual([23 / 3, 43.5 / 5, 21.5 / 4, 12]);
    expect(a.statistics.caution).toMatch(/not evidence that one causes the other/);
  });

  test("degrees and classes agree with graphology's own degree functions on the simple directed graph", () => {
    // the history graph rebuilt from the snapshots alone: every FK of every version, merged into a
    // simple directed graph (graphology's mergeEdge), self-loops left out
    const g = new DirectedGraph({ allowSelfLoops: false });
    for (const t of a.tables) g.addNode(t.id);
    for (const v of timelineOf(doc).versions) {
      for (const t of v.tables) for (const fk of t.foreignKeys) if (fk.referencedTable !== t.id) g.mergeEdge(t.id, fk.referencedTable);
    }
    for (const t of a.tables) {
      expect([t.graph!.inDegree, t.graph!.outDegree], t.id).toEqual([g.inDegree(t.id), g.outDegree(t.id)]);
      expect(t.graph!.class, t.id).toBe(topologyClassOf(g.inDegree(t.id), g.outDegree(t.id)));
    }
    // parallel FKs are kept as a number: loans -> members has two
    expect(a.graph.edges.filter((e) => e.source === 'loans' && e.target === 'members').length).toBe(2);
    // the self-reference is an edge of the history graph, not a degree
    expect(a.graph.edges.find((e) => e.source === 'categories' && e.target === 'categories')?.versions).toEqual([[0, 11]]);
    expect(a.graph.edges.find((e) => e.source === 'tools' && e.target === 'workshops')?.versions).toEqual([[0, 3]]);
  });

  test("per-version classes agree with graphology's degrees on each version's graph", () => {
    const tl = timelineOf(doc);
    const scope = { included: new Set(a.tables.map((t) => t.id)), existed: new Set(a.tables.map((t) => t.id)), options: { excludeOrmForeignKeys: false } };
    for (const v of tl.versions) {
      const multi = versionGraph(tl, v.index, scope);
      const simple = new DirectedGraph({ allowSelfLoops: false });
      multi.forEachNode((n) => simple.addNode(n));
      multi.forEachEdge((_e, _attrs, s, t) => {
        if (s !== t) simple.mergeEdge(s, t);
      });
      simple.forEachNode((n) => {
        const run = a.tables.find((t) => t.id === n)!.graph!.classes.find((r) => r.from <= v.index && v.index <= r.to)!;
        expect(run.class, `${n} at ${v.index}`).toBe(topologyClassOf(simple.inDegree(n), simple.outDegree(n)));
      });
      expect(multi.size, `FKs at ${v.index}`).toBe(a.versions[v.index]!.foreignKeys);
    }
  });

  test('the same input gives the same bytes', () => {
    expect(JSON.stringify(analyzeDocument(stated()))).toBe(JSON.stringify(a));
  });
});

describe('the co-op history known by physical names only', () => {
  test('without the heuristic, the rename is a removal and an addition', () => {
    const a = analyzeDocument(physical());
    expect(a.tables.map((t) => t.id)).toContain('tool_kits');
    expect(a.tables.find((t) => t.id === 'tool_kit')!.removal?.version).toBe(2);
    expect(a.renames).toEqual([]);
  });
  test('with --renames heuristic, both renames are found with their evidence, and every measure is as stated', () => {
    const a = analyzeDocument(physical(), {}, { mode: 'heuristic' });
    expect(a.renames).toEqual([
      { version: 2, kind: 'table', table: 'tool_kit', from: 'tool_kit', to: 'tool_kits', evidence: 'name similarity 0.89 (tool_kit -> tool_kits), 3 of 3 column names shared (overlap 1.00), score 0.94 >= 0.70' },
      { version: 8, kind: 'column', table: 'members', from: 'joined_on', to: 'joined_at', evidence: 'same type date, name similarity 0.78 (joined_on -> joined_at) >= 0.70' },
    ]);
    expect(a.options.renames).toBe('heuristic');
    checkAgainstHandWorked(a);
    expect(a.tables.find((t) => t.id === 'tool_kit')!.formerNames).toEqual(['tool_kit']);
  });
  test('a stricter threshold finds only the table rename', () => {
    const a = analyzeDocument(physical(), {}, { mode: 'heuristic', threshold: 0.8 });
    expect(a.renames.map((r) => r.kind)).toEqual(['table']);
  });
});

describe('options and filters on the co-op history', () => {
  const tl = timelineOf(stated());
  const row = (a: Analysis, id: string) => a.tables.find((t) => t.id === id)!;

  test('--high-above 7: tools (7 updates) is low, the empty high column is dropped from the tests and reported', () => {
    const a = analyzeTimeline(tl, { highAbove: 7 });
    expect(row(a, 'tools').activityBand).toBe('low');
    expect(a.statistics.classByActivityBand.table.droppedColumns).toEqual(['high']);
    const c = a.statistics.classByActivityBand.chiSquare;
    expect(c.computable && c.df).toBe(3);
    expect(a.statistics.classByActivityBand.reading[0]).toMatch(/left out of the tests as empty: high/);
  });
  test('--count: another set of counted kinds', () => {
    const a = analyzeTimeline(tl, { count: ['foreign-key-added', 'foreign-key-removed', 'foreign-key-changed'] });
    expect(row(a, 'members').countedUpdates).toBe(1);
    expect(row(a, 'fees').countedUpdates).toBe(1);
    expect(row(a, 'tools').countedUpdates).toBe(1);
    expect(a.summary.countedUpdates).toBe(5);
  });
  test('--band-by per-year: favourites (20 days of life) has no band and is left out of that table only', () => {
    const a = analyzeTimeline(tl, { bandBy: 'per-year', highAbove: 3 });
    expect(row(a, 'favourites').activityBand).toBeNull();
    // tools: 7 / (320 / 365.25) = 7.99 per year > 3; loans: 5.71 > 3; members 2.28 <= 3
    expect([row(a, 'tools').activityBand, row(a, 'loans').activityBand, row(a, 'members').activityBand]).toEqual(['high', 'high', 'low']);
    expect(a.statistics.classByActivityBand.leftOut).toEqual([{ table: 'favourites', reason: 'no per-year rate (under 30 days of life)' }]);
    expect(a.statistics.classByActivityBand.table.total).toBe(15);
    expect(a.statistics.classByBirthGroup.table.total).toBe(16);
  });
  test('--initial-versions 3 and --initial-until a date', () => {
    const three = analyzeTimeline(tl, { initial: { kind: 'versions', count: 3 } });
    expect(three.summary.birthGroups).toEqual({ initial: 10, later: 6 }); // + reservations, plans (born at 2)
    const byDate = analyzeTimeline(tl, { initial: { kind: 'date', date: '2023-05-02' } });
    expect(byDate.options.initialCutoff).toBe(4);
    expect(byDate.summary.birthGroups).toEqual({ initial: 12, later: 4 }); // + tags, _TagToTool (born at 4)
  });
  test('--exclude-implicit-joins: _TagToTool is left out, tags becomes isolated', () => {
    const a = analyzeTimeline(tl, { excludeImplicitJoins: true });
    expect(row(a, '_TagToTool')).toMatchObject({ included: false, graph: null, excludedBecause: expect.stringContaining('implicit join') });
    expect(row(a, 'tags').graph!.class).toBe('isolated');
    expect(row(a, 'tools').graph!.inDegree).toBe(4);
    expect(a.statistics.units).toBe(15);
    expect(a.versions[4]!.tables).toBe(11);
  });
  test('--exclude patterns match ids and every former name', () => {
    const a = analyzeTimeline(tl, { exclude: ['tool_kits', 'audit_*'] });
    expect(a.tables.filter((t) => !t.included).map((t) => t.id)).toEqual(['audit_entries', 'tool_kit']);
  });
  test('--exclude-orm-fks leaves out ORM-only foreign keys', () => {
    const versions = coopSnapshotVersions();
    for (const v of versions) {
      for (const t of v.snapshot!.tables) for (const fk of t.foreignKeys) if (t.name === 'volunteers') fk.enforcement = 'orm';
    }
    const doc = documentFromSnapshots(versions);
    const kept = analyzeDocument(doc);
    expect(row(kept, 'volunteers').graph!.class).toBe('intermediate');
    const a = analyzeDocument(doc, { excludeOrmForeignKeys: true });
    expect(row(a, 'volunteers').graph!.class).toBe('sink');
    expect(row(a, 'members').graph!.inDegree).toBe(3);
    expect(a.versions[6]!.foreignKeys).toBe(12);
  });
});

describe('edge cases of the measures', () => {
  const tbl = (name: string, fks: Array<[string, string]> = [], cols = ['id']) => ({
    name, kind: 'table' as const, primaryKey: ['id'], uniques: [],
    columns: cols.map((c) => ({ name: c, type: { kind: 'integer' as const }, nativeType: 'int', nullable: false })),
    foreignKeys: fks.map(([c, target]) => ({ columns: [c], referencedTable: target, referencedColumns: ['id'], enforcement: 'database' as const })),
  });
  test('a foreign key to a table that never existed is reported and kept out of the degrees', () => {
    const doc = documentFromSnapshots([{ date: '2024-01-01T00:00:00Z', snapshot: { tables: [tbl('loans', [['ghost_id', 'ghosts']], ['id', 'ghost_id'])] } }]);
    const a = analyzeDocument(doc);
    expect(a.graph.dangling).toEqual([{ table: 'loans', columns: ['ghost_id'], referencedTable: 'ghosts', versions: [[0, 0]] }]);
    expect(a.tables[0]!.graph).toMatchObject({ inDegree: 0, outDegree: 0, class: 'isolated' });
    expect(a.versions[0]!.foreignKeys).toBe(1);
  });
  test('an absent version keeps the last schema; a one-table history gives "not computable", never NaN', () => {
    const doc = documentFromSnapshots([
      { date: '2024-01-01T00:00:00Z', snapshot: { tables: [tbl('members')] } },
      { date: '2024-01-10T00:00:00Z', snapshot: null },
      { date: '2024-03-01T00:00:00Z', snapshot: { tables: [tbl('members', [], ['id', 'phone'])] } },
    ]);
    const a = analyzeDocument(doc);
    expect(a.tables[0]).toMatchObject({ spells: [{ born: 0, removed: null }], lifetime: { versions: 3 }, countedUpdates: 1 });
    expect(a.versions.map((v) => [v.status, v.tables])).toEqual([['ok', 1], ['absent', 1], ['ok', 1]]);
    const s = a.statistics;
    expect(s.classByBirthGroup.chiSquare).toEqual({ computable: false, reason: expect.any(String) });
    expect(s.classByBirthGroup.exact.computable).toBe(false);
    expect(s.classByBirthGroup.cramersV.computable).toBe(false);
    expect(s.degreeVersusUpdates.computable).toBe(false);
    expect(s.updatesByClass.computable).toBe(false);
    expect(JSON.stringify(a)).not.toMatch(/NaN|null,"reason"/);
  });
});

describe('the CSV codebook', () => {
  test('packages/core/schema/csv-fields.json is what the CSV writers write (regenerate with node scripts/make-schema.mjs)', async () => {
    const { readFileSync } = await import('node:fs');
    const { createRequire } = await import('node:module');
    const { csvFieldsDocument } = await import('@schema-strata/core');
    const file = createRequire(import.meta.url).resolve('@schema-strata/core/package.json').replace(/package\.json$/, 'schema/csv-fields.json');
    expect(JSON.parse(readFileSync(file, 'utf8'))).toEqual(csvFieldsDocument());
  });
});
