import { mkdirSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { resolve } from 'node:path';
import type { Command } from 'commander';
import { defaultCacheDir } from '../history/disk-cache.js';
import { UsageError, EXIT } from '../util/errors.js';
import { readCorpus } from '../study/corpus.js';
import { checkQueueUrl, DEFAULT_QUEUE_NAME, displayUrl } from '../study/queue.js';
import { runStudyJobs } from '../study/run-study.js';
import type { StudySettings } from '../study/runner.js';
import { poolStudy } from '../study/study-document.js';
import { formatRunSummary, studyText } from '../study/study-text.js';
import { resolveAnalysisOptions } from '../analysis/options.js';
import { addAnalysisOptions, ANALYSIS_OPTION_KEYS, checkedAnalysisOptions, renameRequest, type AnalysisCliOptions } from './analysis-options.js';
import { parseSize, progressFor, useColor, type CliIO } from './common.js';
import { colorStyle, plainStyle } from './format.js';

export interface StudyCliOptions {
  output: string;
  jobs?: string;
  queue?: string;
  queueName: string;
  maxFileSize: string;
  cache?: boolean;
  cacheDir?: string;
  update?: boolean;
  retryFailed?: boolean;
  quiet?: boolean;
  [k: string]: unknown;
}

/** A whole number >= `min` from an option value; otherwise a one-line usage error. */
export function wholeNumber(flag: string, v: string, min = 1): number {
  const n = Number(v);
  if (!/^\s*\d+\s*$/.test(v) || !Number.isInteger(n) || n < min) throw new UsageError(`${flag} ${v}: must be a whole number >= ${min}`, EXIT.usage);
  return n;
}

const STUDY_HELP = `
Corpus (JSON; relative paths are relative to the corpus file):
  { "defaults": { "adapter": "prisma" },
    "repositories": [
      { "label": "north-shed", "repository": "repos/north-shed", "paths": ["prisma/schema.prisma"] },
      { "label": "south-shed", "repository": "https://example.org/coop/south-shed.git", "ref": "main",
        "options": { "prisma-join-key": "unique" } },
      "repos/river-shed" ] }
  keys of a repository: label, repository (path or clone URL), adapter, paths, ref, since, until,
  options (adapter options by flag name). A text file with one path or URL per line also works.

Output in DIR: <label>.json per repository (as \`extract --analyze\` writes it), study.json (the
pooled study), tables.csv (every project's tables, with a project column), projects.csv.
A re-run skips the repositories whose head commit and options are unchanged.

On several machines: start \`schema-strata worker --queue redis://HOST:PORT\` on each machine
that sees DIR (shared storage, mounted at the same path or given with worker -o), then run
\`schema-strata study corpus.json -o DIR --queue redis://HOST:PORT\`.

Exit codes: 0 every repository done; 1 one or more failed (the others are done and pooled; the
summary lists each failure with its reason); 2 usage error.
`;

export function registerStudy(program: Command, io: CliIO, setCode: (c: number) => void): void {
  const cmd = program
    .command('study')
    .description('extract and analyse every repository of a corpus, each into DIR/<label>.json, then pool them (resumable; in parallel, or on a queue for many machines)')
    .argument('<corpus>', 'a JSON corpus (repositories with label, path or clone URL, adapter, paths, options) or a text file with one path or URL per line')
    .option('-o, --output <dir>', 'output directory: one interchange file per repository, the pooled study beside them', 'study')
    .option('--jobs <n>', `repositories extracted at once, each in its own process (default: the number of cores, ${availableParallelism()} here)`)
    .option('--queue <url>', 'put one job per repository on the BullMQ queue of this Redis server (redis://HOST:PORT) and wait for `schema-strata worker` processes to do them; DIR must be shared storage they see')
    .option('--queue-name <name>', 'name of the queue', DEFAULT_QUEUE_NAME)
    .option('--max-file-size <size>', 'files larger than this are not read (a diagnostic instead)', '5MB')
    .option('--cache-dir <dir>', `cache directory: the parse cache, and clones of URLs under clones/ (default ${defaultCacheDir()})`)
    .option('--no-cache', 'neither read nor write the parse cache (clones are still kept)')
    .option('--no-update', 'read clones already in the cache as they are, without fetching')
    .option('--retry-failed', 'run again the repositories whose last run failed with the same inputs')
    .option('--quiet', 'no progress on standard error')
    .option('--no-color', 'no colours (NO_COLOR is respected too)');
  addAnalysisOptions(cmd, { renamesDefault: 'stated' });
  cmd.addHelpText('after', STUDY_HELP);
  cmd.action(async (corpusFile: string, opts: StudyCliOptions & AnalysisCliOptions) => {
    const corpus = readCorpus(corpusFile);
    const jobs = opts.jobs !== undefined ? wholeNumber('--jobs', opts.jobs) : availableParallelism();
    parseSize(opts.maxFileSize);
    const queue = opts.queue ? { url: checkQueueUrl(opts.queue), name: opts.queueName } : undefined;
    // the analysis options travel with every job (each project is analysed where it is extracted)
    const options = { ...resolveAnalysisOptions(checkedAnalysisOptions(opts)), renames: renameRequest(opts)?.mode ?? ('stated' as const) };
    const analysis: Record<string, unknown> = {};
    for (const k of ANALYSIS_OPTION_KEYS) if (opts[k] !== undefined) analysis[k] = opts[k];
    const settings: StudySettings = {
      maxFileSize: opts.maxFileSize,
      cache: opts.cache !== false,
      ...(opts.cacheDir ? { cacheDir: resolve(opts.cacheDir) } : {}),
      update: opts.update !== false,
      retryFailed: !!opts.retryFailed,
      analysis,
    };
    const output = resolve(opts.output);
    try {
      mkdirSync(output, { recursive: true });
    } catch (e) {
      throw new UsageError(`-o ${opts.output}: cannot make the output directory (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`, EXIT.failure);
    }
    const outcomes = await runStudyJobs({
      corpus,
      output,
      settings,
      jobs,
      ...(queue ? { queue } : {}),
      progress: progressFor(io, !!opts.quiet),
      onNoWorker: () =>
        io.stderr.write(
          `schema-strata: no worker is connected to queue "${queue!.name}" at ${displayUrl(queue!.url)} yet; start \`schema-strata worker --queue ${displayUrl(queue!.url)}\` on machines that see ${output}\n`,
        ),
    });
    const { study, written, reused } = poolStudy(output, outcomes, new Map(corpus.entries.map((e) => [e.label, e.repository])), options);
    // a result that could not be read when pooling is a failure of its repository too
    const unread = new Map(study.projects.filter((p) => p.status === 'failed').map((p) => [p.label, p.reason]));
    const final = outcomes.map((o) => (o.status !== 'failed' && unread.has(o.label) ? { ...o, status: 'failed' as const, reason: unread.get(o.label) } : o));
    io.stdout.write(formatRunSummary(final, opts.output));
    io.stdout.write(reused ? `the pooled study is unchanged: ${written.join(', ')} in ${opts.output}\n\n` : `wrote ${written.join(', ')} in ${opts.output}\n\n`);
    io.stdout.write(studyText(study, useColor(io, opts.color as boolean | undefined) ? colorStyle : plainStyle));
    setCode(final.some((o) => o.status === 'failed') ? EXIT.failure : EXIT.ok);
  });
}
