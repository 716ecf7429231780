export { buildReport, renderReport, type ReportOptions } from './build-report.js';
export { reportData, type ReportData, type LifetimeRow, type GraphNode, type GraphLink, type Headline, type Coverage } from './report-data.js';
export { layoutGraph, layoutIterations, type Placed } from './graph-layout.js';
export { renderSvg, scopeIds } from './render-svg.js';
export { CLASS_COLOURS, HEAT_SCALE } from './palette.js';
