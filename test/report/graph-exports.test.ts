import { execFileSync, spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, test } from 'vitest';
import { DirectedGraph, MultiDirectedGraph } from 'graphology';
import gexf from 'graphology-gexf';
import graphml from 'graphology-graphml';
import { DOMParser } from '@xmldom/xmldom';
import {
  analyzeDocument,
  documentFromSnapshots,
  dotFile,
  gexfFile,
  graphmlFile,
  serialiseDocument,
  type Analysis,
  type TableMeasures,
} from '@schema-strata/core';
import { coopSnapshotVersions } from '../fixtures/analysis/coop-story.js';
import { runMain, tempDir } from '../helpers/repo.js';

// The hand-worked co-op history: every topology class, a self-reference, parallel foreign keys,
// a table removed and one removed and added again (several spells).
const doc = documentFromSnapshots(coopSnapshotVersions({ stated: true }));
// the analysis as the interchange JSON carries it (written and read back)
const analysis = JSON.parse(serialiseDocument(analyzeDocument(doc))) as Analysis;
const nodes = analysis.tables.filter((t) => t.graph !== null);
const last = analysis.versions[analysis.versions.length - 1]!.index;
const byId = new Map(nodes.map((t) => [t.id, t]));

/** What every node must say, written out from the analysis JSON (not from the writers' attribute list). */
function expectedNode(t: TableMeasures): Record<string, unknown> {
  const g = t.graph!;
  const out: Record<string, unknown> = {
    table_name: t.name,
    kind: t.kind,
    in_degree: g.inDegree,
    out_degree: g.outDegree,
    degree: g.degree,
    self_references: g.selfReferences,
    topology_class: g.class,
    class_changes: g.classChanges,
    birth_group: t.birthGroup,
    birth_version: t.birth.version,
    birth_date: t.birth.date,
    alive: t.removal === null,
    lifetime_versions: t.lifetime.versions,
    lifetime_days: t.lifetime.days,
    columns_at_birth: t.columns.atBirth,
    columns_at_end: t.columns.atEnd,
    counted_updates: t.countedUpdates,
    updates_per_version: t.updatesPerVersion,
  };
  if (t.ormName) out.orm_name = t.ormName;
  if (t.namespace) out.namespace = t.namespace;
  if (t.removal) {
    out.removal_version = t.removal.version;
    out.removal_date = t.removal.date;
  }
  if (t.updatesPerYear !== null) out.updates_per_year = t.updatesPerYear;
  if (t.activityBand !== null) out.activity_band = t.activityBand;
  return out;
}

const edgeSet = (list: Array<{ key: string; source: string; target: string }>) => list.map((e) => `${e.key}|${e.source}|${e.target}`).sort();
const expectedEdges = edgeSet(analysis.graph.edges);

test('the fixture exercises what the exports must carry', () => {
  expect(analysis.graph.edges.some((e) => e.source === e.target)).toBe(true); // a self-reference
  const pairs = analysis.graph.edges.map((e) => `${e.source}>${e.target}`);
  expect(new Set(pairs).size).toBeLessThan(pairs.length); // parallel foreign keys
  expect(nodes.some((t) => t.spells.length > 1)).toBe(true); // removed and added again
  expect(nodes.some((t) => t.removal !== null)).toBe(true);
});

/** Check a parsed graph (graphology, from an independent reader) against the analysis JSON. */
function checkGraph(g: MultiDirectedGraph, what: string): void {
  expect(g.order, `${what}: nodes`).toBe(analysis.graph.nodes);
  expect(new Set(g.nodes())).toEqual(new Set(nodes.map((t) => t.id)));
  for (const t of nodes) {
    const got = g.getNodeAttributes(t.id);
    expect(got, `${what}: node ${t.id}`).toMatchObject(expectedNode(t));
    expect(got.label).toBe(t.namespace ? `${t.namespace}.${t.name}` : t.name);
  }
  expect(edgeSet(g.mapEdges((key, _a, source, target) => ({ key, source, target }))), `${what}: edges`).toEqual(expectedEdges);
  for (const e of analysis.graph.edges) {
    const a = g.getEdgeAttributes(e.key);
    expect(a, `${what}: edge ${e.key}`).toMatchObject({
      columns: e.columns.join(','),
      referenced_columns: e.referencedColumns.join(','),
      enforcement: e.enforcement.join(','),
      self_reference: e.source === e.target,
      alive: e.versions.some(([, to]) => to === last),
    });
  }
  // degrees again, by graphology on the file's graph taken as a simple directed graph without self-loops
  const simple = new DirectedGraph();
  g.forEachNode((n) => simple.addNode(n));
  g.forEachEdge((_k, _a, s, t) => {
    if (s !== t) simple.mergeEdge(s, t);
  });
  for (const t of nodes) {
    expect(simple.inDegree(t.id), `${what}: in-degree of ${t.id}`).toBe(t.graph!.inDegree);
    expect(simple.outDegree(t.id), `${what}: out-degree of ${t.id}`).toBe(t.graph!.outDegree);
  }
}

