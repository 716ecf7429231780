import { join } from 'node:path';
import type { Command } from 'commander';
import type { Analysis } from '../analysis/types.js';
import type { InterchangeDocument } from '../interchange/document.js';
import { writeFileAtomic } from '../util/atomic-write.js';
import { UsageError, EXIT } from '../util/errors.js';
import { csvFiles } from '../writers/csv/index.js';
import { addAnalysisOptions, type AnalysisCliOptions } from './analysis-options.js';
import { analysisFor, readHistoryFile } from './analyze-command.js';
import type { CliIO } from './common.js';

/** An output format of `export`. */
export interface ExportFormat {
  name: string;
  description: string;
  /** `directory`: -o names a directory that receives several files; `file`: -o names one file (or - for standard output). */
  target: 'directory' | 'file';
  /** The files to write: paths relative to the directory (`directory`), or one entry whose path is ignored (`file`). */
  render(doc: InterchangeDocument, analysis: Analysis): Array<{ path: string; content: string }>;
}

/** The formats of `export`, by name; other modules add theirs. */
export const exportFormats = new Map<string, ExportFormat>([
  ['csv', { name: 'csv', description: 'tables.csv, changes.csv and versions.csv (RFC 4180)', target: 'directory', render: csvFiles }],
]);

export function registerExport(program: Command, io: CliIO, setCode: (c: number) => void): void {
  const cmd = program
    .command('export')
    .description('write a history file in other formats for other tools')
    .argument('<history.json>', 'an interchange file written by `schema-strata extract`')
    .requiredOption('--format <name>', `output format: ${[...exportFormats.keys()].join(', ')}`)
    .requiredOption('-o, --output <path>', 'output directory (csv) or file')
    .option('--repo <path>', 'the repository, for --initial-until with a tag (default: the one named in the file)');
  addAnalysisOptions(cmd, { renamesDefault: 'as in the file' });
  cmd.action(async (file: string, opts: AnalysisCliOptions & { format: string; output: string }) => {
    const format = exportFormats.get(opts.format);
    if (!format) throw new UsageError(`--format ${opts.format}: unknown format (formats: ${[...exportFormats.keys()].join(', ')})`, EXIT.usage);
    const { doc, analysis } = await analysisFor(readHistoryFile(file), opts);
    const files = format.render(doc, analysis);
    if (format.target === 'file') {
      if (opts.output === '-') io.stdout.write(files[0]!.content);
      else writeFileAtomic(opts.output, files[0]!.content);
    } else {
      for (const f of files) writeFileAtomic(join(opts.output, f.path), f.content);
    }
    io.stderr.write(`wrote ${files.map((f) => (format.target === 'file' ? opts.output : join(opts.output, f.path))).join(', ')}\n`);
    setCode(EXIT.ok);
  });
}
