import { createRequire } from 'node:module';
import { UndirectedGraph } from 'graphology';
import type { GraphLink, GraphNode } from './report-data.js';

export interface Placed {
  x: number;
  y: number;
}

/** The package is CommonJS (`module.exports = layout`), which its type declarations describe as a default export. */
const forceAtlas2 = createRequire(import.meta.url)('graphology-layout-forceatlas2') as (typeof import('graphology-layout-forceatlas2'))['default'];

/** Above this many nodes the layout uses the Barnes-Hut approximation of the repulsion. */
const BARNES_HUT_ABOVE = 300;

/** Iterations of the layout: enough for a few hundred nodes to settle, fewer for large graphs. */
export function layoutIterations(nodes: number): number {
  if (nodes <= 200) return 600;
  if (nodes <= 1000) return 300;
  return 150;
}

/**
 * Positions of the history graph's nodes by ForceAtlas2 (graphology-layout-forceatlas2), taken as
 * an undirected graph weighted by the number of foreign keys between two tables. Deterministic:
 * the initial positions are a sunflower spiral in the order of the node ids, the number of
 * iterations is fixed, and nothing random is used, so the same graph gives the same positions.
 * Positions are rounded to 0.01 and scaled to [0, 1000] on their longer side.
 */
export function layoutGraph(nodes: readonly GraphNode[], links: readonly GraphLink[]): Map<string, Placed> {
  const g = new UndirectedGraph<{ x: number; y: number; size: number }, { weight: number }>({ allowSelfLoops: false });
  const ids = nodes.map((n) => n.id).sort();
  const golden = Math.PI * (3 - Math.sqrt(5));
  ids.forEach((id, i) => {
    const r = 10 * Math.sqrt(i + 0.5);
    g.addNode(id, { x: r * Math.cos(i * golden), y: r * Math.sin(i * golden), size: 1 });
  });
  for (const l of links) {
    if (!g.hasNode(l.source) || !g.hasNode(l.target)) continue;
    const w = g.hasEdge(l.source, l.target) ? g.getEdgeAttribute(l.source, l.target, 'weight') : 0;
    g.mergeEdge(l.source, l.target, { weight: w + l.foreignKeys });
  }
  const out = new Map<string, Placed>();
  if (g.order === 0) return out;
  if (g.order > 1) {
    const settings = {
      ...forceAtlas2.inferSettings(g),
      gravity: 1,
      scalingRatio: 4,
      linLogMode: false,
      outboundAttractionDistribution: true,
      barnesHutOptimize: g.order > BARNES_HUT_ABOVE,
    };
    forceAtlas2.assign(g, { iterations: layoutIterations(g.order), settings, getEdgeWeight: 'weight' });
  }
  let minX = Infinity;
  let minY = Infinity;
  let maxX = -Infinity;
  let maxY = -Infinity;
  g.forEachNode((_, a) => {
    minX = Math.min(minX, a.x);
    maxX = Math.max(maxX, a.x);
    minY = Math.min(minY, a.y);
    maxY = Math.max(maxY, a.y);
  });
  const span = Math.max(maxX - minX, maxY - minY) || 1;
  const round = (v: number): number => Math.round(v * 100) / 100;
  g.forEachNode((id, a) => {
    out.set(id, { x: round((1000 * ((a.x) - minX)) / span), y: round((1000 * ((a.y) - minY)) / span) });
  });
  return out;
}
