// One measurement of the study benchmark, run in its own process: the repository phase of
// `schema-strata study` (runStudyJobs: the pool of child processes extracting and analysing every
// repository of the corpus), without the pooling that follows. Prints one JSON line: wall time
// and processor time (this process, its pool children and their git processes, all waited for).
import { readCorpus, runStudyJobs, silentProgress } from '@schema-strata/core';
import { cpuMark, cpuMsSince } from './cpu.js';

const [corpus, out, jobs] = process.argv.slice(2);
const t0 = process.hrtime.bigint();
const cpu0 = cpuMark();
const outcomes = await runStudyJobs({
  corpus: readCorpus(corpus),
  output: out,
  settings: { maxFileSize: '5MB', cache: false, update: true, retryFailed: false, analysis: {} },
  jobs: Number(jobs),
  progress: silentProgress,
});
const ms = Number(process.hrtime.bigint() - t0) / 1e6;
const cpuMs = cpuMsSince(cpu0);
console.log(JSON.stringify({ ms, cpuMs, extracted: outcomes.filter((o) => o.status === 'extracted').length }));
