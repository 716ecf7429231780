import { randomUUID } from 'node:crypto';
import { UsageError, EXIT } from '../util/errors.js';
import { ProcessPool, repositoryChildScript } from './pool.js';
import type { RepositoryJob, RepositoryOutcome } from './runner.js';

// BullMQ (and its Redis client) is loaded only when a queue is used: `import type` is erased.
import type { ConnectionOptions, Job } from 'bullmq';

/** Name of the BullMQ queue when none is given. */
export const DEFAULT_QUEUE_NAME = 'schema-strata-study';

/** A Redis server and the name of the queue on it. */
export interface QueueTarget {
  /** `redis://[user:password@]host:port[/db]` or `rediss://...` (TLS). */
  url: string;
  name: string;
}

/** Check a `--queue` URL; a bad one is a one-line usage error. */
export function checkQueueUrl(url: string): string {
  let u: URL;
  try {
    u = new URL(url);
  } catch {
    throw new UsageError(`--queue ${url}: not a URL (use redis://HOST:PORT)`, EXIT.usage);
  }
  if (u.protocol !== 'redis:' && u.protocol !== 'rediss:') throw new UsageError(`--queue ${url}: use a redis:// or rediss:// URL`, EXIT.usage);
  if (!u.hostname) throw new UsageError(`--queue ${url}: no host`, EXIT.usage);
  return url;
}

/** The URL without its password, for messages. */
export function displayUrl(url: string): string {
  try {
    const u = new URL(url);
    if (u.password) u.password = '***';
    return u.toString().replace(/\/$/, '');
  } catch {
    return url;
  }
}

function connectionOf(url: string): ConnectionOptions {
  // reconnect quickly and without end: a worker outlives a restart of the server
  return { url, retryStrategy: (times: number) => Math.min(200 * times, 2000) } as ConnectionOptions;
}

async function loadBullmq(): Promise<typeof import('bullmq')> {
  return import('bullmq');
}

/** Wait for `ready`, or fail with a one-line error after `ms`. */
async function reachable(ready: Promise<unknown>, url: string, ms: number, lastError: () => string | undefined): Promise<void> {
  let timer: NodeJS.Timeout | undefined;
  const timeout = new Promise<never>((_, reject) => {
    timer = setTimeout(() => {
      const why = lastError();
      reject(new UsageError(`cannot reach the Redis server at ${displayUrl(url)} within ${ms / 1000} s${why ? ` (${why})` : ''}`, EXIT.failure));
    }, ms);
  });
  try {
    await Promise.race([ready, timeout]);
  } finally {
    clearTimeout(timer);
  }
}

export interface EnqueueOptions {
  /** Called once for every finished job, in the order they finish. */
  onOutcome?: (o: RepositoryOutcome) => void;
  /** Called once, when no worker is connected to the queue at the start. */
  onNoWorker?: () => void;
  /** How long to wait for the server at the start, in milliseconds (default 10 s). */
  connectTimeout?: number;
}

/**
 * The `study --queue` side: put one job per repository on the BullMQ queue and wait until every
 * one has finished, on whichever workers took them. Job ids are fresh for every run (the
 * workers' state files decide what is redone, not the queue); a job that fails as a whole (say,
 * its worker died more often than the stalled-job limit allows) is a failed outcome with
 * BullMQ's reason. Returns the outcomes in the order of `jobs`.
 */
export async function runQueued(target: QueueTarget, jobs: RepositoryJob[], opts: EnqueueOptions = {}): Promise<RepositoryOutcome[]> {
  const { Queue, QueueEvents } = await loadBullmq();
  const connection = connectionOf(target.url);
  let lastError: string | undefined;
  const onError = (e: Error): void => {
    lastError = e.message;
  };
  const queue = new Queue(target.name, { connection });
  queue.on('error', onError);
  const timeout = opts.connectTimeout ?? 10_000;
  try {
    await reachable(queue.waitUntilReady(), target.url, timeout, () => lastError);
  } catch (e) {
    await queue.close().catch(() => undefined);
    throw e;
  }
  // the event stream's reader is made only once the server answered (it cannot be closed before)
  const events = new QueueEvents(target.name, { connection });
  events.on('error', onError);
  try {
    await reachable(events.waitUntilReady(), target.url, timeout, () => lastError);
    if (opts.onNoWorker && (await queue.getWorkersCount()) === 0) opts.onNoWorker();
    // every waiting job listens for the queue's closing: one listener each
    queue.setMaxListeners(jobs.length + 16);
    const run = randomUUID().slice(0, 8);
    const week = 7 * 24 * 3600;
    const added: Job[] = await queue.addBulk(
      jobs.map((j) => ({
        name: j.entry.label,
        data: j,
        opts: { jobId: `${run}-${j.entry.label}`, attempts: 1, removeOnComplete: { age: week }, removeOnFail: { age: week } },
      })),
    );
    return await Promise.all(
      added.map((job, i) =>
        job.waitUntilFinished(events).then(
          (o: RepositoryOutcome) => {
            opts.onOutcome?.(o);
            return o;
          },
          (e: Error) => {
            const o: RepositoryOutcome = { label: jobs[i]!.entry.label, status: 'failed', reason: `queue job failed: ${e.message}` };
            opts.onOutcome?.(o);
            return o;
          },
        ),
      ),
    );
  } finally {
    await Promise.allSettled([events.close(), queue.close()]);
  }
}

