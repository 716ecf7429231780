import type { Command } from 'commander';
import type { SchemaAdapter } from '../adapter/api.js';
import { schemaAt } from '../history/build-at.js';
import {
  adapterOptionValues,
  addAdapterOptions,
  addRepositoryOptions,
  applyConfig,
  parseSize,
  resolveAdapter,
  useColor,
  type CliIO,
  EXIT,
} from './common.js';
import { colorStyle, formatDiagnostic, formatSchema, plainStyle } from './format.js';

interface ShowOptions {
  adapter: string;
  ref: string;
  path?: string[];
  json?: boolean;
  maxFileSize: string;
  color?: boolean;
  config?: string;
  [k: string]: unknown;
}

export function registerShow(program: Command, io: CliIO, adapters: SchemaAdapter[], setCode: (c: number) => void): void {
  const cmd = program
    .command('show')
    .description('print the schema rebuilt at one commit (tables, columns with types, keys, foreign keys)')
    .argument('<repo>', 'path of a git repository')
    .option('--ref <ref>', 'commit, branch or tag', 'HEAD')
    .option('--json', 'print the snapshot as JSON')
    .option('--no-color', 'no colours (NO_COLOR is respected too)');
  addRepositoryOptions(cmd);
  addAdapterOptions(cmd, adapters);
  cmd.action(async (repo: string, opts: ShowOptions) => {
    await applyConfig(cmd, repo, opts.ref, opts);
    const loaded = await resolveAdapter(opts.adapter, repo, opts.ref, opts.path);
    const s = await schemaAt({
      repo, ref: opts.ref, adapter: loaded.adapter, paths: opts.path,
      options: adapterOptionValues(loaded.adapter, opts), maxFileBytes: parseSize(opts.maxFileSize),
    });
    if (opts.json) {
      io.stdout.write(JSON.stringify({ commit: s.commit, adapter: loaded.adapter.name, files: s.files, built: !s.failed, hash: s.hash || null, tables: s.tables, views: s.views, diagnostics: s.diagnostics }, null, 2) + '\n');
    } else {
      const style = useColor(io, opts.color) ? colorStyle : plainStyle;
      io.stdout.write(`schema at ${s.commit.slice(0, 12)} (${loaded.adapter.name}; ${s.files.join(', ')}): ${s.tables.length} tables${s.views.length ? `, ${s.views.length} views` : ''}\n\n`);
      if (!s.failed) io.stdout.write(formatSchema(s.tables, s.views, style));
      for (const d of s.diagnostics) io.stdout.write(formatDiagnostic(d) + '\n');
    }
    setCode(s.failed ? EXIT.failure : EXIT.ok);
  });
}
