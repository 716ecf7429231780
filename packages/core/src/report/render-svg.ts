import type { TopLevelSpec, compile as CompileFn } from 'vega-lite';

type LoggerInterface = NonNullable<NonNullable<Parameters<typeof CompileFn>[1]>['logger']>;

// Vega and Vega-Lite are loaded when the first chart is rendered, not when the CLI starts
// (together they take about half a second to load).
let libs: Promise<[typeof import('vega'), typeof import('vega-lite')]> | null = null;
const loadLibs = (): Promise<[typeof import('vega'), typeof import('vega-lite')]> =>
  (libs ??= Promise.all([import('vega'), import('vega-lite')]));
import { CHART_CONFIG } from './charts/theme.js';

/**
 * Render a Vega-Lite specification to an SVG string in Node: compiled to Vega, run by a headless
 * `View` (no canvas, no network: every chart carries its data inline) and serialised by
 * `toSVG()`. The element ids Vega numbers from a process-wide counter (clip paths, gradients) are
 * renamed `<prefix>-1`, `<prefix>-2`, ... in order of appearance, so that the output depends on
 * the chart alone and ids stay unique among the charts of one page.
 */
export async function renderSvg(spec: TopLevelSpec, prefix: string, warnings: string[] = []): Promise<string> {
  const [vega, vegaLite] = await loadLibs();
  const logger = collectingLogger(warnings);
  const compiled = vegaLite.compile(spec, { config: CHART_CONFIG, logger }).spec;
  const view = new vega.View(vega.parse(compiled), { renderer: 'none', logLevel: vega.Error });
  try {
    return scopeIds(await view.toSVG(), prefix);
  } finally {
    view.finalize();
  }
}

/** A logger for Vega-Lite's compiler that keeps its warnings (the tests check there are none) instead of printing them. */
function collectingLogger(warnings: string[]): LoggerInterface {
  let level = 0;
  const self: LoggerInterface = {
    level(l?: number) {
      if (l === undefined) return level as never;
      level = l;
      return self as never;
    },
    error: (...args: readonly unknown[]) => {
      throw new Error(args.map(String).join(' '));
    },
    warn: (...args: readonly unknown[]) => {
      warnings.push(args.map(String).join(' '));
      return self;
    },
    info: () => self,
    debug: () => self,
  } as LoggerInterface;
  return self;
}

/** Rename every `id` of an SVG string, with its `url(#...)` and `href="#..."` references. */
export function scopeIds(svg: string, prefix: string): string {
  const ids = new Map<string, string>();
  for (const m of svg.matchAll(/\sid="([^"]+)"/g)) if (!ids.has(m[1]!)) ids.set(m[1]!, `${prefix}-${ids.size + 1}`);
  if (ids.size === 0) return svg;
  return svg
    .replace(/(\sid=")([^"]+)(")/g, (all, a: string, id: string, b: string) => (ids.has(id) ? `${a}${ids.get(id)}${b}` : all))
    .replace(/url\(#([^)]+)\)/g, (all, id: string) => (ids.has(id) ? `url(#${ids.get(id)})` : all))
    .replace(/(href=")#([^"]+)(")/g, (all, a: string, id: string, b: string) => (ids.has(id) ? `${a}#${ids.get(id)}${b}` : all));
}
