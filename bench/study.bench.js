// Study benchmark (issue 7): a corpus of 20 synthetic Prisma repositories (small histories of
// bench/lib/prisma-history.js, seeds 1..20). Measured with --jobs 1 and with --jobs 2, each run
// in its own process, from an empty output directory and without the parse cache, so that every
// run does all the work: the repository phase (the pool extracting and analysing every
// repository: bench/lib/study-phase.js) and the whole `schema-strata study` command (the phase,
// then the pooled analysis, which runs once whatever --jobs is). Prints the speed-up of 2 jobs
// over 1 (target at least 1.6 on two cores) and the time of a re-run that finds everything
// unchanged. Beside each phase it prints its processor time (the pool children and their git
// processes): one job alone keeps more than one core busy, which bounds what two cores can give.
// Three rounds, alternating, so that a slow moment of the machine does not favour one side; the
// ratios use the best time of each side.
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { availableParallelism } from 'node:os';
import { join, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import { makePrismaHistory } from './lib/prisma-history.js';

const here = dirname(fileURLToPath(import.meta.url));
const REPOS = Number(process.env.BENCH_STUDY_REPOS ?? 20);
const COMMITS = Number(process.env.BENCH_STUDY_COMMITS ?? 300);
const MODELS = Number(process.env.BENCH_STUDY_MODELS ?? 20);
const ROUNDS = Number(process.env.BENCH_STUDY_ROUNDS ?? 3);
const cli = join(here, '..', 'packages', 'core', 'bin', 'schema-strata.js');
const work = join(here, '..', '.bench', `study-${REPOS}-${COMMITS}-${MODELS}`);
rmSync(work, { recursive: true, force: true });
mkdirSync(work, { recursive: true });

const t0 = Date.now();
const labels = [];
for (let i = 1; i <= REPOS; i++) {
  await makePrismaHistory(join(work, `shed${i}`), { commits: COMMITS, models: MODELS, seed: i });
  labels.push(`shed${i}`);
}
const corpus = join(work, 'corpus.json');
writeFileSync(corpus, JSON.stringify({ defaults: { adapter: 'prisma' }, repositories: labels.map((l) => ({ repository: l })) }, null, 2) + '\n');
console.log(`corpus: ${REPOS} synthetic repositories of ${COMMITS} commits growing to ${MODELS} models (generated in ${((Date.now() - t0) / 1000).toFixed(1)} s); ${availableParallelism()} cores`);

function study(jobs, out, extra = []) {
  const start = process.hrtime.bigint();
  const r = spawnSync(process.execPath, [cli, 'study', corpus, '-o', out, '--jobs', String(jobs), '--no-cache', '--quiet', ...extra], { encoding: 'utf8', maxBuffer: 1 << 26 });
  const ms = Number(process.hrtime.bigint() - start) / 1e6;
  if (r.status !== 0) {
    console.error(r.stdout, r.stderr);
    throw new Error(`study --jobs ${jobs} failed`);
  }
  const m = /(\d+) extracted, (\d+) unchanged/.exec(r.stdout);
  return { ms, extracted: Number(m?.[1]), unchanged: Number(m?.[2]) };
}

function phase(jobs, out) {
  const r = spawnSync(process.execPath, [join(here, 'lib', 'study-phase.js'), corpus, out, String(jobs)], { encoding: 'utf8' });
  if (r.status !== 0) {
    console.error(r.stderr);
    throw new Error(`repository phase with --jobs ${jobs} failed`);
  }
  return JSON.parse(r.stdout.trim().split('\n').pop());
}

const times = { 1: [], 2: [] };
const phases = { 1: [], 2: [] };
for (let round = 1; round <= ROUNDS; round++) {
  for (const jobs of round % 2 === 1 ? [1, 2] : [2, 1]) {
    const pout = join(work, `phase-${jobs}-${round}`);
    rmSync(pout, { recursive: true, force: true });
    const p = phase(jobs, pout);
    if (p.extracted !== REPOS) throw new Error(`expected ${REPOS} extracted, got ${p.extracted}`);
    phases[jobs].push(p);
    const out = join(work, `out-${jobs}-${round}`);
    rmSync(out, { recursive: true, force: true });
    const r = study(jobs, out);
    if (r.extracted !== REPOS) throw new Error(`expected ${REPOS} extracted, got ${r.extracted}`);
    times[jobs].push(r.ms);
    console.log(`round ${round}: --jobs ${jobs}  repository phase ${(p.ms / 1000).toFixed(2).padStart(7)} s   whole study ${(r.ms / 1000).toFixed(2).padStart(7)} s`);
  }
}
const rerun = study(2, join(work, 'out-2-1'));
if (rerun.unchanged !== REPOS) throw new Error(`expected ${REPOS} unchanged on the re-run, got ${rerun.unchanged}`);

const best1 = Math.min(...times[1]);
const best2 = Math.min(...times[2]);
const fastest = (list) => list.reduce((a, b) => (b.ms < a.ms ? b : a));
const p1 = fastest(phases[1]);
const p2 = fastest(phases[2]);
const phase1 = p1.ms;
const phase2 = p2.ms;
const speedup = phase1 / phase2;
// cores kept busy: processor time (the pool children and their git processes) over wall time
const busy1 = p1.cpuMs / p1.ms;
const busy2 = p2.cpuMs / p2.ms;
console.log('');
console.log(`${'measurement'.padEnd(40)} ${'time'.padStart(9)}`);
console.log(`${'repository phase, --jobs 1 (best)'.padEnd(40)} ${(phase1 / 1000).toFixed(2).padStart(7)} s   processor ${(p1.cpuMs / 1000).toFixed(2).padStart(6)} s (${busy1.toFixed(2)} cores busy)`);
console.log(`${'repository phase, --jobs 2 (best)'.padEnd(40)} ${(phase2 / 1000).toFixed(2).padStart(7)} s   processor ${(p2.cpuMs / 1000).toFixed(2).padStart(6)} s (${busy2.toFixed(2)} cores busy)`);
console.log(`${'study --jobs 1 (best of rounds)'.padEnd(40)} ${(best1 / 1000).toFixed(2).padStart(7)} s`);
console.log(`${'study --jobs 2 (best of rounds)'.padEnd(40)} ${(best2 / 1000).toFixed(2).padStart(7)} s`);
console.log(`${'re-run, all unchanged (--jobs 2)'.padEnd(40)} ${(rerun.ms / 1000).toFixed(2).padStart(7)} s`);
console.log('');
console.log(`speed-up of 2 jobs over 1 = ${speedup.toFixed(2)}  (repository phase; target >= 1.6 on two cores)  ${speedup >= 1.6 ? 'met' : 'NOT met'}`);
// one job already keeps more than one core busy (helper threads, git): even if two jobs needed no
// more processor time than one, two cores could give at most this
const cores = Math.min(2, availableParallelism());
console.log(`bound from one job's processor time: ${cores} cores / ${busy1.toFixed(2)} cores busy with 1 job = ${(cores / busy1).toFixed(2)}; 2 jobs needed ${(p2.cpuMs / p1.cpuMs).toFixed(2)}x the processor time of 1`);
console.log(`whole study: 1 job / 2 jobs = ${(best1 / best2).toFixed(2)}  (the pooled analysis after the phase runs once either way)`);
console.log(`re-run / --jobs 2 run   = ${(100 * rerun.ms / best2).toFixed(1)}%`);
