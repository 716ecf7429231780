import type { Command } from 'commander';
import type { BlobReader } from '../git/blob-reader.js';
import { extractHistory } from '../history/engine.js';
import { serialiseDocument, toDocument, type InterchangeDocument } from '../interchange/document.js';
import { writeFileAtomic } from '../util/atomic-write.js';
import { GENERATOR } from '../version.js';
import {
  adapterOptionValues,
  addAdapterOptions,
  addRepositoryOptions,
  applyConfig,
  cacheDirOf,
  parseSize,
  progressFor,
  resolveAdapter,
  type CliIO,
  EXIT,
} from './common.js';
import type { SchemaAdapter } from '../adapter/api.js';
import { summariseDiagnostics } from './format.js';
import { addAnalysisOptions } from './analysis-options.js';

export interface ExtractOptions {
  adapter: string;
  path?: string[];
  ref: string;
  since?: string;
  until?: string;
  output: string;
  maxFileSize: string;
  cache?: boolean;
  cacheDir?: string;
  config?: string;
  quiet?: boolean;
  strict?: boolean;
  /** The commit `ref` resolves to, when the caller has just checked the repository (not a flag). */
  resolvedHead?: string;
  /** A blob reader the caller opened on the repository with this file-size limit, and closes (not a flag). */
  blobReader?: BlobReader;
  [k: string]: unknown;
}

/** Hooks other commands and packages add to `extract` (the analysis embeds itself here). */
export const extractHooks: Array<(doc: InterchangeDocument, opts: ExtractOptions) => void | Promise<void>> = [];

/** Run an extraction as `extract` does and return the document (used by `extract` and `demo`). */
export async function runExtract(repo: string, opts: ExtractOptions, io: CliIO): Promise<{ doc: InterchangeDocument; errors: number }> {
  const loaded = await resolveAdapter(opts.adapter, repo, opts.ref, opts.path);
  const progress = progressFor(io, !!opts.quiet);
  try {
    const history = await extractHistory({
      repo,
      ref: opts.ref,
      ...(opts.resolvedHead ? { resolvedHead: opts.resolvedHead } : {}),
      ...(opts.blobReader ? { blobReader: opts.blobReader } : {}),
      since: opts.since,
      until: opts.until,
      paths: opts.path,
      adapter: loaded.adapter,
      adapterSource: loaded.source,
      adapterOptions: adapterOptionValues(loaded.adapter, opts),
      cacheDir: cacheDirOf(opts),
      maxFileBytes: parseSize(opts.maxFileSize),
      progress,
    });
    const doc = toDocument(history, GENERATOR);
    for (const hook of extractHooks) await hook(doc, opts);
    const errors = history.versions.reduce((n, v) => n + v.diagnostics.filter((d) => d.severity === 'error').length, 0) +
      history.diagnostics.filter((d) => d.severity === 'error').length;
    return { doc, errors };
  } finally {
    progress.done();
  }
}

export function registerExtract(program: Command, io: CliIO, adapters: SchemaAdapter[], setCode: (c: number) => void): void {
  const cmd = program
    .command('extract')
    .description('rebuild the schema at every version of a repository and write the interchange JSON file')
    .argument('<repo>', 'path of a git repository')
    .option('--ref <ref>', 'branch, tag or commit whose first-parent history is read', 'HEAD')
    .option('--since <date|rev>', 'first version is the first one at or after this date or revision')
    .option('--until <date|rev>', 'last version is the last one at or before this date or revision')
    .option('-o, --output <file>', 'where to write the file; - for standard output', 'history.json')
    .option('--strict', 'exit with code 3 when any diagnostic of severity error was reported')
    .option('--quiet', 'no progress and no summary on standard error')
    .option('--analyze', 'embed the analysis (measures and statistics) in the file; takes the options of `analyze`');
  addAnalysisOptions(cmd, { renamesDefault: 'stated' });
  addRepositoryOptions(cmd);
  addAdapterOptions(cmd, adapters);
  cmd.action(async (repo: string, opts: ExtractOptions) => {
    await applyConfig(cmd, repo, opts.ref, opts);
    const { doc, errors } = await runExtract(repo, opts, io);
    const text = serialiseDocument(doc);
    if (opts.output === '-') io.stdout.write(text);
    else writeFileAtomic(opts.output, text);
    if (!opts.quiet) {
      const s = doc.summary;
      const statuses = Object.entries(s.statuses).filter(([k]) => k !== 'ok').map(([k, n]) => `${n} ${k}`);
      io.stderr.write(
        `${opts.output === '-' ? 'wrote to standard output' : `wrote ${opts.output}`}: ${s.versions} versions` +
          `${statuses.length ? ` (${statuses.join(', ')})` : ''}, ${s.tableIds} tables, ${s.changes} changes\n`,
      );
      const summary = summariseDiagnostics(doc);
      if (summary) io.stderr.write(summary + '\n');
    }
    setCode(opts.strict && errors > 0 ? EXIT.diagnostics : EXIT.ok);
  });
}
