import { join } from 'node:path';
import type { Command } from 'commander';
import { buildReport } from '../report/build-report.js';
import { writeFileAtomic } from '../util/atomic-write.js';
import { EXIT, UsageError } from '../util/errors.js';
import { addAnalysisOptions, type AnalysisCliOptions } from './analysis-options.js';
import { analysisFor, readHistoryFile } from './analyze-command.js';
import type { CliIO } from './common.js';
import { demoHooks } from './demo-command.js';

/** The demo's last step: report.html beside history.json. */
async function demoReport(dir: string, historyFile: string): Promise<string[]> {
  const { doc, analysis } = await analysisFor(readHistoryFile(historyFile), {});
  const out = join(dir, 'report.html');
  writeFileAtomic(out, await buildReport(doc, analysis, { title: `the tool-lending co-op demo (${doc.source.adapter.name})` }));
  return [out];
}

export function registerReport(program: Command, io: CliIO, setCode: (c: number) => void): void {
  if (!demoHooks.includes(demoReport)) demoHooks.push(demoReport);
  const cmd = program
    .command('report')
    .description('write an offline HTML report of a history file: growth, lifetimes, the history graph, topology and change, coverage')
    .argument('<history.json>', 'an interchange file written by `schema-strata extract`')
    .option('-o, --output <file>', 'the HTML file to write (- for standard output)', 'report.html')
    .option('--top <n>', 'rows of the most-changed table', '15')
    .option('--title <text>', 'title of the page (default: the last part of the repository path)')
    .option('--repo <path>', 'the repository, for --initial-until with a tag (default: the one named in the file)');
  addAnalysisOptions(cmd, { renamesDefault: 'as in the file' });
  cmd.action(async (file: string, opts: AnalysisCliOptions & { output: string; top: string; title?: string }) => {
    const top = Number(opts.top);
    if (!Number.isInteger(top) || top < 1) throw new UsageError(`--top ${opts.top}: not a whole number above 0`, EXIT.usage);
    const { doc, analysis } = await analysisFor(readHistoryFile(file), opts);
    const html = await buildReport(doc, analysis, { topChanged: top, ...(opts.title ? { title: opts.title } : {}) });
    if (opts.output === '-') io.stdout.write(html);
    else {
      writeFileAtomic(opts.output, html);
      io.stderr.write(`wrote ${opts.output}\n`);
    }
    setCode(EXIT.ok);
  });
}
