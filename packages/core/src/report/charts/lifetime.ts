import type { TopLevelSpec } from 'vega-lite';
import { TOPOLOGY_CLASSES } from '../../analysis/graph/topology-class.js';
import { CLASS_COLOURS, LEFT_OUT, LEFT_OUT_COLOUR, UPDATE_MARK } from '../palette.js';
import type { LifetimeRow } from '../report-data.js';

/** Category order and colours of the class legends. */
export const CATEGORY_DOMAIN = [...TOPOLOGY_CLASSES, LEFT_OUT];
export const CATEGORY_RANGE = [...TOPOLOGY_CLASSES.map((c) => CLASS_COLOURS[c]), LEFT_OUT_COLOUR];

/** The name shown on a row: the table's label, with its id when another row has the same label. */
export function rowNames(rows: readonly LifetimeRow[]): string[] {
  const seen = new Map<string, number>();
  for (const r of rows) seen.set(r.label, (seen.get(r.label) ?? 0) + 1);
  return rows.map((r) => (seen.get(r.label)! > 1 ? `${r.label} (${r.id})` : r.label));
}

/**
 * The lifetime chart: one row per table that ever existed, ordered by birth, a bar for every
 * spell of its life (from its birth version to its removal, or to the last version), coloured
 * by topology class, with a tick at every version that brought it counted updates.
 */
export function lifetimeSpec(rows: readonly LifetimeRow[], lastVersion: number): TopLevelSpec {
  const names = rowNames(rows);
  const spans = rows.flatMap((r, i) => r.spans.map((s) => ({ row: names[i], from: s.from, to: s.to, category: r.category })));
  const ticks = rows.flatMap((r, i) => r.updates.map((u) => ({ row: names[i], at: u.version + 0.5, count: u.count })));
  const leftOut = rows.some((r) => r.category === LEFT_OUT);
  const domain = leftOut ? CATEGORY_DOMAIN : CATEGORY_DOMAIN.slice(0, -1);
  const range = leftOut ? CATEGORY_RANGE : CATEGORY_RANGE.slice(0, -1);
  const step = rows.length > 80 ? 7 : rows.length > 40 ? 10 : 14;
  const y = {
    field: 'row',
    type: 'nominal' as const,
    sort: names,
    title: null,
    scale: { domain: names, paddingInner: 0.25, paddingOuter: 0.2 },
    axis: { labelFontSize: Math.min(11, step), labelOverlap: false, ticks: false, domain: false, labelLimit: 220 },
  };
  const x = { type: 'quantitative' as const, scale: { domain: [0, lastVersion + 1], nice: false, zero: true } };
  return {
    width: 760,
    height: { step },
    layer: [
      {
        name: 'lifetime_spans',
        data: { values: spans },
        mark: { type: 'bar', cornerRadius: 1 },
        encoding: {
          y,
          x: { ...x, field: 'from', title: 'version', axis: { format: 'd', tickMinStep: 1, orient: 'top', grid: true } },
          x2: { field: 'to' },
          color: {
            field: 'category',
            type: 'nominal',
            title: 'topology class',
            scale: { domain, range },
            legend: { orient: 'top', direction: 'horizontal' },
          },
        },
      },
      {
        name: 'lifetime_updates',
        data: { values: ticks },
        mark: { type: 'tick', orient: 'vertical', thickness: 1.4, size: Math.max(4, step - 1), color: UPDATE_MARK, opacity: 0.85 },
        encoding: { y, x: { ...x, field: 'at' } },
      },
    ],
  } as TopLevelSpec;
}
