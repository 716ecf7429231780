import { readFileSync } from 'node:fs';
import type { Command } from 'commander';
import { analyzeTimeline } from '../analysis/analyze.js';
import { applyRenames } from '../analysis/input/renames.js';
import { timelineOf } from '../analysis/input/timeline.js';
import { analysisText } from '../analysis/text/analysis-text.js';
import type { Analysis } from '../analysis/types.js';
import { FORMAT_NAME, serialiseDocument, type InterchangeDocument } from '../interchange/document.js';
import { UsageError, EXIT } from '../util/errors.js';
import { addAnalysisOptions, analysisOptionsFrom, anyAnalysisOption, checkedAnalysisOptions, renameRequest, type AnalysisCliOptions } from './analysis-options.js';
import { useColor, type CliIO } from './common.js';
import { extractHooks, type ExtractOptions } from './extract-command.js';
import { colorStyle, plainStyle } from './format.js';

/** Read an interchange file; anything else is a one-line usage error. */
export function readHistoryFile(path: string): InterchangeDocument {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch {
    throw new UsageError(`${path}: cannot read the file`, EXIT.usage);
  }
  let doc: unknown;
  try {
    doc = JSON.parse(text);
  } catch (e) {
    throw new UsageError(`${path}: not valid JSON (${(e as Error).message})`, EXIT.usage);
  }
  const d = doc as Partial<InterchangeDocument> | null;
  if (!d || typeof d !== 'object' || d.format !== FORMAT_NAME || !Array.isArray(d.versions) || d.versions.length === 0 || !d.snapshots || !d.tables || !Array.isArray(d.changes)) {
    throw new UsageError(`${path}: not a ${FORMAT_NAME} file (write one with \`schema-strata extract\`)`, EXIT.usage);
  }
  return d as InterchangeDocument;
}

/**
 * The analysis of a document as the command line asks: the embedded one when the file has one
 * and no analysis option was given, else computed (after rename detection when asked).
 */
export async function analysisFor(doc: InterchangeDocument, opts: AnalysisCliOptions): Promise<{ doc: InterchangeDocument; analysis: Analysis }> {
  if (doc.analysis && !anyAnalysisOption(opts)) return { doc, analysis: doc.analysis as Analysis };
  const renames = renameRequest(opts);
  const d = renames ? applyRenames(doc, renames.mode, renames.threshold).doc : doc;
  const options = await analysisOptionsFrom(opts, d);
  return { doc: d, analysis: analyzeTimeline(timelineOf(d), options) };
}

/** The `extract --analyze` step: rename detection when asked, then the analysis embedded in the document. */
export async function extractStep(doc: InterchangeDocument, opts: ExtractOptions): Promise<void> {
  const o = opts as ExtractOptions & AnalysisCliOptions & { analyze?: boolean };
  const renames = renameRequest(o);
  if (renames) {
    const d = applyRenames(doc, renames.mode, renames.threshold).doc;
    doc.changes = d.changes;
    doc.summary = d.summary;
  }
  if (o.analyze) doc.analysis = analyzeTimeline(timelineOf(doc), await analysisOptionsFrom(o, doc));
}

/** Before `extract` runs: the analysis options are checked, and they need --analyze (renames do not). */
function checkExtractOptions(opts: AnalysisCliOptions & { analyze?: boolean }): void {
  checkedAnalysisOptions(opts);
  if (!opts.analyze && anyAnalysisOption({ ...opts, renames: undefined, renameThreshold: undefined })) {
    throw new UsageError('analysis options need --analyze', EXIT.usage);
  }
}

export function registerAnalyze(program: Command, io: CliIO, setCode: (c: number) => void): void {
  if (!extractHooks.includes(extractStep)) extractHooks.push(extractStep);
  const extract = program.commands.find((c) => c.name() === 'extract');
  extract?.hook('preAction', (cmd) => checkExtractOptions(cmd.opts()));
  const cmd = program
    .command('analyze')
    .description('measure lifecycles, counted updates and foreign-key topology of a history file, and test how topology and change are associated')
    .argument('<history.json>', 'an interchange file written by `schema-strata extract`')
    .option('--json', 'print the analysis as JSON')
    .option('--repo <path>', 'the repository, for --initial-until with a tag (default: the one named in the file)')
    .option('--no-color', 'no colours (NO_COLOR is respected too)');
  addAnalysisOptions(cmd, { renamesDefault: 'as in the file' });
  cmd.action(async (file: string, opts: AnalysisCliOptions & { json?: boolean; color?: boolean }) => {
    const { doc, analysis } = await analysisFor(readHistoryFile(file), opts);
    if (opts.json) io.stdout.write(serialiseDocument(analysis));
    else io.stdout.write(analysisText(doc, analysis, useColor(io, opts.color) ? colorStyle : plainStyle));
    setCode(EXIT.ok);
  });
}
