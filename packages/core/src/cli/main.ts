import { Command, CommanderError } from 'commander';
import { UsageError, EXIT } from '../util/errors.js';
import { VERSION } from '../version.js';
import { registerStudy } from './study-command.js';
import { registerWorker } from './worker-command.js';
import { adaptersForOptions, type CliIO } from './common.js';
import { registerDemo } from './demo-command.js';
import { registerExtract } from './extract-command.js';
import { registerShow } from './show-command.js';
import { registerAdapters } from './adapters-command.js';
import { registerAnalyze } from './analyze-command.js';
import { registerDiff } from './diff-command.js';
import { registerExport } from './export-command.js';
import { registerReport } from './report-command.js';

/** Commands that other modules of core add (analysis, writers), registered in order. */
export const commandRegistry: Array<(program: Command, io: CliIO, setCode: (c: number) => void) => void> = [registerAnalyze, registerExport, registerReport];

const EXIT_CODES_HELP = `
Exit codes:
  0   success
  1   the run could not be done (not a git repository, shallow clone, no schema found, ...)
  2   usage error (unknown command or option, bad value, unknown ref)
  3   --strict: the run completed but reported diagnostics of severity error
  70  internal error (a bug in schema-strata; please report it)
`;

commandRegistry.push(registerStudy, registerWorker);

/** The CLI: parse `argv` (without node and script), run the command, return the exit code. */
export async function main(argv: string[], io: CliIO = { stdout: process.stdout, stderr: process.stderr, env: process.env }): Promise<number> {
  let code: number = EXIT.ok;
  const setCode = (c: number): void => {
    code = c;
  };
  const program = new Command('schema-strata')
    .description('Rebuild the history of a relational schema from ORM code in git, measure how every table evolved, and write it as neutral JSON.')
    .version(VERSION, '-V, --version', 'print the version')
    .helpOption('-h, --help', 'show help')
    .showSuggestionAfterError(true)
    .addHelpText('after', EXIT_CODES_HELP)
    .configureOutput({
      writeOut: (s) => io.stdout.write(s),
      writeErr: (s) => io.stderr.write(s),
      outputError: (s, write) => write(s.startsWith('error:') ? `schema-strata: ${s}` : s),
    })
    .exitOverride();
  program.configureHelp({ sortSubcommands: false, showGlobalOptions: false });

  const adapters = await adaptersForOptions(argv);
  registerExtract(program, io, adapters, setCode);
  registerShow(program, io, adapters, setCode);
  registerDiff(program, io, adapters, setCode);
  for (const reg of commandRegistry) reg(program, io, setCode);
  registerAdapters(program, io, setCode);
  registerDemo(program, io, setCode);
  for (const c of program.commands) {
    c.exitOverride();
    c.configureOutput({
      writeOut: (s) => io.stdout.write(s),
      writeErr: (s) => io.stderr.write(s),
      outputError: (s, write) => write(s.startsWith('error:') ? `schema-strata: ${s}` : s),
    });
  }

  try {
    if (argv.length === 0) {
      program.outputHelp();
      return EXIT.usage;
    }
    await program.parseAsync(argv, { from: 'user' });
    return code;
  } catch (e) {
    if (e instanceof CommanderError) {
      if (e.code === 'commander.helpDisplayed' || e.code === 'commander.version' || e.code === 'commander.help') return EXIT.ok;
      return EXIT.usage;
    }
    if (e instanceof UsageError) {
      io.stderr.write(`schema-strata: ${e.message}\n`);
      return e.exitCode;
    }
    const err = e as Error;
    io.stderr.write(`schema-strata: internal error: ${err?.message ?? String(e)}\n`);
    if (io.env.SCHEMA_STRATA_DEBUG) io.stderr.write(`${err?.stack ?? ''}\n`);
    return EXIT.internal;
  }
}
