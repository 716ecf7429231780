import { CHANGE_KINDS } from '../changes/kinds.js';
import { CLASS_COLOURS, FONT_STACK, INK, LEFT_OUT, LEFT_OUT_COLOUR, MONO_STACK, MUTED_INK, RULE } from './palette.js';
import type { ChangedTable, Coverage, ReportCategory, ReportData } from './report-data.js';

/** The rendered charts that go into the page, as SVG strings. */
export interface PageCharts {
  growth: string;
  lifetimes: string;
  graph: string;
  heatMaps: Record<string, string>;
  /** How many graph nodes carry a permanent label. */
  graphLabels: number;
}

export function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

const esc = escapeHtml;

/** An integer with thousands separators (fixed, not locale-dependent). */
export function formatInt(n: number): string {
  const s = String(Math.round(Math.abs(n)));
  return (n < 0 ? '-' : '') + s.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}

const day = (iso: string): string => iso.slice(0, 10);

function spanText(days: number): string {
  if (days < 60) return `${Math.round(days)} day${Math.round(days) === 1 ? '' : 's'}`;
  if (days < 365) return `${Math.round(days / 30.44)} months`;
  return `${(days / 365.25).toFixed(1)} years`;
}

const categoryColour = (c: ReportCategory): string => (c === LEFT_OUT ? LEFT_OUT_COLOUR : CLASS_COLOURS[c]);

const swatch = (c: ReportCategory): string => `<span class="swatch" style="background:${categoryColour(c)}"></span>${esc(c)}`;

const kindLabel = (k: string): string => k.replace(/-/g, ' ');

/** The page's style sheet: screen and print. Only system fonts; nothing is loaded. */
const STYLE = `
:root { --ink: ${INK}; --muted: ${MUTED_INK}; --rule: ${RULE}; --paper: #fbfaf7; --panel: #ffffff; }
* { box-sizing: border-box; }
html { font-family: ${FONT_STACK}; color: var(--ink); background: var(--paper); font-size: 15px; line-height: 1.45; }
body { margin: 0; }
main { max-width: 1120px; margin: 0 auto; padding: 28px 28px 48px; }
header.top { border-bottom: 3px solid var(--ink); padding-bottom: 12px; margin-bottom: 22px; }
h1 { font-size: 1.75rem; margin: 0 0 4px; letter-spacing: -0.01em; }
h2 { font-size: 1.22rem; margin: 0 0 6px; padding-top: 6px; }
h3 { font-size: 1rem; margin: 14px 0 6px; }
p { margin: 6px 0 10px; max-width: 78ch; }
.meta { color: var(--muted); font-size: 0.88rem; margin: 0; }
.meta code, td code { font-family: ${MONO_STACK}; font-size: 0.85em; }
section { background: var(--panel); border: 1px solid var(--rule); border-radius: 6px; padding: 16px 20px 14px; margin: 0 0 20px; }
.figures { display: grid; grid-template-columns: repeat(auto-fit, minmax(150px, 1fr)); gap: 10px; margin: 8px 0 4px; }
.figure { border-left: 4px solid var(--ink); padding: 4px 10px; }
.figure .value { font-size: 1.6rem; font-weight: 700; line-height: 1.1; font-variant-numeric: tabular-nums; }
.figure .label { color: var(--muted); font-size: 0.85rem; }
figure.chart { margin: 8px 0 4px; overflow-x: auto; }
figure.chart svg { display: block; max-width: 100%; height: auto; }
figcaption, .note { color: var(--muted); font-size: 0.86rem; }
.pair { display: grid; grid-template-columns: repeat(auto-fit, minmax(420px, 1fr)); gap: 18px; }
.readings { margin: 6px 0; padding-left: 18px; font-size: 0.92rem; }
.readings li { margin: 3px 0; }
.caution { border-left: 4px solid #e08a2e; background: #fdf6ec; padding: 8px 12px; margin: 12px 0 4px; font-size: 0.92rem; }
table.data { border-collapse: collapse; width: 100%; font-size: 0.9rem; margin: 6px 0 10px; }
table.data th, table.data td { text-align: left; padding: 4px 8px; border-bottom: 1px solid var(--rule); vertical-align: top; }
table.data th { font-weight: 600; border-bottom: 2px solid var(--ink); }
table.data td.num, table.data th.num { text-align: right; font-variant-numeric: tabular-nums; }
.bar { display: inline-block; height: 9px; background: #2d7f86; border-radius: 2px; vertical-align: middle; margin-right: 6px; }
.swatch { display: inline-block; width: 10px; height: 10px; border-radius: 50%; margin-right: 6px; vertical-align: baseline; }
.graph_labels_marks text { paint-order: stroke; }
.graph_nodes_marks path { cursor: default; }
.graph_nodes_marks path:hover { stroke: ${INK}; stroke-width: 2px; }
.tip { position: fixed; pointer-events: none; background: ${INK}; color: #fff; font-size: 0.82rem; padding: 4px 8px; border-radius: 4px; max-width: 360px; display: none; z-index: 10; }
footer { color: var(--muted); font-size: 0.82rem; border-top: 1px solid var(--rule); padding-top: 10px; }
@media print {
  html { background: #fff; font-size: 11pt; }
  main { max-width: none; padding: 0; }
  section { border: none; border-top: 1px solid #999; border-radius: 0; padding: 8px 0; break-inside: avoid-page; }
  section.long { break-inside: auto; }
  .tip { display: none !important; }
  figure.chart { overflow: visible; }
  .caution { background: none; }
  a { color: inherit; text-decoration: none; }
}
@page { margin: 14mm; }
`;

