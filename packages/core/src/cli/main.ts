import { Command, CommanderError } from 'commander';
import { UsageError, EXIT } from '../util/errors.js';
import { VERSION } from '../version.js';
import { adaptersForOptions, type CliIO } from './common.js';
import type { SchemaAdapter } from '../adapter/api.js';

type Register = (program: Command, io: CliIO, adapters: SchemaAdapter[], setCode: (c: number) => void) => void;

/**
 * The commands, in the order help lists them (and registered in this order: a command that
 * hooks into another comes after it). Each module is loaded only when its command runs, with
 * the commands that hook into it (`also`: the analysis embeds itself in `extract`, the report
 * in `demo`), or for help; so that `show` or `adapters` do not load the analysis, the writers,
 * the report and the study code with their libraries.
 */
const COMMANDS: ReadonlyArray<{ name: string; also?: readonly string[]; load: () => Promise<Register> }> = [
  { name: 'extract', also: ['analyze'], load: async () => (await import('./extract-command.js')).registerExtract },
  { name: 'show', load: async () => (await import('./show-command.js')).registerShow },
  { name: 'diff', load: async () => (await import('./diff-command.js')).registerDiff },
  { name: 'analyze', load: async () => plain((await import('./analyze-command.js')).registerAnalyze) },
  { name: 'export', load: async () => plain((await import('./export-command.js')).registerExport) },
  { name: 'report', load: async () => plain((await import('./report-command.js')).registerReport) },
  { name: 'study', load: async () => plain((await import('./study-command.js')).registerStudy) },
  { name: 'worker', load: async () => plain((await import('./worker-command.js')).registerWorker) },
  { name: 'adapters', load: async () => plain((await import('./adapters-command.js')).registerAdapters) },
  { name: 'demo', also: ['extract', 'analyze', 'report'], load: async () => plain((await import('./demo-command.js')).registerDemo) },
];

function plain(reg: (program: Command, io: CliIO, setCode: (c: number) => void) => void): Register {
  return (program, io, _adapters, setCode) => reg(program, io, setCode);
}

const EXIT_CODES_HELP = `
Exit codes:
  0   success
  1   the run could not be done (not a git repository, shallow clone, no schema found, ...)
  2   usage error (unknown command or option, bad value, unknown ref)
  3   --strict: the run completed but reported diagnostics of severity error
  70  internal error (a bug in schema-strata; please report it)
`;

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
  // the named command and those that hook into it; every command for help, --version, an
  // unknown command or none
  const named = COMMANDS.find((c) => c.name === argv[0]);
  const wanted = named ? new Set([named.name, ...(named.also ?? [])]) : null;
  for (const c of COMMANDS) if (!wanted || wanted.has(c.name)) (await c.load())(program, io, adapters, setCode);
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
