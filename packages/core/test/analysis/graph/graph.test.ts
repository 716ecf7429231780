import { describe, expect, it } from 'vitest';
import { MultiDirectedGraph } from 'graphology';
import { degreesOf } from '../../../src/analysis/graph/degrees.js';
import { topologyClassOf } from '../../../src/analysis/graph/topology-class.js';
import { classChangesOf } from '../../../src/analysis/graph/version-classes.js';

describe('degrees in a multigraph', () => {
  it('count distinct other tables; parallel edges once with their number kept; self-loops reported, not counted', () => {
    const g = new MultiDirectedGraph({ allowSelfLoops: true });
    for (const n of ['loans', 'members', 'categories']) g.addNode(n);
    g.addEdgeWithKey('a', 'loans', 'members');
    g.addEdgeWithKey('b', 'loans', 'members');
    g.addEdgeWithKey('c', 'categories', 'categories');
    g.addEdgeWithKey('d', 'categories', 'categories');
    expect(degreesOf(g, 'loans')).toEqual({ inDegree: 0, outDegree: 1, selfReferences: 0, references: [{ table: 'members', foreignKeys: 2 }], referencedBy: [] });
    expect(degreesOf(g, 'members')).toMatchObject({ inDegree: 1, outDegree: 0, referencedBy: [{ table: 'loans', foreignKeys: 2 }] });
    expect(degreesOf(g, 'categories')).toMatchObject({ inDegree: 0, outDegree: 0, selfReferences: 2 });
  });
  it('classes', () => {
    expect([topologyClassOf(0, 0), topologyClassOf(0, 2), topologyClassOf(3, 0), topologyClassOf(1, 1)]).toEqual(['isolated', 'source', 'sink', 'intermediate']);
  });
  it('class changes count within a spell only', () => {
    expect(classChangesOf([{ from: 0, to: 2, class: 'sink' }, { from: 3, to: 5, class: 'isolated' }, { from: 8, to: 9, class: 'sink' }])).toBe(1);
  });
});
