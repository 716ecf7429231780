import { resolve } from 'node:path';
import type { Progress } from '../util/progress.js';
import type { Corpus } from './corpus.js';
import { ProcessPool, repositoryChildScript } from './pool.js';
import { runQueued, type QueueTarget } from './queue.js';
import type { RepositoryJob, RepositoryOutcome, StudySettings } from './runner.js';

export interface StudyRequest {
  corpus: Corpus;
  /** Output directory (made absolute here: jobs carry it to child processes and other machines). */
  output: string;
  settings: StudySettings;
  /** Child processes of the local pool. */
  jobs: number;
  /** Run on a BullMQ queue instead of the local pool. */
  queue?: QueueTarget;
  progress: Progress;
  /** Called when no worker listens on the queue at the start. */
  onNoWorker?: () => void;
}

/** The jobs of a study: one per corpus entry, in corpus order. */
export function jobsOf(corpus: Corpus, output: string, settings: StudySettings): RepositoryJob[] {
  const out = resolve(output);
  return corpus.entries.map((entry) => ({ entry, output: out, settings }));
}

/**
 * Run every repository of a corpus, on the local pool of child processes (`jobs` at once) or
 * on a queue, with one overall progress display, and return the outcomes in corpus order.
 * Each result lands in the output directory as it finishes; an interrupted study loses only
 * the repositories that were running.
 */
export async function runStudyJobs(req: StudyRequest): Promise<RepositoryOutcome[]> {
  const jobs = jobsOf(req.corpus, req.output, req.settings);
  let done = 0;
  req.progress.phase(req.queue ? 'repositories (queue)' : 'repositories', jobs.length);
  const tick = (): void => req.progress.tick(++done);
  try {
    if (req.queue) return await runQueued(req.queue, jobs, { onOutcome: tick, onNoWorker: req.onNoWorker });
    const pool = new ProcessPool<RepositoryJob, RepositoryOutcome>(Math.max(1, Math.min(req.jobs, jobs.length)), repositoryChildScript());
    try {
      return await Promise.all(
        jobs.map((j) =>
          pool
            .run(j)
            .catch((e: Error): RepositoryOutcome => ({ label: j.entry.label, status: 'failed', reason: e.message }))
            .finally(tick),
        ),
      );
    } finally {
      await pool.close(false);
    }
  } finally {
    req.progress.done();
  }
}
