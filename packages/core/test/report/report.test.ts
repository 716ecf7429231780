import { describe, expect, it } from 'vitest';
import { analyzeDocument } from '../../src/analysis/analyze.js';
import { documentFromSnapshots, type SnapshotVersion } from '../../src/analysis/input/from-snapshots.js';
import type { Column, ForeignKey, SnapshotInput } from '../../src/model/types.js';
import { buildReport } from '../../src/report/build-report.js';
import { growthSpec } from '../../src/report/charts/growth.js';
import { heatMapSpec, percentText } from '../../src/report/charts/heat-map.js';
import { historyGraphSpec, labelledCount, labelledNodes } from '../../src/report/charts/history-graph.js';
import { lifetimeSpec, rowNames } from '../../src/report/charts/lifetime.js';
import { layoutGraph } from '../../src/report/graph-layout.js';
import { escapeHtml, formatInt } from '../../src/report/page.js';
import { renderSvg, scopeIds } from '../../src/report/render-svg.js';
import { reportData } from '../../src/report/report-data.js';

const col = (name: string, kind: 'integer' | 'text' = 'integer'): Column => ({ name, type: { kind }, nativeType: kind === 'integer' ? 'Int' : 'String', nullable: false });
const fk = (column: string, to: string): ForeignKey => ({ columns: [column], referencedTable: to, referencedColumns: ['id'], enforcement: 'database' });
const table = (name: string, columns: string[], fks: ForeignKey[] = []): SnapshotInput['tables'][number] => ({
  name, kind: 'table', columns: [col('id'), ...columns.map((c) => col(c, 'text'))], primaryKey: ['id'], foreignKeys: fks, uniques: [],
});

/**
 * A small history, worked by hand:
 *  v0 members, tools; v1 loans -> members, tools (2 FKs); v2 members + phone (1 counted update);
 *  v3 the same schema (no change in the series); v4 tools loses nothing, loans gains a second FK
 *  to members and a column (1 counted update), repairs -> tools born; v5 repairs removed.
 */
const versions: SnapshotVersion[] = [
  { date: '2024-01-01T10:00:00Z', snapshot: { tables: [table('members', ['name']), table('tools', ['label'])] } },
  { date: '2024-01-15T10:00:00Z', snapshot: { tables: [table('members', ['name']), table('tools', ['label']), table('loans', ['member_id', 'tool_id'], [fk('member_id', 'members'), fk('tool_id', 'tools')])] } },
  { date: '2024-02-01T10:00:00Z', snapshot: { tables: [table('members', ['name', 'phone']), table('tools', ['label']), table('loans', ['member_id', 'tool_id'], [fk('member_id', 'members'), fk('tool_id', 'tools')])] } },
  { date: '2024-02-02T10:00:00Z', commit: 'c'.repeat(40), snapshot: { tables: [table('members', ['name', 'phone']), table('tools', ['label']), table('loans', ['member_id', 'tool_id'], [fk('member_id', 'members'), fk('tool_id', 'tools')])] } },
  {
    date: '2024-03-01T10:00:00Z',
    snapshot: {
      tables: [
        table('members', ['name', 'phone']),
        table('tools', ['label']),
        table('loans', ['member_id', 'tool_id', 'witness_id'], [fk('member_id', 'members'), fk('tool_id', 'tools'), fk('witness_id', 'members')]),
        table('repairs', ['tool_id'], [fk('tool_id', 'tools')]),
      ],
    },
  },
  {
    date: '2024-04-01T10:00:00Z',
    snapshot: { tables: [table('members', ['name', 'phone']), table('tools', ['label']), table('loans', ['member_id', 'tool_id', 'witness_id'], [fk('member_id', 'members'), fk('tool_id', 'tools'), fk('witness_id', 'members')])] },
  },
];
const doc = documentFromSnapshots(versions, { repository: 'work/coop-app/' });
doc.versions[2]!.counters = { rawStatements: 2 };
doc.versions[5]!.counters = { rawStatements: 3 };
doc.versions[4]!.diagnostics.push({ severity: 'warning', code: 'orm/unresolved-decorator', message: 'a decorator could not be resolved', file: 'src/loan.ts', line: 7 });
doc.versions[5]!.diagnostics.push({ severity: 'warning', code: 'orm/unresolved-decorator', message: 'again', file: 'src/loan.ts', line: 7 });
const analysis = analyzeDocument(doc);

