// Analysis benchmark (issue 3): the analysis of a synthetic Prisma history of about 2,000
// commits and 150 models, as a share of the extract's time on the same history, measured side
// by side in one run (target: the analysis adds at most 20% to the extract).
import { mkdirSync, rmSync } from 'node:fs';
import { join, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import { analyzeTimeline, extractHistory, serialiseDocument, timelineOf, toDocument, GENERATOR } from '@schema-strata/core';
import prisma from '@schema-strata/adapter-prisma';
import { makePrismaHistory } from './lib/prisma-history.js';

const here = dirname(fileURLToPath(import.meta.url));
// about 4,200 commits give about 2,000 versions (the rest touch other files or only reformat)
const COMMITS = Number(process.env.BENCH_COMMITS ?? 4200);
const MODELS = Number(process.env.BENCH_MODELS ?? 150);
const work = join(here, '..', '.bench', `analysis-${COMMITS}-${MODELS}`);
rmSync(work, { recursive: true, force: true });
mkdirSync(work, { recursive: true });
const repo = join(work, 'repo');

const gen = await makePrismaHistory(repo, { commits: COMMITS, models: MODELS });
const ms = (t0) => Number(process.hrtime.bigint() - t0) / 1e6;

let t0 = process.hrtime.bigint();
const history = await extractHistory({ repo, adapter: prisma });
const doc = toDocument(history, GENERATOR);
const extractMs = ms(t0);

// the analysis as `extract --analyze` runs it: timeline, every measure and statistic
t0 = process.hrtime.bigint();
const analysis = analyzeTimeline(timelineOf(doc));
const firstMs = ms(t0);
const again = [];
for (let i = 0; i < 3; i++) {
  t0 = process.hrtime.bigint();
  analyzeTimeline(timelineOf(doc));
  again.push(ms(t0));
}
again.sort((a, b) => a - b);
// and as `analyze history.json` runs it: parse the file, then analyse
const text = serialiseDocument(doc);
t0 = process.hrtime.bigint();
analyzeTimeline(timelineOf(JSON.parse(text)));
const fromFileMs = ms(t0);

const s = analysis.summary;
const ex = analysis.statistics.classByActivityBand.exact;
console.log(`synthetic history: ${gen.commits} commits, ${doc.versions.length} versions, ${s.tables} tables ever, ${s.changes} changes`);
console.log(`exact test, class by band: ${ex.computable ? `${ex.method}${ex.method === 'exact' ? ` (${ex.tables} tables)` : ` (${ex.draws} draws)`}` : ex.reason}`);
console.log(`extract (cold, no cache)           ${(extractMs / 1000).toFixed(2).padStart(8)} s`);
console.log(`analysis (first run)               ${(firstMs / 1000).toFixed(2).padStart(8)} s`);
console.log(`analysis (median of 3 more)        ${(again[1] / 1000).toFixed(2).padStart(8)} s`);
console.log(`analysis from the file (parse too) ${(fromFileMs / 1000).toFixed(2).padStart(8)} s`);
const share = (100 * firstMs) / extractMs;
console.log(`\nanalysis / extract = ${share.toFixed(1)}%  (target <= 20%)  ${share <= 20 ? 'met' : 'NOT met'}`);
