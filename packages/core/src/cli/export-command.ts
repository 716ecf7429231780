import { join } from 'node:path';
import { Option, type Command } from 'commander';
import type { Analysis } from '../analysis/types.js';
import type { InterchangeDocument } from '../interchange/document.js';
import { writeFileAtomic } from '../util/atomic-write.js';
import { UsageError, EXIT } from '../util/errors.js';
import { csvFiles } from '../writers/csv/index.js';
import { dotFile } from '../writers/dot/index.js';
import { gexfFile, GEXF_TIMES, type GexfTime } from '../writers/gexf/index.js';
import { graphmlFile } from '../writers/graphml/index.js';
import { addAnalysisOptions, type AnalysisCliOptions } from './analysis-options.js';
import { analysisFor, readHistoryFile } from './analyze-command.js';
import type { CliIO } from './common.js';

/** An output format of `export`. */
export interface ExportFormat {
  name: string;
  description: string;
  /** `directory`: -o names a directory that receives several files; `file`: -o names one file (or - for standard output). */
  target: 'directory' | 'file';
  /** Options of this format only (commander flags), passed to `render` by their camel-case names. */
  options?: Array<{ flags: string; description: string; defaultValue?: string; choices?: readonly string[] }>;
  /** The files to write: paths relative to the directory (`directory`), or one entry whose path is ignored (`file`). */
  render(doc: InterchangeDocument, analysis: Analysis, options: Record<string, unknown>): Array<{ path: string; content: string }>;
}

/** The formats of `export`, by name; other modules add theirs. */
export const exportFormats = new Map<string, ExportFormat>([
  ['csv', { name: 'csv', description: 'tables.csv, changes.csv and versions.csv (RFC 4180)', target: 'directory', render: csvFiles }],
  ['gexf', {
    name: 'gexf',
    description: 'the history graph as a dynamic GEXF 1.3 graph (lifetimes as spells)',
    target: 'file',
    options: [{ flags: '--time <basis>', description: 'gexf: what the spells count, version indexes or committer dates', defaultValue: 'version', choices: GEXF_TIMES }],
    render: (doc, a, o) => [{ path: 'history.gexf', content: gexfFile(doc, a, o.time as GexfTime) }],
  }],
  ['graphml', { name: 'graphml', description: 'the history graph as GraphML', target: 'file', render: (doc, a) => [{ path: 'history.graphml', content: graphmlFile(doc, a) }] }],
  ['dot', { name: 'dot', description: 'the history graph as Graphviz DOT', target: 'file', render: (doc, a) => [{ path: 'history.dot', content: dotFile(doc, a) }] }],
]);

export function registerExport(program: Command, io: CliIO, setCode: (c: number) => void): void {
  const cmd = program
    .command('export')
    .description('write a history file in other formats for other tools')
    .argument('<history.json>', 'an interchange file written by `schema-strata extract`')
    .requiredOption('--format <name>', `output format: ${[...exportFormats.keys()].join(', ')}`)
    .requiredOption('-o, --output <path>', 'output directory (csv) or file')
    .option('--repo <path>', 'the repository, for --initial-until with a tag (default: the one named in the file)');
  for (const f of exportFormats.values()) {
    for (const o of f.options ?? []) {
      const opt = new Option(o.flags, o.description);
      if (o.defaultValue !== undefined) opt.default(o.defaultValue);
      if (o.choices) opt.choices(o.choices as string[]);
      cmd.addOption(opt);
    }
  }
  addAnalysisOptions(cmd, { renamesDefault: 'as in the file' });
  cmd.action(async (file: string, opts: AnalysisCliOptions & { format: string; output: string }) => {
    const format = exportFormats.get(opts.format);
    if (!format) throw new UsageError(`--format ${opts.format}: unknown format (formats: ${[...exportFormats.keys()].join(', ')})`, EXIT.usage);
    const { doc, analysis } = await analysisFor(readHistoryFile(file), opts);
    const files = format.render(doc, analysis, opts as unknown as Record<string, unknown>);
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