/** Hover labels: every mark that carries a description shows it beside the pointer. No request, no library. */
const SCRIPT = `
(function () {
  var tip = document.createElement('div');
  tip.className = 'tip';
  tip.setAttribute('role', 'tooltip');
  document.body.appendChild(tip);
  function target(e) { return e.target && e.target.closest ? e.target.closest('figure.chart [aria-label][role="graphics-symbol"]') : null; }
  document.addEventListener('mouseover', function (e) {
    var el = target(e);
    if (!el) return;
    tip.textContent = el.getAttribute('aria-label');
    tip.style.display = 'block';
  });
  document.addEventListener('mousemove', function (e) {
    if (tip.style.display !== 'block') return;
    tip.style.left = Math.min(e.clientX + 14, window.innerWidth - tip.offsetWidth - 8) + 'px';
    tip.style.top = (e.clientY + 14) + 'px';
  });
  document.addEventListener('mouseout', function (e) { if (target(e)) tip.style.display = 'none'; });
})();
`;

function headline(d: ReportData): string {
  const h = d.headline;
  const fig = (value: string, label: string): string => `<div class="figure"><div class="value">${esc(value)}</div><div class="label">${esc(label)}</div></div>`;
  return `<div class="figures">
${fig(formatInt(h.versions), 'versions')}
${fig(spanText(h.spanDays), `${day(h.firstDate)} to ${day(h.lastDate)}`)}
${fig(`${formatInt(h.tablesEver)} / ${formatInt(h.tablesToday)}`, 'tables ever / today')}
${fig(formatInt(h.removed), h.removed === 1 ? 'table removed' : 'tables removed')}
${fig(formatInt(h.countedUpdates), 'counted updates')}
${fig(`${formatInt(h.columnsToday)} / ${formatInt(h.foreignKeysToday)}`, 'columns / foreign keys today')}
</div>`;
}

function changedTable(rows: readonly ChangedTable[]): string {
  if (rows.length === 0) return '<p class="note">No table had a counted update.</p>';
  const max = Math.max(...rows.map((r) => r.countedUpdates));
  const body = rows
    .map(
      (r) => `<tr><td>${esc(r.label)}${r.removed ? ' <span class="note">(removed)</span>' : ''}</td><td>${swatch(r.category)}</td>` +
        `<td class="num"><span class="bar" style="width:${Math.max(2, Math.round((60 * r.countedUpdates) / max))}px"></span>${formatInt(r.countedUpdates)}</td>` +
        `<td>${r.byKind.map((k) => `${esc(kindLabel(k.kind))} ${k.count}`).join(', ')}</td>` +
        `<td>${esc(r.band ?? 'no band')}</td><td>${esc(r.birthGroup)}</td>` +
        `<td class="num">${formatInt(r.lifetimeVersions)}</td><td class="num">${formatInt(r.lifetimeDays)}</td></tr>`,
    )
    .join('\n');
  return `<table class="data" id="most-changed-table"><thead><tr><th>table</th><th>topology class</th><th class="num">counted updates</th><th>by kind</th><th>activity band</th><th>birth group</th><th class="num">versions alive</th><th class="num">days alive</th></tr></thead>
<tbody>
${body}
</tbody></table>`;
}

