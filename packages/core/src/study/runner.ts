import type { Command } from 'commander';
import { existsSync } from 'node:fs';
import { Writable } from 'node:stream';
import { join } from 'node:path';
import { applyConfig, parseSize, resolveAdapter, type CliIO } from '../cli/common.js';
import { extractStep } from '../cli/analyze-command.js';
import { extractHooks, runExtract, type ExtractOptions } from '../cli/extract-command.js';
import { BlobReader } from '../git/blob-reader.js';
import { openRepository } from '../git/repository.js';
import { defaultCacheDir } from '../history/disk-cache.js';
import { outputOptions } from '../history/engine.js';
import { serialiseDocument } from '../interchange/document.js';
import { canonicalJson } from '../model/canonical.js';
import { writeFileAtomic } from '../util/atomic-write.js';
import { GENERATOR } from '../version.js';
import { ensureClone } from './clone.js';
import type { SchemaAdapter } from '../adapter/api.js';
import type { CorpusEntry, OptionValue } from './corpus.js';
import { readState, resultFileOf, resultIntact, sha256, writeState, type ProjectState } from './state.js';

/** Settings of a study that every repository's run shares (they travel with each job). */
export interface StudySettings {
  /** `--max-file-size` as given. */
  maxFileSize: string;
  /** Use the parse cache. */
  cache: boolean;
  /** Cache directory (parse cache and, under `clones/`, the clones of URLs); default the user's cache. */
  cacheDir?: string;
  /** Bring clones already in the cache up to date before reading them. */
  update: boolean;
  /** Run again the projects whose last run failed with the same inputs. */
  retryFailed: boolean;
  /** Options of the analysis, as the CLI parses them (commander's keys). */
  analysis: Record<string, unknown>;
}

/** One unit of work: a repository of the corpus, where its result goes, and the shared settings. */
export interface RepositoryJob {
  entry: CorpusEntry;
  /** Output directory of the study (absolute). */
  output: string;
  settings: StudySettings;
}

/** What became of one repository. */
export interface RepositoryOutcome {
  label: string;
  /** `extracted` this run; `unchanged`: skipped, its inputs are those of the last run; `failed`. */
  status: 'extracted' | 'unchanged' | 'failed';
  reason?: string;
  /** A failure recorded by an earlier run with the same inputs, not retried (see `--retry-failed`). */
  earlier?: boolean;
  head?: string;
  result?: ProjectState['result'];
}

const camel = (flag: string): string => flag.replace(/-([a-z0-9])/g, (_, c: string) => c.toUpperCase());

const discard = (): NodeJS.WriteStream => new Writable({ write: (_c, _e, cb) => cb() }) as unknown as NodeJS.WriteStream;

/** Output streams for a run inside a study: nothing is printed (the study shows one overall progress). */
export function silentIO(): CliIO {
  return { stdout: discard(), stderr: discard(), env: process.env };
}

/** The clone cache of a study: `<cache dir>/clones`. */
export function cloneDirOf(settings: Pick<StudySettings, 'cacheDir'>): string {
  return join(settings.cacheDir ?? defaultCacheDir(), 'clones');
}

function message(e: unknown): string {
  const m = e instanceof Error ? e.message : String(e);
  return m.split('\n')[0] ?? m;
}

/**
 * What is wrong with a corpus entry's adapter options, checked as the command line checks
 * flags: each must be one the adapter declares, of its type, and one of its choices.
 */
export function optionProblem(adapter: SchemaAdapter, options: Record<string, OptionValue>): string | undefined {
  const declared = new Map((adapter.options ?? []).map((o) => [o.flag, o]));
  const unknown = Object.keys(options).filter((f) => !declared.has(f));
  if (unknown.length > 0) {
    const known = [...declared.keys()].map((f) => `--${f}`).join(', ') || 'none';
    return `unknown option${unknown.length > 1 ? 's' : ''} ${unknown.map((f) => `--${f}`).join(', ')} for adapter ${adapter.name} (its options: ${known})`;
  }
  for (const [flag, v] of Object.entries(options)) {
    const o = declared.get(flag)!;
    const type = Array.isArray(v) ? 'string[]' : typeof v === 'boolean' ? 'boolean' : 'string';
    if (type !== o.type) return `option --${flag} of adapter ${adapter.name} takes ${o.type === 'boolean' ? 'true or false' : o.type === 'string' ? 'a string' : 'a list of strings'}`;
    if (o.choices && typeof v === 'string' && !o.choices.includes(v)) return `option --${flag} of adapter ${adapter.name}: "${v}" is not one of ${o.choices.join(', ')}`;
  }
  return undefined;
}

