import type { Config } from 'vega-lite';
import { FONT_STACK, INK, MUTED_INK, RULE } from '../palette.js';

/** The Vega-Lite configuration every chart of the report shares: our type, inks and rules; no ARIA labels unless a mark asks for them. */
export const CHART_CONFIG: Config = {
  background: null as unknown as string,
  font: FONT_STACK,
  aria: false,
  padding: 6,
  view: { stroke: null },
  axis: {
    labelColor: MUTED_INK,
    titleColor: INK,
    domainColor: RULE,
    tickColor: RULE,
    gridColor: '#ebe8df',
    labelFontSize: 11,
    titleFontSize: 12,
    titleFontWeight: 600,
  },
  legend: { labelColor: INK, titleColor: INK, labelFontSize: 11, titleFontSize: 12, titleFontWeight: 600 },
  header: { labelColor: INK, titleColor: INK, labelFontSize: 12, titleFontSize: 12, labelFontWeight: 600 },
  title: { color: INK, fontSize: 13, fontWeight: 600, anchor: 'start' },
};
