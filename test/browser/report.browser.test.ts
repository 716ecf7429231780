import { existsSync, mkdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import type { Analysis, InterchangeDocument } from '@schema-strata/core';
import { ROOT, runMain, tempDir } from '../helpers/repo.js';

// The report of the demo, opened in Debian's Chromium (headless, through playwright-core) as a
// reader would open it: from the file system, with the network cut off. scripts/ensure-system-deps.sh
// installs chromium when /usr/bin/chromium is missing; this test fails, never skips, without it.
const CHROMIUM = '/usr/bin/chromium';
const SCREENSHOT = join(ROOT, 'docs', 'report-screenshot.png');

const { dir, cleanup } = tempDir('strata-browser-');
let context: BrowserContext;
let page: Page;
let doc: InterchangeDocument;
let analysis: Analysis;
let pageUrl: string;
/** Requests the context's router saw, and requests the page reported: both must be the page alone. */
const routed: string[] = [];
const requested: string[] = [];
const consoleErrors: string[] = [];

beforeAll(async () => {
  expect(existsSync(CHROMIUM), `${CHROMIUM} is missing: run scripts/ensure-system-deps.sh (it installs Debian's chromium)`).toBe(true);
  // a fixed directory, so that the page (which names the repository) and its screenshot are the same at every run
  const demo = join(tmpdir(), 'schema-strata-report-demo');
  rmSync(demo, { recursive: true, force: true });
  const r = await runMain(['demo', demo, '--quiet']);
  expect(r.code, r.stderr).toBe(0);
  doc = JSON.parse(readFileSync(join(demo, 'history.json'), 'utf8')) as InterchangeDocument;
  analysis = doc.analysis as Analysis;
  const report = join(demo, 'report.html');
  pageUrl = pathToFileURL(report).href;
  context = await chromium.launchPersistentContext(join(dir, 'profile'), {
    executablePath: CHROMIUM,
    headless: true,
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'],
    viewport: { width: 1280, height: 900 },
    deviceScaleFactor: 1,
  });
  // every request of the page is seen here; only the page itself may load
  await context.route('**/*', (route) => {
    const url = route.request().url();
    routed.push(url);
    return url === pageUrl ? route.continue() : route.abort();
  });
  page = context.pages()[0] ?? (await context.newPage());
  page.on('request', (req) => requested.push(req.url()));
  page.on('console', (m) => {
    if (m.type() === 'error') consoleErrors.push(m.text());
  });
  page.on('pageerror', (e) => consoleErrors.push(String(e)));
  await page.goto(pageUrl, { waitUntil: 'load' });
}, 180_000);

afterAll(async () => {
  await context?.close();
  cleanup();
});

describe('the demo report in Chromium', () => {
  test('every chart is an SVG of non-zero size', async () => {
    const sizes = await page.$$eval('figure.chart > svg', (svgs) => svgs.map((s) => {
      const r = s.getBoundingClientRect();
      return { w: r.width, h: r.height, parent: s.closest('section')?.id ?? '' };
    }));
    // growth, lifetimes, graph, two heat maps
    expect(sizes.map((s) => s.parent)).toEqual(['growth', 'lifetimes', 'graph', 'topology-and-change', 'topology-and-change']);
    for (const s of sizes) {
      expect(s.w, s.parent).toBeGreaterThan(100);
      expect(s.h, s.parent).toBeGreaterThan(100);
    }
  });

  test('growth: a line for tables, columns and foreign keys, over versions and over time', async () => {
    const lines = await page.$$eval('#growth .mark-line path', (ps) => ps.map((p) => p.getBoundingClientRect().width));
    expect(lines).toHaveLength(6);
    for (const w of lines) expect(w).toBeGreaterThan(50);
  });

  test('lifetimes: one row per table, named in order of birth, with a bar per spell', async () => {
    const rows = await page.$$eval('#lifetimes .lifetime_spans_marks path', (ps) => ps.map((p) => {
      const r = p.getBoundingClientRect();
      return { y: Math.round(r.y + r.height / 2), w: r.width };
    }));
    const spells = analysis.tables.reduce((n, t) => n + t.spells.length, 0);
    expect(rows).toHaveLength(spells);
    expect(new Set(rows.map((r) => r.y)).size).toBe(analysis.tables.length);
    for (const r of rows) expect(r.w).toBeGreaterThan(0);
    const labels = await page.$$eval('#lifetimes .role-axis-label text', (ts) => ts.map((t) => t.textContent ?? ''));
    const byBirth = [...analysis.tables].sort((a, b) => a.birth.version - b.birth.version || (a.id < b.id ? -1 : 1)).map((t) => t.name);
    expect(labels.filter((l) => byBirth.includes(l))).toEqual(byBirth);
    const ticks = await page.$$eval('#lifetimes .lifetime_updates_marks path', (ps) => ps.length);
    const updateVersions = new Set(doc.changes.filter((c) => analysis.options.count.includes(c.kind)).map((c) => `${c.table}@${c.version}`));
    expect(ticks).toBe(updateVersions.size);
  });

  test("heat maps: every cell holds the analysis's count and share of its row", async () => {
    for (const [id, c] of [['class-by-birth-group', analysis.statistics.classByBirthGroup], ['class-by-activity-band', analysis.statistics.classByActivityBand]] as const) {
      const counts = await page.$$eval(`#${id} .heat_counts_marks text`, (ts) => ts.map((t) => t.textContent));
      expect(counts, id).toEqual(c.table.counts.flat().map(String));
      const shares = await page.$$eval(`#${id} .heat_shares_marks text`, (ts) => ts.map((t) => t.textContent));
      expect(shares, id).toEqual(c.table.rowPercent.flat().map((p) => `${p === null ? '–' : p >= 10 || p === 0 ? Math.round(p) : p.toFixed(1)}% of row`));
      const cells = await page.$$eval(`#${id} .heat_cells_marks path`, (ps) => ps.map((p) => p.getBoundingClientRect().width));
      expect(cells).toHaveLength(c.table.rows.length * c.table.columns.length);
      const text = await page.textContent(`#${id}`);
      for (const r of c.reading) expect(text).toContain(r);
    }
    expect(await page.textContent('#topology-and-change .caution')).toBe(analysis.statistics.caution);
  });

  test('the history graph: one point per table in the measures, the most changed named, every name on hover', async () => {
    const points = page.locator('#graph .graph_nodes_marks path');
    expect(await points.count()).toBe(analysis.graph.nodes);
    const labels = await page.$$eval('#graph .graph_labels_marks text', (ts) => ts.map((t) => t.textContent ?? ''));
    const mostChanged = [...analysis.tables].sort((a, b) => b.countedUpdates - a.countedUpdates)[0]!;
    expect(labels).toContain(mostChanged.name);
    // hover over an unlabelled point: the tip names it
    const described = await points.evaluateAll((ps) => ps.map((p) => p.getAttribute('aria-label') ?? ''));
    const i = described.findIndex((d) => !labels.some((l) => d.startsWith(`${l}:`)));
    expect(i).toBeGreaterThanOrEqual(0);
    // Playwright scrolls the point into view and fails if another element would take the pointer
    await points.nth(i).hover();
    await expect.poll(() => page.textContent('.tip')).toBe(described[i]);
    expect(await page.isVisible('.tip')).toBe(true);
    const name = described[i]!.split(':')[0]!;
    expect(analysis.tables.some((t) => t.name === name)).toBe(true);
    await page.mouse.move(2, 2);
  });

  test('headline figures and coverage say what the history says', async () => {
    const text = (await page.textContent('#headline')) ?? '';
    expect(text).toContain(`${analysis.summary.tables} / ${analysis.tables.filter((t) => t.removal === null).length}`);
    expect(text).toContain(String(analysis.summary.countedUpdates));
    const coverage = (await page.textContent('#coverage')) ?? '';
    const carried = doc.versions.filter((v) => v.status === 'carried');
    expect(carried.length).toBeGreaterThan(0);
    for (const v of carried) expect(coverage).toContain(v.subject);
    for (const code of new Set(doc.versions.flatMap((v) => v.diagnostics.map((d) => d.code)))) expect(coverage).toContain(code);
  });

  test('prints: on an A4 page every chart fits the width, and Chromium writes the PDF', async () => {
    await page.setViewportSize({ width: 794, height: 1123 });
    await page.emulateMedia({ media: 'print' });
    const widths = await page.$$eval('figure.chart > svg', (svgs) => svgs.map((s) => s.getBoundingClientRect().right));
    for (const w of widths) expect(w).toBeLessThanOrEqual(794);
    const pdf = await page.pdf({ format: 'A4' });
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
    await page.emulateMedia({ media: 'screen' });
    await page.setViewportSize({ width: 1280, height: 900 });
  });

  test('the console shows no error and no request left the page', async () => {
    await page.waitForLoadState('networkidle');
    expect(consoleErrors).toEqual([]);
    expect(routed).toEqual([pageUrl]);
    expect(requested).toEqual([pageUrl]);
  });

  test('a screenshot of the report down to the history graph (docs/report-screenshot.png, shown in the README)', async () => {
    mkdirSync(join(ROOT, 'docs'), { recursive: true });
    await page.evaluate(() => window.scrollTo(0, 0));
    const bottom = await page.$eval('#graph', (s) => s.getBoundingClientRect().bottom + window.scrollY + 16);
    const png = await page.screenshot({ path: SCREENSHOT, clip: { x: 0, y: 0, width: 1280, height: Math.ceil(bottom) }, fullPage: true });
    // a PNG signature and a real image
    expect(png.subarray(0, 8).toString('hex')).toBe('89504e470d0a1a0a');
    expect(png.length).toBeGreaterThan(50_000);
  });
});
