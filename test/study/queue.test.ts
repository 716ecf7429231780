import { readFileSync, readdirSync } from 'node:fs';
import { basename, join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runCli, tempDir } from '../helpers/repo.js';
import { startCli, stopProcess, type Background } from './processes.js';
import { startRedis, type RedisServer } from './redis-server.js';
import { makeSyntheticRepos, writeCorpus } from './synthetic.js';

const tmp = tempDir('strata-queue-');
let redis: RedisServer | undefined;
let corpus = '';
let labels: string[] = [];
const workers: Background[] = [];

beforeAll(async () => {
  redis = await startRedis();
  const repos = await makeSyntheticRepos(tmp.dir, 6, { commits: 300, models: 20 });
  labels = repos.map((r) => basename(r));
  corpus = writeCorpus(join(tmp.dir, 'corpus.json'), { defaults: { adapter: 'prisma' }, repositories: repos.map((r) => ({ repository: basename(r) })) });
});

afterAll(async () => {
  for (const w of workers) await stopProcess(w);
  await redis?.stop();
  tmp.cleanup();
});

const projectFiles = (dir: string): string[] => readdirSync(dir).filter((f) => f.endsWith('.json') && f !== 'study.json').sort();


describe('study --queue: a BullMQ queue on a real redis-server, two worker processes', () => {
  it('takes up the job of a worker killed mid-job; every result is there, byte-identical to a local study, none lost or counted twice', async () => {
    const local = join(tmp.dir, 'local');
    const l = runCli(['study', corpus, '-o', local, '--jobs', '2', '--no-cache', '--quiet']);
    expect(l.stderr).toBe('');
    expect(l.code).toBe(0);
    expect(projectFiles(local)).toEqual(labels.map((x) => `${x}.json`).sort());

    const shared = join(tmp.dir, 'shared');
    const q = ['--queue', redis!.url, '--queue-name', 'killtest'];
    const workerArgs = ['worker', ...q, '--jobs', '1', '--no-cache', '--lock-duration', '2000', '--stalled-interval', '500'];
    const a = startCli(workerArgs);
    const b = startCli(workerArgs);
    workers.push(a, b);
    await a.waitForLine(/waiting for jobs/);
    await b.waitForLine(/waiting for jobs/);

    const study = startCli(['study', corpus, '-o', shared, ...q, '--no-cache']);
    // kill worker a in the middle of its first job
    const line = await a.waitForLine(/started \S+ \(job/);
    const killed = /started (\S+) \(job/.exec(line)![1]!;
    a.proc.kill('SIGKILL');
    expect(await a.exited).toBe('SIGKILL');
    expect(a.stderr()).not.toContain(`finished ${killed}`);

    expect(await study.exited).toBe(0);
    // the other worker took the job up after the dead one's lock ran out (stalled-job recovery)
    expect(b.stderr()).toContain(`started ${killed} (job`);
    expect(b.stderr()).toContain(`finished ${killed}: extracted`);
    expect(study.stdout()).toContain(`study of 6 repositories: 6 extracted, 0 unchanged since the last run, 0 failed`);

    // every result present and byte-identical to the local run's
    expect(projectFiles(shared)).toEqual(projectFiles(local));
    for (const f of projectFiles(local)) expect(readFileSync(join(shared, f)).equals(readFileSync(join(local, f))), f).toBe(true);

    // the pooled study is the same bytes too
    for (const f of ['study.json', 'tables.csv', 'projects.csv']) expect(readFileSync(join(shared, f)).equals(readFileSync(join(local, f))), f).toBe(true);
    const pooled = JSON.parse(readFileSync(join(shared, 'study.json'), 'utf8'));
    expect(pooled.projects.map((p: { label: string; status: string }) => `${p.label} ${p.status}`)).toEqual(labels.map((x) => `${x} done`));
    expect(pooled.analysis.pooled.units).toBe(pooled.analysis.projects.reduce((n: number, r: { included: number }) => n + r.included, 0));

    // the queue: six completed jobs, nothing failed, waiting or active
    expect(redis!.cli('ZCARD', 'bull:killtest:completed')).toBe('6');
    expect(redis!.cli('ZCARD', 'bull:killtest:failed')).toBe('0');
    expect(redis!.cli('LLEN', 'bull:killtest:wait')).toBe('0');
    expect(redis!.cli('LLEN', 'bull:killtest:active')).toBe('0');

    // a second queued study finds everything unchanged and redoes nothing
    const again = startCli(['study', corpus, '-o', shared, ...q, '--no-cache']);
    expect(await again.exited).toBe(0);
    expect(again.stdout()).toContain('0 extracted, 6 unchanged since the last run, 0 failed');
    await stopProcess(b);
    expect(b.stderr()).toContain('stopped');
  });

  it('a result that a worker wrote where the study does not see it is a failure that says why', async () => {
    const one = writeCorpus(join(tmp.dir, 'one.json'), { defaults: { adapter: 'prisma' }, repositories: [{ repository: labels[0] }] });
    const q = ['--queue', redis!.url, '--queue-name', 'elsewhere'];
    const w = startCli(['worker', ...q, '--jobs', '1', '--no-cache', '-o', join(tmp.dir, 'not-shared')]);
    workers.push(w);
    await w.waitForLine(/waiting for jobs/);
    const s = startCli(['study', one, '-o', join(tmp.dir, 'seen'), ...q, '--no-cache', '--quiet']);
    expect(await s.exited).toBe(1);
    expect(s.stdout()).toContain(`  ${labels[0]}: its result ${labels[0]}.json is not in the output directory (with --queue, the directory must be shared storage that every worker sees)`);
    expect(readdirSync(join(tmp.dir, 'not-shared'))).toContain(`${labels[0]}.json`);
    await stopProcess(w);
  });

  it('fails in one line when the Redis server cannot be reached', () => {
    const r = runCli(['study', corpus, '-o', join(tmp.dir, 'nowhere'), '--queue', 'redis://127.0.0.1:1', '--quiet']);
    expect(r.code).toBe(1);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/^schema-strata: cannot reach the Redis server at redis:\/\/127\.0\.0\.1:1/);
  });

  it('rejects a URL that is not a redis one as a usage error', () => {
    const r = runCli(['study', corpus, '--queue', 'http://127.0.0.1:1']);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('use a redis:// or rediss:// URL');
    const w = runCli(['worker']);
    expect(w.code).toBe(2);
    expect(w.stderr).toContain('--queue redis://HOST:PORT is required');
  });
});
