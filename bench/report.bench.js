// Report benchmark (issue 6): the HTML report of a synthetic Prisma history of about 2,000
// versions and 150 models, its build time as a multiple of the analysis time, measured side by
// side in one run (target: under 3x), and the size of the file (target: under 5 MB).
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { join, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import { analyzeTimeline, buildReport, extractHistory, timelineOf, toDocument, GENERATOR } from '@schema-strata/core';
import prisma from '@schema-strata/adapter-prisma';
import { makePrismaHistory } from './lib/prisma-history.js';

const here = dirname(fileURLToPath(import.meta.url));
// about 4,200 commits give about 2,000 versions (the rest touch other files or only reformat)
const COMMITS = Number(process.env.BENCH_COMMITS ?? 4200);
const MODELS = Number(process.env.BENCH_MODELS ?? 150);
const work = join(here, '..', '.bench', `report-${COMMITS}-${MODELS}`);
rmSync(work, { recursive: true, force: true });
mkdirSync(work, { recursive: true });
const repo = join(work, 'repo');

const gen = await makePrismaHistory(repo, { commits: COMMITS, models: MODELS });
const history = await extractHistory({ repo, adapter: prisma });
const doc = toDocument(history, GENERATOR);
const ms = (t0) => Number(process.hrtime.bigint() - t0) / 1e6;
const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

// warm both once (module loading and first compilation are not what is compared), then alternate
let analysis = analyzeTimeline(timelineOf(doc));
let html = await buildReport(doc, analysis);
const analysisMs = [];
const reportMs = [];
for (let i = 0; i < 3; i++) {
  let t0 = process.hrtime.bigint();
  analysis = analyzeTimeline(timelineOf(doc));
  analysisMs.push(ms(t0));
  t0 = process.hrtime.bigint();
  html = await buildReport(doc, analysis);
  reportMs.push(ms(t0));
}
writeFileSync(join(work, 'report.html'), html);
const bytes = Buffer.byteLength(html);

const s = analysis.summary;
console.log(`synthetic history: ${gen.commits} commits, ${doc.versions.length} versions, ${s.tables} tables ever, ${analysis.graph.edges.length} foreign keys ever, ${s.countedUpdates} counted updates`);
console.log(`analysis (median of 3)             ${(median(analysisMs) / 1000).toFixed(3).padStart(8)} s`);
console.log(`report build (median of 3)         ${(median(reportMs) / 1000).toFixed(3).padStart(8)} s`);
console.log(`report file                        ${(bytes / 1024 / 1024).toFixed(2).padStart(8)} MB  (${join(work, 'report.html')})`);
const ratio = median(reportMs) / median(analysisMs);
console.log(`\nreport / analysis = ${ratio.toFixed(2)}x  (target < 3x)  ${ratio < 3 ? 'met' : 'NOT met'}`);
console.log(`report size = ${(bytes / 1e6).toFixed(2)} MB  (target < 5 MB)  ${bytes < 5e6 ? 'met' : 'NOT met'}`);