describe('report data', () => {
  const d = reportData(doc, analysis);

  it('headline figures, by hand', () => {
    expect(d.title).toBe('coop-app');
    expect(d.headline).toMatchObject({
      versions: 6,
      tablesEver: 4,
      tablesToday: 3,
      removed: 1,
      countedUpdates: 2, // phone (v2), witness_id (v4)
      columnsToday: 2 + 3 + 4,
      foreignKeysToday: 3,
      spanDays: 91,
    });
  });

  it('the growth curve keeps only the versions where a series moves, and the last one', () => {
    expect(d.growth.map((p) => [p.version, p.tables, p.columns, p.foreignKeys])).toEqual([
      [0, 2, 4, 0],
      [1, 3, 7, 2],
      [2, 3, 8, 2],
      [4, 4, 11, 4],
      [5, 3, 9, 3],
    ]);
    expect(d.growth[0]!.time).toBe(Date.parse('2024-01-01T10:00:00Z'));
  });

  it('lifetimes: ordered by birth then id, a span per spell, ticks at counted updates', () => {
    expect(d.lifetimes.map((r) => r.id)).toEqual(['members', 'tools', 'loans', 'repairs']);
    expect(d.lifetimes.find((r) => r.id === 'repairs')!.spans).toEqual([{ from: 4, to: 5, alive: false }]);
    expect(d.lifetimes.find((r) => r.id === 'members')!.spans).toEqual([{ from: 0, to: 6, alive: true }]);
    expect(d.lifetimes.find((r) => r.id === 'members')!.updates).toEqual([{ version: 2, count: 1 }]);
    expect(d.lifetimes.find((r) => r.id === 'loans')!.updates).toEqual([{ version: 4, count: 1 }]);
    expect(d.lifetimes.map((r) => r.category)).toEqual(['sink', 'sink', 'source', 'source']);
  });

  it('the drawn graph merges parallel foreign keys into one link with their number', () => {
    expect(d.graph.nodes).toHaveLength(4);
    expect(d.graph.links).toEqual([
      { source: 'loans', target: 'members', foreignKeys: 2, alive: true },
      { source: 'loans', target: 'tools', foreignKeys: 1, alive: true },
      { source: 'repairs', target: 'tools', foreignKeys: 1, alive: false },
    ]);
  });

  it('coverage: counters by name, diagnostics by code, unresolved ones counted', () => {
    expect(d.coverage.counters).toEqual([{ name: 'rawStatements', last: 3, max: 3, versionsAboveZero: 2 }]);
    expect(d.coverage.diagnostics).toEqual([
      { code: 'orm/unresolved-decorator', severity: 'warning', count: 2, versions: 2, example: 'src/loan.ts:7: a decorator could not be resolved' },
    ]);
    expect(d.coverage.unresolved).toBe(2);
    expect(d.coverage.carried).toEqual([]);
  });

  it('most changed tables, by counted updates then id', () => {
    expect(d.topChanged.map((t) => [t.id, t.countedUpdates])).toEqual([['loans', 1], ['members', 1]]);
    expect(d.topChanged[0]!.byKind).toEqual([{ kind: 'column-added', count: 1 }]);
  });
});

describe('layout', () => {
  const d = reportData(doc, analysis);
  it('is deterministic and fills [0, 1000] on its longer side', () => {
    const a = layoutGraph(d.graph.nodes, d.graph.links);
    const b = layoutGraph([...d.graph.nodes].reverse(), [...d.graph.links].reverse());
    expect([...b.entries()].sort()).toEqual([...a.entries()].sort());
    const xs = [...a.values()].map((p) => p.x);
    const ys = [...a.values()].map((p) => p.y);
    expect(Math.max(Math.max(...xs) - Math.min(...xs), Math.max(...ys) - Math.min(...ys))).toBeCloseTo(1000, 1);
    for (const p of a.values()) expect(Math.min(p.x, p.y)).toBeGreaterThanOrEqual(0);
  });
  it('pulls linked tables closer than unlinked ones (ForceAtlas2 attraction along edges)', () => {
    const nodes = ['a', 'b', 'c', 'd', 'e', 'f'].map((id) => ({ id, label: id, category: 'sink' as const, countedUpdates: 0, inDegree: 0, outDegree: 0, selfReferences: 0, alive: true }));
    const links = [
      { source: 'a', target: 'b', foreignKeys: 1, alive: true },
      { source: 'b', target: 'c', foreignKeys: 1, alive: true },
      { source: 'a', target: 'c', foreignKeys: 1, alive: true },
      { source: 'd', target: 'e', foreignKeys: 1, alive: true },
      { source: 'e', target: 'f', foreignKeys: 1, alive: true },
      { source: 'd', target: 'f', foreignKeys: 1, alive: true },
    ];
    const p = layoutGraph(nodes, links);
    const dist = (x: string, y: string) => Math.hypot(p.get(x)!.x - p.get(y)!.x, p.get(x)!.y - p.get(y)!.y);
    expect(dist('a', 'b')).toBeLessThan(dist('a', 'e'));
    expect(dist('d', 'f')).toBeLessThan(dist('c', 'f'));
  });
});