/** The part of a DOM element the checks use (@xmldom/xmldom's own types need the DOM library). */
interface Element {
  tagName: string;
  childNodes: ArrayLike<unknown>;
  getAttribute(name: string): string | null;
  getElementsByTagName(name: string): ArrayLike<Element>;
}

const elements = (parent: Element, name: string): Element[] => Array.from(parent.getElementsByTagName(name));
const childElements = (parent: Element, name: string): Element[] => Array.from(parent.childNodes).filter((n): n is Element => (n as Element).tagName === name);

describe('GEXF', () => {
  const byVersion = gexfFile(doc, analysis, 'version');
  const byDate = gexfFile(doc, analysis, 'date');

  test('graphology-gexf reads back every node, edge and measure (GEXF reader of graphology, on @xmldom/xmldom)', () => {
    for (const text of [byVersion, byDate]) {
      // the reader keeps one attribute block per class; the dynamic one (version_class) comes undeclared
      const g = gexf.parse(MultiDirectedGraph, text, { allowUndeclaredAttributes: true }) as MultiDirectedGraph;
      checkGraph(g, 'gexf');
    }
  });

  test('a dynamic graph: nodes and edges carry their lifetimes as spells, in versions (closed intervals)', () => {
    const root = new DOMParser().parseFromString(byVersion, 'text/xml').documentElement as unknown as Element;
    const graph = elements(root, 'graph')[0]!;
    expect(graph.getAttribute('mode')).toBe('dynamic');
    expect(graph.getAttribute('timeformat')).toBe('integer');
    expect(graph.getAttribute('defaultedgetype')).toBe('directed');
    for (const n of elements(root, 'node')) {
      const t = byId.get(n.getAttribute('id')!)!;
      const spells = elements(n, 'spell').map((s) => [Number(s.getAttribute('start')), Number(s.getAttribute('end'))]);
      expect(spells, n.getAttribute('id')!).toEqual(t.spells.map((s) => [s.born, s.removed === null ? last : s.removed - 1]));
      const classes = elements(n, 'attvalue')
        .filter((a) => a.getAttribute('for') === 'version_class')
        .map((a) => ({ from: Number(a.getAttribute('start')), to: Number(a.getAttribute('end')), class: a.getAttribute('value') }));
      expect(classes, `${t.id}: class in every version`).toEqual(t.graph!.classes);
    }
    const edgesById = new Map(analysis.graph.edges.map((e) => [e.key, e]));
    for (const e of elements(root, 'edge')) {
      const want = edgesById.get(e.getAttribute('id')!)!;
      const spells = elements(e, 'spell').map((s) => [Number(s.getAttribute('start')), Number(s.getAttribute('end'))]);
      expect(spells).toEqual(want.versions);
    }
  });

  test('--time date: spells in committer dates (UTC), a removal as an open end', () => {
    const root = new DOMParser().parseFromString(byDate, 'text/xml').documentElement as unknown as Element;
    expect(elements(root, 'graph')[0]!.getAttribute('timeformat')).toBe('dateTime');
    const utc = (iso: string): string => new Date(iso).toISOString().replace('.000Z', 'Z');
    const dateOf = (v: number): string => utc(analysis.versions[v]!.date);
    let removed = 0;
    for (const n of elements(root, 'node')) {
      const t = byId.get(n.getAttribute('id')!)!;
      const spells = childElements(childElements(n, 'spells')[0]!, 'spell').map((s) => ({
        start: s.getAttribute('start'),
        end: s.getAttribute('end') || null,
        endopen: s.getAttribute('endopen') || null,
      }));
      expect(spells).toEqual(
        t.spells.map((s) =>
          s.removed === null ? { start: dateOf(s.born), end: dateOf(last), endopen: null } : { start: dateOf(s.born), end: null, endopen: dateOf(s.removed) },
        ),
      );
      removed += t.spells.filter((s) => s.removed !== null).length;
    }
    expect(removed).toBeGreaterThan(0);
  });
});

