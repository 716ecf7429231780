import type { TopLevelSpec } from 'vega-lite';
import type { ContingencyTable } from '../../analysis/stats/contingency.js';
import { HEAT_LIGHT_TEXT_ABOVE, HEAT_SCALE, INK } from '../palette.js';

/** The text of a percentage in a cell. */
export function percentText(p: number | null): string {
  if (p === null) return '–';
  return `${p >= 10 || p === 0 ? Math.round(p) : p.toFixed(1)}%`;
}

/**
 * A contingency table as a heat map: one cell per (row, column), its colour the cell's share of
 * its row (one sequential hue, pale to deep), its count and that share written in it.
 */
export function heatMapSpec(t: ContingencyTable): TopLevelSpec {
  const cells = t.rows.flatMap((r, i) =>
    t.columns.map((c, j) => ({
      row: r,
      column: c,
      count: t.counts[i]![j]!,
      share: t.rowPercent[i]![j] ?? 0,
      shareText: `${percentText(t.rowPercent[i]![j] ?? null)} of row`,
      light: (t.rowPercent[i]![j] ?? 0) / 100 > HEAT_LIGHT_TEXT_ABOVE,
    })),
  );
  const x = { field: 'column', type: 'nominal' as const, sort: t.columns, title: t.columnVariable, axis: { orient: 'top' as const, labelAngle: 0, domain: false, ticks: false, labelPadding: 6 } };
  const y = { field: 'row', type: 'nominal' as const, sort: t.rows, title: t.rowVariable, axis: { domain: false, ticks: false, labelPadding: 6 } };
  const textColour = { condition: { test: 'datum.light', value: '#ffffff' }, value: INK };
  return {
    data: { values: cells },
    width: { step: 104 },
    height: { step: 50 },
    encoding: { x, y },
    layer: [
      {
        name: 'heat_cells',
        mark: { type: 'rect', stroke: '#ffffff', strokeWidth: 2 },
        encoding: {
          color: {
            field: 'share',
            type: 'quantitative',
            title: '% of row',
            scale: { domain: [0, 100], range: HEAT_SCALE, interpolate: 'rgb' },
            legend: { orient: 'right', gradientLength: 120, format: 'd' },
          },
        },
      },
      {
        name: 'heat_counts',
        mark: { type: 'text', fontSize: 15, fontWeight: 700, dy: -7 },
        encoding: { text: { field: 'count', type: 'quantitative' }, color: textColour },
      },
      {
        name: 'heat_shares',
        mark: { type: 'text', fontSize: 10.5, dy: 10 },
        encoding: { text: { field: 'shareText', type: 'nominal' }, color: textColour },
      },
    ],
  } as unknown as TopLevelSpec;
}
