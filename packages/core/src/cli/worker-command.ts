import { availableParallelism, hostname } from 'node:os';
import { resolve } from 'node:path';
import type { Command } from 'commander';
import { defaultCacheDir } from '../history/disk-cache.js';
import { UsageError, EXIT } from '../util/errors.js';
import { checkQueueUrl, DEFAULT_QUEUE_NAME, displayUrl, startQueueWorker } from '../study/queue.js';
import type { CliIO } from './common.js';
import { wholeNumber } from './study-command.js';

interface WorkerCliOptions {
  queue?: string;
  queueName: string;
  jobs?: string;
  output?: string;
  cache?: boolean;
  cacheDir?: string;
  lockDuration: string;
  stalledInterval: string;
  maxStalled: string;
  quiet?: boolean;
}

export function registerWorker(program: Command, io: CliIO, setCode: (c: number) => void): void {
  program
    .command('worker')
    .description('take repository jobs of `study --queue` from a BullMQ queue, extract and analyse them, and write the results to the study\'s output directory; runs until stopped (Ctrl-C or SIGTERM: the running jobs finish first)')
    .option('--queue <url>', 'the Redis server of the queue (redis://HOST:PORT); required')
    .option('--queue-name <name>', 'name of the queue', DEFAULT_QUEUE_NAME)
    .option('--jobs <n>', `jobs run at once, each in its own process (default: the number of cores, ${availableParallelism()} here)`)
    .option('-o, --output <dir>', "where the study's output directory is mounted on this machine, when not at the path the study gave")
    .option('--cache-dir <dir>', `this machine's cache directory: the parse cache and clones of URLs (default ${defaultCacheDir()})`)
    .option('--no-cache', 'neither read nor write the parse cache')
    .option('--lock-duration <ms>', "a running job's lock: when a worker dies, its job is taken up by another after about this long", '30000')
    .option('--stalled-interval <ms>', 'how often this worker looks for jobs whose worker died', '30000')
    .option('--max-stalled <n>', 'times a job may be taken up again after its worker died before it fails', '1')
    .option('--quiet', 'no line per job on standard error')
    .action(async (opts: WorkerCliOptions) => {
      if (!opts.queue) throw new UsageError('worker: --queue redis://HOST:PORT is required', EXIT.usage);
      const target = { url: checkQueueUrl(opts.queue), name: opts.queueName };
      const jobs = opts.jobs !== undefined ? wholeNumber('--jobs', opts.jobs) : availableParallelism();
      const log = (line: string): void => {
        if (!opts.quiet) io.stderr.write(`worker ${hostname()}:${process.pid}: ${line}\n`);
      };
      const handle = await startQueueWorker(target, {
        jobs,
        cache: opts.cache !== false,
        ...(opts.cacheDir ? { cacheDir: resolve(opts.cacheDir) } : {}),
        ...(opts.output ? { output: resolve(opts.output) } : {}),
        lockDuration: wholeNumber('--lock-duration', opts.lockDuration, 100),
        stalledInterval: wholeNumber('--stalled-interval', opts.stalledInterval, 100),
        maxStalled: wholeNumber('--max-stalled', opts.maxStalled, 0),
        log,
      });
      log(`waiting for jobs on queue "${target.name}" at ${displayUrl(target.url)} (${jobs} at once)`);
      let signals = 0;
      const stop = (): void => {
        signals++;
        if (signals === 1) {
          log('stopping after the running jobs (signal again to stop at once)');
          void handle.close(false);
        } else {
          void handle.close(true);
        }
      };
      process.on('SIGINT', stop);
      process.on('SIGTERM', stop);
      try {
        await handle.closed;
      } finally {
        process.off('SIGINT', stop);
        process.off('SIGTERM', stop);
      }
      log('stopped');
      setCode(EXIT.ok);
    });
}
