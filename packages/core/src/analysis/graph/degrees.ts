import type { MultiDirectedGraph } from 'graphology';

/** A neighbour of a table in the history graph, with the number of foreign keys between them. */
export interface Neighbour {
  table: string;
  foreignKeys: number;
}

export interface Degrees {
  /** Distinct other tables that reference this one. */
  inDegree: number;
  /** Distinct other tables this one references. */
  outDegree: number;
  /** Foreign keys of the table to itself (reported, not counted in the degrees). */
  selfReferences: number;
  /** Tables this one references, each with its number of (parallel) foreign keys. */
  references: Neighbour[];
  /** Tables that reference this one, each with its number of foreign keys. */
  referencedBy: Neighbour[];
}

/**
 * Degrees of a node of a multigraph, as design.md defines them: distinct other tables, over
 * every edge that ever existed; several foreign keys between one pair count once (their number
 * is kept); self-references are reported, not counted.
 */
export function degreesOf(graph: MultiDirectedGraph, node: string): Degrees {
  const references = graph
    .outNeighbors(node)
    .filter((n) => n !== node)
    .sort()
    .map((n) => ({ table: n, foreignKeys: graph.outEdges(node, n).length }));
  const referencedBy = graph
    .inNeighbors(node)
    .filter((n) => n !== node)
    .sort()
    .map((n) => ({ table: n, foreignKeys: graph.outEdges(n, node).length }));
  return {
    inDegree: referencedBy.length,
    outDegree: references.length,
    selfReferences: graph.hasEdge(node, node) ? graph.outEdges(node, node).length : 0,
    references,
    referencedBy,
  };
}
