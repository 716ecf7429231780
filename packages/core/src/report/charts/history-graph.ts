import type { TopLevelSpec } from 'vega-lite';
import { TOPOLOGY_CLASSES } from '../../analysis/graph/topology-class.js';
import { CLASS_COLOURS, EDGE_COLOUR, INK } from '../palette.js';
import type { Placed } from '../graph-layout.js';
import type { GraphLink, GraphNode } from '../report-data.js';

/** How many nodes get a permanent label: the ones with the most counted updates (then the most neighbours). */
export function labelledCount(nodes: number): number {
  return Math.min(nodes, Math.max(10, Math.round(nodes / 7)));
}

/** Nodes by counted updates, then by neighbours, then by id. */
function rankNodes(nodes: readonly GraphNode[]): GraphNode[] {
  return [...nodes].sort(
    (a, b) => b.countedUpdates - a.countedUpdates || b.inDegree + b.outDegree - (a.inDegree + a.outDegree) || (a.id < b.id ? -1 : 1),
  );
}

/** The ids of the nodes that carry a permanent label (in a small graph every node; else only changed ones). */
export function labelledNodes(nodes: readonly GraphNode[]): Set<string> {
  const top = rankNodes(nodes).slice(0, labelledCount(nodes.length));
  return new Set(top.filter((n) => n.countedUpdates > 0 || nodes.length <= 40).map((n) => n.id));
}

const MIN_AREA = 48;
const MAX_AREA = 700;

/** What a node says on hover. */
export function nodeDescription(n: GraphNode): string {
  const self = n.selfReferences > 0 ? `, ${n.selfReferences} self-reference${n.selfReferences === 1 ? '' : 's'}` : '';
  const gone = n.alive ? '' : ', removed';
  return `${n.label}: ${n.category}, ${n.countedUpdates} counted update${n.countedUpdates === 1 ? '' : 's'}, references ${n.outDegree}, referenced by ${n.inDegree}${self}${gone}`;
}

/**
 * The history graph: every table in the measures as a point placed by ForceAtlas2 (`layoutGraph`),
 * coloured by topology class and sized (by area) by counted updates; every pair of tables joined
 * by foreign keys as a line that narrows from the referencing table to the referenced one.
 * Removed tables and foreign keys are drawn faint. The largest nodes carry their names; every
 * node says its name and measures on hover.
 */
export function historyGraphSpec(nodes: readonly GraphNode[], links: readonly GraphLink[], at: ReadonlyMap<string, Placed>): TopLevelSpec {
  const maxUpdates = Math.max(1, ...nodes.map((n) => n.countedUpdates));
  const area = (u: number): number => MIN_AREA + (MAX_AREA - MIN_AREA) * Math.sqrt(u / maxUpdates);
  const ranked = rankNodes(nodes);
  const labelled = labelledNodes(nodes);
  const nodeValues = [...nodes]
    .sort((a, b) => a.countedUpdates - b.countedUpdates || (a.id < b.id ? -1 : 1))
    .map((n) => {
      const p = at.get(n.id)!;
      return {
        id: n.id,
        x: p.x,
        y: p.y,
        category: n.category,
        area: Math.round(area(n.countedUpdates) * 10) / 10,
        opacity: n.alive ? 0.95 : 0.4,
        description: nodeDescription(n),
      };
    });
  const labelValues = ranked
    .filter((n) => labelled.has(n.id))
    .map((n) => {
      const p = at.get(n.id)!;
      return { label: n.label, x: p.x, y: p.y, dx: Math.round((Math.sqrt(area(n.countedUpdates) / Math.PI) + 3) * 10) / 10 };
    });
  const linkValues = links.flatMap((l, i) => {
    const s = at.get(l.source);
    const t = at.get(l.target);
    if (!s || !t) return [];
    const w = Math.min(6, 3 + 0.8 * (l.foreignKeys - 1));
    const o = l.alive ? 0.55 : 0.2;
    return [
      { link: i, end: 0, x: s.x, y: s.y, w, o },
      { link: i, end: 1, x: t.x, y: t.y, w: 0.5, o },
    ];
  });
  const xs = nodeValues.map((n) => n.x);
  const ys = nodeValues.map((n) => n.y);
  const span = (v: number[]) => (v.length ? [Math.min(...v), Math.max(...v)] : [0, 1]);
  const [x0, x1] = span(xs);
  const [y0, y1] = span(ys);
  const pad = 40;
  const width = 760;
  const height = Math.round(Math.max(320, Math.min(900, (width * (y1! - y0! + 2 * pad)) / (x1! - x0! + 2 * pad || 1))));
  const x = { field: 'x', type: 'quantitative' as const, axis: null, scale: { domain: [x0! - pad, x1! + pad], nice: false, zero: false } };
  const y = { field: 'y', type: 'quantitative' as const, axis: null, scale: { domain: [y0! - pad, y1! + pad], nice: false, zero: false } };
  return {
    width,
    height,
    layer: [
      {
        name: 'graph_edges',
        data: { values: linkValues },
        mark: { type: 'trail', color: EDGE_COLOUR },
        encoding: {
          x, y,
          detail: { field: 'link', type: 'nominal' },
          order: { field: 'end', type: 'quantitative' },
          size: { field: 'w', type: 'quantitative', scale: null, legend: null },
          opacity: { field: 'o', type: 'quantitative', scale: null, legend: null },
        },
      },
      {
        name: 'graph_nodes',
        data: { values: nodeValues },
        mark: { type: 'circle', stroke: '#ffffff', strokeWidth: 1, aria: true },
        encoding: {
          x, y,
          size: { field: 'area', type: 'quantitative', scale: null, legend: null },
          color: {
            field: 'category',
            type: 'nominal',
            title: 'topology class',
            scale: { domain: [...TOPOLOGY_CLASSES], range: TOPOLOGY_CLASSES.map((c) => CLASS_COLOURS[c]) },
            legend: { orient: 'top', direction: 'horizontal', symbolOpacity: 1 },
          },
          opacity: { field: 'opacity', type: 'quantitative', scale: null, legend: null },
          description: { field: 'description', type: 'nominal' },
        },
      },
      {
        name: 'graph_labels',
        data: { values: labelValues },
        mark: { type: 'text', align: 'left', baseline: 'middle', fontSize: 11, fontWeight: 600, color: INK, stroke: '#fbfaf7', strokeWidth: 3, strokeOpacity: 0.85, dx: { expr: 'datum.dx' } },
        encoding: { x, y, text: { field: 'label', type: 'nominal' } },
      },
    ],
  } as unknown as TopLevelSpec;
}