/** Settings of a queue worker (`schema-strata worker`). */
export interface QueueWorkerOptions {
  /** Jobs run at once, each in its own child process. */
  jobs: number;
  /** This machine's cache directory (parse cache and clones), overriding the study's. */
  cacheDir?: string;
  cache: boolean;
  /** Where the shared output directory is mounted here, when not at the path the study gave. */
  output?: string;
  /** Lock of a running job, in milliseconds: a job whose worker stops renewing it is taken up by another after this long. */
  lockDuration: number;
  /** How often this worker looks for stalled jobs, in milliseconds. */
  stalledInterval: number;
  /** How many times a job may be taken up again after its worker died, before it fails. */
  maxStalled: number;
  log: (line: string) => void;
}

export interface QueueWorkerHandle {
  /** Stop taking jobs, let the running ones finish (unless `force`), and disconnect. */
  close(force?: boolean): Promise<void>;
  /** Resolves when the worker has closed. */
  closed: Promise<void>;
}

/**
 * The `schema-strata worker` side: take repository jobs from the queue, run each in a child
 * process of a local pool (so that this process stays free to renew the jobs' locks), and write
 * the results to the study's output directory. BullMQ's stalled-job check moves the job of a
 * worker that died (its lock expired) back to the queue, where another worker takes it up.
 */
export async function startQueueWorker(target: QueueTarget, opts: QueueWorkerOptions): Promise<QueueWorkerHandle> {
  const { Worker } = await loadBullmq();
  const pool = new ProcessPool<RepositoryJob, RepositoryOutcome>(opts.jobs, repositoryChildScript());
  let lastError: string | undefined;
  const worker = new Worker(
    target.name,
    async (job: Job) => {
      const data = job.data as RepositoryJob;
      const settings = { ...data.settings, cache: opts.cache };
      if (opts.cacheDir) settings.cacheDir = opts.cacheDir;
      else delete settings.cacheDir;
      const mine: RepositoryJob = { ...data, output: opts.output ?? data.output, settings };
      opts.log(`started ${data.entry.label} (job ${job.id})`);
      const outcome = await pool.run(mine).catch((e: Error): RepositoryOutcome => ({ label: data.entry.label, status: 'failed', reason: e.message }));
      opts.log(`finished ${data.entry.label}: ${outcome.status}${outcome.reason ? ` (${outcome.reason})` : ''}`);
      return outcome;
    },
    {
      connection: connectionOf(target.url),
      concurrency: opts.jobs,
      lockDuration: opts.lockDuration,
      stalledInterval: opts.stalledInterval,
      maxStalledCount: opts.maxStalled,
      autorun: false,
    },
  );
  worker.on('error', (e: Error) => {
    if (e.message !== lastError) opts.log(`queue error: ${e.message}`);
    lastError = e.message;
  });
  let resolveClosed!: () => void;
  const closed = new Promise<void>((r) => (resolveClosed = r));
  const running = worker.run();
  running.catch((e: Error) => opts.log(`worker stopped: ${e.message}`));
  await reachable(worker.waitUntilReady(), target.url, 10_000, () => lastError).catch(async (e) => {
    await worker.close(true).catch(() => undefined);
    await pool.close(false);
    throw e;
  });
  let closing: Promise<void> | undefined;
  return {
    closed,
    close(force = false) {
      closing ??= (async () => {
        await worker.close(force).catch(() => undefined);
        await pool.close(!force);
        resolveClosed();
      })();
      return closing;
    },
  };
}