function coverage(c: Coverage, versions: number): string {
  const parts: string[] = [];
  parts.push(
    `<h3>Versions by status</h3><table class="data" id="statuses"><thead><tr><th>status</th><th class="num">versions</th></tr></thead><tbody>` +
      c.statuses.map((s) => `<tr><td>${esc(s.status)}</td><td class="num">${formatInt(s.versions)}</td></tr>`).join('') +
      `</tbody></table>`,
  );
  parts.push(
    c.carried.length === 0
      ? `<p>No version was carried: every one of the ${formatInt(versions)} versions was built from its own files.</p>`
      : `<p>${formatInt(c.carried.length)} version${c.carried.length === 1 ? ' was' : 's were'} carried (the schema failed to build; the previous snapshot was kept): ` +
          c.carried.slice(0, 20).map((v) => `${v.version} <code>${esc(v.commit.slice(0, 10))}</code> “${esc(v.subject)}”`).join('; ') +
          (c.carried.length > 20 ? '; …' : '') + '.</p>',
  );
  parts.push('<h3>What the adapter counted</h3>');
  parts.push(
    c.counters.length === 0
      ? '<p class="note">The adapter reported no counters (raw statements skipped and the like).</p>'
      : `<table class="data" id="counters"><thead><tr><th>counter</th><th class="num">at the last version</th><th class="num">largest</th><th class="num">versions above 0</th></tr></thead><tbody>` +
          c.counters.map((k) => `<tr><td><code>${esc(k.name)}</code></td><td class="num">${formatInt(k.last)}</td><td class="num">${formatInt(k.max)}</td><td class="num">${formatInt(k.versionsAboveZero)}</td></tr>`).join('') +
          '</tbody></table>',
  );
  parts.push('<h3>Diagnostics by code</h3>');
  parts.push(
    c.diagnostics.length === 0
      ? '<p>No diagnostics: every file was read and understood.</p>'
      : `<p>${c.unresolved > 0 ? `${formatInt(c.unresolved)} diagnostic${c.unresolved === 1 ? ' says' : 's say'} that something could not be resolved. ` : ''}Each code with how often it was reported, in how many versions, and its first message.</p>` +
          `<table class="data" id="diagnostics"><thead><tr><th>code</th><th>severity</th><th class="num">reported</th><th class="num">versions</th><th>first message</th></tr></thead><tbody>` +
          c.diagnostics.map((d) => `<tr><td><code>${esc(d.code)}</code></td><td>${esc(d.severity)}</td><td class="num">${formatInt(d.count)}</td><td class="num">${formatInt(d.versions)}</td><td>${esc(d.example.length > 200 ? `${d.example.slice(0, 200)}…` : d.example)}</td></tr>`).join('') +
          '</tbody></table>',
  );
  if (c.danglingForeignKeys > 0) parts.push(`<p>${formatInt(c.danglingForeignKeys)} foreign key${c.danglingForeignKeys === 1 ? '' : 's'} referenced a table that never existed in any snapshot; they are kept out of the degrees.</p>`);
  if (c.excludedTables.length > 0) {
    parts.push(`<p>${formatInt(c.excludedTables.length)} table${c.excludedTables.length === 1 ? ' was' : 's were'} left out of the measures by a filter: ` + c.excludedTables.slice(0, 30).map((t) => `${esc(t.id)} (${esc(t.reason)})`).join(', ') + (c.excludedTables.length > 30 ? ', …' : '') + '.</p>');
  }
  return parts.join('\n');
}