/**
 * The options of one repository's extraction, settled as `extract` settles them: the corpus
 * entry plays the part of the command line (it wins over the repository's own configuration
 * file, which is read as data).
 */
export async function extractOptionsOf(job: RepositoryJob, location: string, reader?: BlobReader): Promise<ExtractOptions> {
  const { entry, settings } = job;
  const opts: ExtractOptions = {
    adapter: entry.adapter,
    ...(entry.paths ? { path: [...entry.paths] } : {}),
    ref: entry.ref,
    ...(entry.since ? { since: entry.since } : {}),
    ...(entry.until ? { until: entry.until } : {}),
    output: '-',
    maxFileSize: settings.maxFileSize,
    cache: settings.cache,
    ...(settings.cacheDir ? { cacheDir: settings.cacheDir } : {}),
    quiet: true,
    analyze: true,
    ...settings.analysis,
  };
  for (const [flag, v] of Object.entries(entry.options)) opts[camel(flag)] = v;
  const sources = { getOptionValueSource: (key: string) => (key === 'adapter' && entry.adapterGiven ? 'cli' : undefined) } as unknown as Command;
  await applyConfig(sources, location, entry.ref, opts, reader);
  return opts;
}

/**
 * Run one repository of a study: clone or update it when it is a URL, settle its options, skip
 * it when its state says the same inputs already gave the result that is in the output
 * directory, else extract (and analyse) it and write `DIR/<label>.json`, then its state. A
 * failure is an outcome with its reason, never an exception: the other repositories go on.
 * Writing the same result twice (two workers on one job) is harmless: same bytes, atomic writes.
 */
export async function runRepository(job: RepositoryJob): Promise<RepositoryOutcome> {
  const { entry, settings, output } = job;
  const label = entry.label;
  let location = entry.location;
  let head: string | undefined;
  let key: string | undefined;
  let reader: BlobReader | undefined;
  try {
    if (entry.remote) location = await ensureClone(entry.location, cloneDirOf(settings), settings.update);
    // one `cat-file` process for the configuration file and the extraction
    reader = existsSync(location) ? new BlobReader(location, parseSize(settings.maxFileSize)) : undefined;
    const opts = await extractOptionsOf(job, location, reader);
    const loaded = await resolveAdapter(opts.adapter, location, entry.ref, opts.path);
    const problem = optionProblem(loaded.adapter, entry.options);
    if (problem) return { label, status: 'failed', reason: problem };
    head = (await openRepository(location, entry.ref)).head;
    const adapterValues: Record<string, unknown> = {};
    for (const o of loaded.adapter.options ?? []) if (opts[camel(o.flag)] !== undefined) adapterValues[o.flag] = opts[camel(o.flag)];
    key = sha256(
      canonicalJson({
        generator: GENERATOR,
        repository: entry.repository,
        head,
        ref: entry.ref,
        since: entry.since,
        until: entry.until,
        paths: opts.path,
        adapter: { name: loaded.adapter.name, version: loaded.adapter.version, source: loaded.source },
        adapterOptions: outputOptions(loaded.adapter, adapterValues as Record<string, string>),
        maxFileSize: settings.maxFileSize,
        analysis: settings.analysis,
      }),
    );
    const before = readState(output, label);
    if (before && before.key === key) {
      if (before.status === 'done' && resultIntact(output, before)) return { label, status: 'unchanged', head, result: before.result! };
      if (before.status === 'failed' && !settings.retryFailed) return { label, status: 'failed', reason: before.reason ?? 'failed', earlier: true, head };
    }
    // the analysis embeds itself as in `extract --analyze` (the same step; registered once)
    if (!extractHooks.includes(extractStep)) extractHooks.push(extractStep);
    const { doc, errors } = await runExtract(location, { ...opts, adapter: loaded.source, resolvedHead: head, ...(reader ? { blobReader: reader } : {}) }, silentIO());
    // the file names the repository as the corpus wrote it, never the clone cache
    doc.source.repository = entry.repository;
    const text = serialiseDocument(doc);
    const file = `${label}.json`;
    writeFileAtomic(resultFileOf(output, label), text);
    const result = { file, sha256: sha256(text), versions: doc.summary.versions, tables: doc.summary.tableIds, changes: doc.summary.changes, errors };
    writeState(output, { label, key, head, status: 'done', result });
    return { label, status: 'extracted', head, result };
  } catch (e) {
    // messages name the repository as the corpus does, not the absolute path or the clone
    const reason = message(e).split(location).join(entry.repository).split(entry.location).join(entry.repository);
    if (key && head) writeState(output, { label, key, head, status: 'failed', reason });
    return { label, status: 'failed', reason, ...(head ? { head } : {}) };
  } finally {
    reader?.close();
  }
}
