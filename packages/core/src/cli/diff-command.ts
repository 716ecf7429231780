import type { Command } from 'commander';
import type { SchemaAdapter } from '../adapter/api.js';
import type { Change } from '../changes/kinds.js';
import { detectRenames, type RenameMatch } from '../changes/rename-heuristic.js';
import { schemaAt, type SchemaAtCommit } from '../history/build-at.js';
import { UsageError, EXIT } from '../util/errors.js';
import { renameRequest } from './analysis-options.js';
import {
  adapterOptionValues,
  addAdapterOptions,
  addRepositoryOptions,
  applyConfig,
  parseSize,
  resolveAdapter,
  useColor,
  type CliIO,
} from './common.js';
import { alignRows, colorStyle, formatDiagnostic, plainStyle } from './format.js';

interface DiffOptions {
  adapter: string;
  path?: string[];
  json?: boolean;
  maxFileSize: string;
  color?: boolean;
  config?: string;
  renames?: string;
  renameThreshold?: string;
  [k: string]: unknown;
}

/** The changes from one schema to another (a rename heuristic when asked), without version numbers. */
export function diffSchemas(a: { tables: SchemaAtCommit['tables'] }, b: { tables: SchemaAtCommit['tables'] }, renames?: { mode: 'stated' | 'heuristic'; threshold: number }): { changes: Omit<Change, 'version'>[]; matches: RenameMatch[] } {
  const threshold = renames?.mode === 'heuristic' ? renames.threshold : 2;
  const { changes, matches } = detectRenames(
    [
      { index: 0, key: 'from', tables: a.tables },
      { index: 1, key: 'to', tables: b.tables },
    ],
    { threshold },
  );
  return { changes: changes.filter((c) => c.version === 1).map(({ version: _v, ...rest }) => rest), matches };
}

const label = (kind: string): string => kind.replace(/-/g, ' ');

export function registerDiff(program: Command, io: CliIO, adapters: SchemaAdapter[], setCode: (c: number) => void): void {
  const cmd = program
    .command('diff')
    .description('print the changes between the schemas at two refs of a repository')
    .argument('<repo>', 'path of a git repository')
    .argument('<refA>', 'the older commit, branch or tag')
    .argument('<refB>', 'the newer commit, branch or tag')
    .option('--json', 'print the changes as JSON')
    .option('--renames <mode>', 'stated (only renames the ORM code states) or heuristic (also by name similarity and column overlap)', 'stated')
    .option('--rename-threshold <x>', 'acceptance threshold of the rename heuristic, 0 to 1')
    .option('--no-color', 'no colours (NO_COLOR is respected too)');
  addRepositoryOptions(cmd);
  addAdapterOptions(cmd, adapters);
  cmd.action(async (repo: string, refA: string, refB: string, opts: DiffOptions) => {
    await applyConfig(cmd, repo, refB, opts as DiffOptions & { adapter: string });
    const renames = renameRequest(opts);
    const loaded = await resolveAdapter(opts.adapter, repo, refB, opts.path);
    const at = (ref: string): Promise<SchemaAtCommit> =>
      schemaAt({ repo, ref, adapter: loaded.adapter, paths: opts.path, options: adapterOptionValues(loaded.adapter, opts), maxFileBytes: parseSize(opts.maxFileSize) });
    const a = await at(refA);
    const b = await at(refB);
    const failed = [a.failed ? refA : '', b.failed ? refB : ''].filter(Boolean);
    const diagnostics = [...a.diagnostics.map((d) => ({ ref: refA, ...d })), ...b.diagnostics.map((d) => ({ ref: refB, ...d }))];
    if (failed.length > 0 && !opts.json) {
      for (const d of diagnostics) io.stderr.write(`${d.ref}: ${formatDiagnostic(d)}\n`);
      throw new UsageError(`the schema could not be built at ${failed.join(' and ')}`, EXIT.failure);
    }
    const { changes } = failed.length > 0 ? { changes: [] } : diffSchemas(a, b, renames);
    if (opts.json) {
      io.stdout.write(
        JSON.stringify({ from: { ref: refA, commit: a.commit, built: !a.failed }, to: { ref: refB, commit: b.commit, built: !b.failed }, adapter: loaded.adapter.name, changes, diagnostics }, null, 2) + '\n',
      );
      setCode(failed.length > 0 ? EXIT.failure : EXIT.ok);
      return;
    }
    const style = useColor(io, opts.color) ? colorStyle : plainStyle;
    const tables = [...new Set(changes.map((c) => c.table))];
    io.stdout.write(
      `changes from ${refA} (${a.commit.slice(0, 12)}) to ${refB} (${b.commit.slice(0, 12)}): ${changes.length} change${changes.length === 1 ? '' : 's'} in ${tables.length} table${tables.length === 1 ? '' : 's'}\n`,
    );
    for (const t of tables) {
      io.stdout.write(`\n${style.bold(t)}\n`);
      const rows = changes
        .filter((c) => c.table === t)
        .map((c) => [
          label(c.kind),
          c.column ?? (c.foreignKey !== undefined ? `(${c.foreignKey})` : ''),
          c.before !== undefined && c.after !== undefined ? `${c.before} -> ${c.after}` : (c.after ?? c.before ?? ''),
          c.basis === 'heuristic' ? style.dim(`heuristic: ${c.evidence}`) : '',
        ]);
      io.stdout.write(alignRows(rows, '  ').join('\n') + '\n');
    }
    for (const d of diagnostics) io.stdout.write(`${d.ref}: ${formatDiagnostic(d)}\n`);
    setCode(EXIT.ok);
  });
}
