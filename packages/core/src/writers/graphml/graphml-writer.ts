import type { Analysis } from '../../analysis/types.js';
import type { InterchangeDocument } from '../../interchange/document.js';
import { EDGE_ATTRIBUTES, graphRecords, NODE_ATTRIBUTES, type GraphAttribute } from '../graph/records.js';
import { xmlDocument, xmlValue } from '../graph/xml.js';

const GRAPHML_TYPES = { string: 'string', integer: 'int', double: 'double', boolean: 'boolean' } as const;

/**
 * The GraphML file of the history graph: one node per table in the measures, one directed edge
 * per foreign key, every measure as a `data` value of a declared key (`node_<name>` and
 * `edge_<name>` ids, the attribute's name as `attr.name`); lifetimes as the `spells` and
 * `versions` text attributes (GraphML has no time). Values that do not apply are left out.
 */
export function graphmlFile(doc: InterchangeDocument, analysis: Analysis): string {
  const { nodes, edges } = graphRecords(analysis);
  const keys = (owner: 'node' | 'edge', list: readonly GraphAttribute<never>[]) =>
    list.map((a) => ({ '@_id': `${owner}_${a.name}`, '@_for': owner, '@_attr.name': a.name, '@_attr.type': GRAPHML_TYPES[a.type] }));
  const data = <T>(owner: 'node' | 'edge', list: readonly GraphAttribute<T>[], t: T) =>
    list.flatMap((a) => {
      const v = a.value(t);
      return v === undefined || v === null ? [] : [{ '@_key': `${owner}_${a.name}`, '#text': xmlValue(v) }];
    });
  return xmlDocument({
    graphml: {
      '@_xmlns': 'http://graphml.graphdrawing.org/xmlns',
      key: [
        { '@_id': 'node_label', '@_for': 'node', '@_attr.name': 'label', '@_attr.type': 'string' },
        ...keys('node', NODE_ATTRIBUTES as readonly GraphAttribute<never>[]),
        ...keys('edge', EDGE_ATTRIBUTES as readonly GraphAttribute<never>[]),
      ],
      graph: {
        '@_id': 'history',
        '@_edgedefault': 'directed',
        desc: `History graph of ${doc.source.repository} at ${doc.source.ref} (${doc.source.head}), written by ${doc.generator.name} ${doc.generator.version}`,
        node: nodes.map((t) => ({
          '@_id': t.id,
          data: [{ '@_key': 'node_label', '#text': t.namespace ? `${t.namespace}.${t.name}` : t.name }, ...data('node', NODE_ATTRIBUTES, t)],
        })),
        edge: edges.map((e) => ({ '@_id': e.key, '@_source': e.source, '@_target': e.target, data: data('edge', EDGE_ATTRIBUTES, e) })),
      },
    },
  });
}