/** The whole page: one self-contained HTML document (inline style, inline SVG, a few lines of inline script). */
export function pageHtml(d: ReportData, charts: PageCharts): string {
  const counted = d.options.counted.map(kindLabel).join(', ');
  const allKinds = CHANGE_KINDS.length;
  const heat = d.contingency
    .map(
      (c) => `<div class="heat" id="${c.id}">
<h3>${esc(c.title)}</h3>
<figure class="chart">${charts.heatMaps[c.id]}</figure>
<p class="note">${formatInt(c.analysis.table.total)} tables. Each cell: the count, and its share of the row (the colour).${c.analysis.leftOut.length > 0 ? ` ${formatInt(c.analysis.leftOut.length)} table${c.analysis.leftOut.length === 1 ? '' : 's'} without a band left out.` : ''}</p>
<ul class="readings">${c.analysis.reading.map((r) => `<li>${esc(r)}</li>`).join('')}</ul>
</div>`,
    )
    .join('\n');
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; script-src 'unsafe-inline'; img-src data:">
<title>Schema history: ${esc(d.title)}</title>
<style>${STYLE}</style>
</head>
<body>
<main>
<header class="top">
<h1>Schema history: ${esc(d.title)}</h1>
<p class="meta">Repository <code>${esc(d.source.repository)}</code>, ref <code>${esc(d.source.ref)}</code> at <code>${esc(d.source.head.slice(0, 12))}</code>; read by the ${esc(d.source.adapter)} adapter; written by ${esc(d.source.generator)}.</p>
</header>

<section id="headline">
<h2>At a glance</h2>
${headline(d)}
<p class="note">A version is a commit at which the files the schema is built from changed. Counted updates are changes of kinds ${esc(counted)} (${d.options.counted.length} of the ${allKinds} kinds; set with <code>--count</code>).</p>
</section>

<section id="growth">
<h2>Growth</h2>
<p>How many tables, columns and foreign keys the schema had at every version, and when.</p>
<figure class="chart">${charts.growth}</figure>
</section>

<section id="lifetimes" class="long">
<h2>Lifetimes</h2>
<p>One row per table that ever existed, in order of birth. A bar runs from the version the table appeared in to the version that removed it, or to the last version; a table removed and added again has several bars. The colour is the table's topology class in the history graph; each black tick is a version that brought the table counted updates.</p>
<figure class="chart">${charts.lifetimes}</figure>
</section>

<section id="graph">
<h2>History graph</h2>
<p>Every table that ever existed, joined to the tables its foreign keys referenced at any time. Lines narrow toward the referenced table; faint points and lines were removed before the last version. A point's area grows with the table's counted updates; the ${formatInt(charts.graphLabels)} tables named are the most changed, and every point tells its name and measures under the pointer. Layout: ForceAtlas2, from fixed starting positions, so the same history is always drawn the same way.</p>
<figure class="chart">${charts.graph}</figure>
<p class="note">${formatInt(d.graph.nodes.length)} tables, ${formatInt(d.graph.links.length)} referencing pairs drawn${d.graph.nodes.some((n) => n.selfReferences > 0) ? '; self-references are not drawn (they show under the pointer)' : ''}.</p>
</section>

<section id="topology-and-change">
<h2>Topology and change</h2>
<p>Does a table's place in the foreign-key graph go with when it was born and how much it changed? Activity bands: <em>unchanged</em> (no counted update), <em>low</em> (1 to ${d.options.highAbove}), <em>high</em> (more than ${d.options.highAbove}), by ${esc(d.options.bandBy)}; the threshold is a convention, not a standard (set it with <code>--high-above</code>).</p>
<div class="pair">
${heat}
</div>
<h3>Degree, class and counted updates</h3>
<ul class="readings">${d.readings.map((r) => `<li>${esc(r)}</li>`).join('')}</ul>
<p class="caution">${esc(d.caution)}</p>
</section>

<section id="most-changed">
<h2>Most changed tables</h2>
${changedTable(d.topChanged)}
</section>

<section id="coverage">
<h2>Coverage</h2>
<p>What could not be read, so that you can judge how complete the history above is.</p>
${coverage(d.coverage, d.headline.versions)}
</section>

<footer>
<p>Made by ${esc(d.source.generator)} from the interchange file. The page is self-contained: it loads nothing and prints as it shows. Definitions of every measure: docs/measures.md of schema-strata.</p>
</footer>
</main>
<script>${SCRIPT}</script>
</body>
</html>
`;
}

