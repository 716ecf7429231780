import type { TopLevelSpec } from 'vega-lite';
import { INK } from '../palette.js';
import type { GrowthPoint } from '../report-data.js';

const MEASURES = [
  { key: 'tables', label: 'tables', colour: '#2b6fb3' },
  { key: 'columns', label: 'columns', colour: '#2d7f86' },
  { key: 'foreignKeys', label: 'foreign keys', colour: '#e08a2e' },
] as const;

/**
 * The growth curve: tables, columns and foreign keys at every version, over versions (left) and
 * over committer time (right), one row per measure with its own scale. Lines are steps: a value
 * holds until the next version that changes it.
 */
export function growthSpec(points: readonly GrowthPoint[]): TopLevelSpec {
  const values = points.flatMap((p) => MEASURES.map((m) => ({ measure: m.label, version: p.version, time: p.time, value: p[m.key] })));
  const panel = (x: 'version' | 'time') => ({
    width: 400,
    height: 92,
    mark: { type: 'line' as const, interpolate: 'step-after' as const, strokeWidth: 1.8, clip: true },
    encoding: {
      x:
        x === 'version'
          ? { field: 'version', type: 'quantitative' as const, title: 'version', axis: { tickMinStep: 1, format: 'd' } }
          : { field: 'time', type: 'temporal' as const, title: 'committer date (UTC)', scale: { type: 'utc' as const }, axis: { labelOverlap: true, format: '%Y-%m' } },
      y: { field: 'value', type: 'quantitative' as const, title: null, axis: { tickCount: 4, format: 'd', minExtent: 34 } },
      color: {
        field: 'measure',
        type: 'nominal' as const,
        scale: { domain: MEASURES.map((m) => m.label), range: MEASURES.map((m) => m.colour) },
        legend: null,
      },
      row: {
        field: 'measure',
        type: 'nominal' as const,
        sort: MEASURES.map((m) => m.label),
        title: null,
        header: { labelAngle: 0, labelAlign: 'left' as const, labelAnchor: 'start' as const, labelOrient: 'top' as const, labelColor: INK },
      },
    },
    resolve: { scale: { y: 'independent' as const } },
  });
  return {
    data: { values },
    hconcat: [
      { title: 'over versions', ...panel('version') },
      { title: 'over time', ...panel('time') },
    ],
    spacing: 28,
  } as TopLevelSpec;
}