describe('charts', () => {
  const d = reportData(doc, analysis);

  it('compile without a single Vega-Lite warning and render to SVG', async () => {
    const warnings: string[] = [];
    const at = layoutGraph(d.graph.nodes, d.graph.links);
    for (const [name, spec] of [
      ['growth', growthSpec(d.growth)],
      ['lifetimes', lifetimeSpec(d.lifetimes, d.lastVersion)],
      ['graph', historyGraphSpec(d.graph.nodes, d.graph.links, at)],
      ['heat', heatMapSpec(d.contingency[0]!.analysis.table)],
    ] as const) {
      const svg = await renderSvg(spec, name, warnings);
      expect(svg.startsWith('<svg'), name).toBe(true);
    }
    expect(warnings).toEqual([]);
  });

  it('the lifetime chart has one bar per spell and one tick per version with counted updates', async () => {
    const svg = await renderSvg(lifetimeSpec(d.lifetimes, d.lastVersion), 'l');
    const group = (name: string) => new RegExp(`class="mark-[a-z]+ role-mark ${name}_marks"[^>]*>([\\s\\S]*?)</g>`).exec(svg)![1]!;
    expect(group('lifetime_spans').match(/<path/g)).toHaveLength(4);
    expect(group('lifetime_updates').match(/<path/g)).toHaveLength(2);
  });

  it('heat-map cells carry the count and the share of the row', async () => {
    const t = d.contingency[0]!.analysis.table;
    const svg = await renderSvg(heatMapSpec(t), 'h');
    const counts = /heat_counts_marks"[^>]*>([\s\S]*?)<\/g>/.exec(svg)![1]!;
    expect([...counts.matchAll(/>(\d+)<\/text>/g)].map((m) => Number(m[1]))).toEqual(t.counts.flat());
  });

  it('scopeIds renames ids and their references, in order of appearance', () => {
    const svg = '<svg><clipPath id="clip7"><rect/></clipPath><g clip-path="url(#clip7)"/><linearGradient id="gradient_3"/><rect fill="url(#gradient_3)"/><use href="#clip7"/></svg>';
    expect(scopeIds(svg, 'x')).toBe('<svg><clipPath id="x-1"><rect/></clipPath><g clip-path="url(#x-1)"/><linearGradient id="x-2"/><rect fill="url(#x-2)"/><use href="#x-1"/></svg>');
  });

  it('small helpers', () => {
    expect(percentText(null)).toBe('–');
    expect(percentText(0)).toBe('0%');
    expect(percentText(4.44)).toBe('4.4%');
    expect(percentText(66.666)).toBe('67%');
    expect(formatInt(1234567)).toBe('1,234,567');
    expect(escapeHtml(`<a href="x">'&'</a>`)).toBe('&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;');
    expect(labelledCount(5)).toBe(5);
    expect(labelledCount(150)).toBe(21);
    expect(rowNames([{ label: 'a', id: 'a' }, { label: 'a', id: 'b' }, { label: 'c', id: 'c' }] as never)).toEqual(['a (a)', 'a (b)', 'c']);
    expect(labelledNodes(d.graph.nodes).size).toBe(4);
  });
});

describe('the page', () => {
  it('is the same bytes for the same input, and loads nothing from anywhere', async () => {
    const a = await buildReport(doc, analysis);
    const b = await buildReport(JSON.parse(JSON.stringify(doc)), JSON.parse(JSON.stringify(analysis)));
    expect(b).toBe(a);
    expect(a).toContain("default-src 'none'");
    // no element that could fetch: no src, no link, no url() but to the page's own ids, no @import
    expect(a).not.toMatch(/\ssrc=/);
    expect(a).not.toMatch(/<link\b/);
    expect(a).not.toMatch(/@import|@font-face/);
    expect([...a.matchAll(/url\(([^)]*)\)/g)].every((m) => m[1]!.startsWith('#'))).toBe(true);
    expect([...a.matchAll(/href="([^"]*)"/g)].every((m) => m[1]!.startsWith('#'))).toBe(true);
    // ids are unique across the charts
    const ids = [...a.matchAll(/\sid="([^"]+)"/g)].map((m) => m[1]);
    expect(new Set(ids).size).toBe(ids.length);
  });

  it('prints: a print style sheet is part of the page', async () => {
    const a = await buildReport(doc, analysis);
    expect(a).toMatch(/@media print \{/);
    expect(a).toContain('@page');
  });

  it('names what the reader needs to judge coverage', async () => {
    const a = await buildReport(doc, analysis, { title: 'T & co' });
    expect(a).toContain('<title>Schema history: T &amp; co</title>');
    expect(a).toContain('orm/unresolved-decorator');
    expect(a).toContain('rawStatements');
    expect(a).toContain('2 diagnostics say that something could not be resolved');
  });
});

describe('small histories', () => {
  it('one version with one table, and one version with no table at all, still give a page', async () => {
    for (const tables of [[table('only', [])], []]) {
      const d = documentFromSnapshots([{ date: '2024-01-01T00:00:00Z', snapshot: { tables } }]);
      const html = await buildReport(d, analyzeDocument(d));
      expect(html).toContain('</html>');
      expect(html).toContain(`<div class="value">${tables.length} / ${tables.length}</div>`);
    }
  });
});
