import type { Analysis } from '../analysis/types.js';
import type { InterchangeDocument } from '../interchange/document.js';
import { growthSpec } from './charts/growth.js';
import { heatMapSpec } from './charts/heat-map.js';
import { historyGraphSpec, labelledNodes } from './charts/history-graph.js';
import { lifetimeSpec } from './charts/lifetime.js';
import { layoutGraph } from './graph-layout.js';
import { pageHtml } from './page.js';
import { renderSvg } from './render-svg.js';
import { reportData, type ReportData } from './report-data.js';

export interface ReportOptions {
  /** Rows of the most-changed table (default 15). */
  topChanged?: number;
  /** The page's title (default: the last part of the repository path). */
  title?: string;
}

/**
 * The HTML report of an analysed history: one self-contained file (inline style, SVG charts
 * rendered here from Vega-Lite specifications, a few lines of inline script for hover labels),
 * which loads nothing and reads the same offline, on screen and in print. Deterministic: the
 * same document and analysis give the same bytes.
 *
 * @example
 * const doc = readHistoryFile('history.json');
 * const analysis = analyzeTimeline(timelineOf(doc));
 * writeFileAtomic('report.html', await buildReport(doc, analysis));
 */
export async function buildReport(doc: InterchangeDocument, analysis: Analysis, options: ReportOptions = {}): Promise<string> {
  const data = reportData(doc, analysis, options);
  return renderReport(data);
}

/** The page of prepared report data. */
export async function renderReport(data: ReportData): Promise<string> {
  const positions = layoutGraph(data.graph.nodes, data.graph.links);
  const heatMaps: Record<string, string> = {};
  for (const c of data.contingency) heatMaps[c.id] = await renderSvg(heatMapSpec(c.analysis.table), c.id);
  return pageHtml(data, {
    growth: await renderSvg(growthSpec(data.growth), 'growth'),
    lifetimes: await renderSvg(lifetimeSpec(data.lifetimes, data.lastVersion), 'lifetimes'),
    graph: await renderSvg(historyGraphSpec(data.graph.nodes, data.graph.links, positions), 'graph'),
    heatMaps,
    graphLabels: labelledNodes(data.graph.nodes).size,
  });
}