describe('GraphML', () => {
  test('graphology-graphml reads back every node, edge and typed measure', () => {
    const g = graphml.parse(MultiDirectedGraph, graphmlFile(doc, analysis)) as MultiDirectedGraph;
    checkGraph(g, 'graphml');
    const t = nodes.find((x) => x.spells.length > 1)!;
    expect(g.getNodeAttribute(t.id, 'spells')).toBe(t.spells.map((s) => `${s.born}-${s.removed === null ? '' : s.removed - 1}`).join(';'));
  });
});

describe('DOT', () => {
  const { dir, cleanup } = tempDir('strata-dot-');
  afterAll(cleanup);
  const file = join(dir, 'history.dot');
  writeFileSync(file, dotFile(doc, analysis));

  test("Graphviz's own dot is installed (scripts/ensure-system-deps.sh installs graphviz)", () => {
    const r = spawnSync('dot', ['-V'], { encoding: 'utf8' });
    expect(r.error, 'dot is missing: run scripts/ensure-system-deps.sh').toBeUndefined();
    expect(r.stderr).toMatch(/graphviz/i);
  });

  test('dot -Tsvg lays it out without complaint', () => {
    const r = spawnSync('dot', ['-Tsvg', file], { encoding: 'utf8' });
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).toBe('');
    expect((r.stdout.match(/<g id="node\d+" class="node">/g) ?? []).length).toBe(nodes.length);
  });

  test('dot -Tjson gives back every node, edge and measure', () => {
    const out = JSON.parse(execFileSync('dot', ['-Tjson', file], { encoding: 'utf8' })) as {
      objects: Array<Record<string, string> & { _gvid: number; name: string }>;
      edges: Array<Record<string, string> & { tail: number; head: number }>;
    };
    expect(out.objects.map((o) => o.name).sort()).toEqual(nodes.map((t) => t.id).sort());
    const nameOf = new Map(out.objects.map((o) => [o._gvid, o.name]));
    for (const o of out.objects) {
      const t = byId.get(o.name)!;
      for (const [k, v] of Object.entries(expectedNode(t))) expect(o[k], `${t.id}.${k}`).toBe(String(v));
    }
    expect(edgeSet(out.edges.map((e) => ({ key: e.id!, source: nameOf.get(e.tail)!, target: nameOf.get(e.head)! })))).toEqual(expectedEdges);
  });
});

describe('export command', () => {
  const { dir, cleanup } = tempDir('strata-export-');
  afterAll(cleanup);
  const history = join(dir, 'history.json');
  writeFileSync(history, serialiseDocument({ ...doc, analysis }));

  test('--format gexf --time date, graphml and dot write one file each; the same input gives the same bytes', async () => {
    for (const [format, extra] of [['gexf', ['--time', 'date']], ['graphml', []], ['dot', []]] as const) {
      const out = join(dir, `h.${format}`);
      const r = await runMain(['export', history, '--format', format, ...extra, '-o', out]);
      expect(r.code, r.stderr).toBe(0);
      const first = readFileSync(out, 'utf8');
      await runMain(['export', history, '--format', format, ...extra, '-o', out]);
      expect(readFileSync(out, 'utf8')).toBe(first);
    }
    expect(readFileSync(join(dir, 'h.gexf'), 'utf8')).toBe(gexfFile(doc, analysis, 'date'));
  });

  test('a bad --time is a usage error', async () => {
    const r = await runMain(['export', history, '--format', 'gexf', '--time', 'weeks', '-o', join(dir, 'x.gexf')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--time/);
  });
});

test('packages/core/schema/graph-fields.json, the codebook source, is what the writers write (regenerate with node scripts/make-schema.mjs)', async () => {
  const { createRequire } = await import('node:module');
  const { graphFieldsDocument, NODE_ATTRIBUTES, EDGE_ATTRIBUTES } = await import('@schema-strata/core');
  const file = createRequire(import.meta.url).resolve('@schema-strata/core/package.json').replace(/package\.json$/, 'schema/graph-fields.json');
  expect(JSON.parse(readFileSync(file, 'utf8'))).toEqual(graphFieldsDocument());
  // every attribute the tests above compare is documented, and nothing else is written
  expect(NODE_ATTRIBUTES.map((a) => a.name)).toEqual(expect.arrayContaining(Object.keys(expectedNode(nodes.find((t) => t.removal !== null && t.updatesPerYear !== null)!))));
  expect(EDGE_ATTRIBUTES.map((a) => a.name)).toEqual(['columns', 'referenced_columns', 'enforcement', 'versions', 'self_reference', 'alive']);
});
