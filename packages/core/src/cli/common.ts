import { Command, Option } from 'commander';
import type { AdapterOption, AdapterOptionValues, SchemaAdapter } from '../adapter/api.js';
import { installedAdapters, loadAdapter, type LoadedAdapter } from '../adapter/loader.js';
import { defaultCacheDir } from '../history/disk-cache.js';
import { detectAdapter } from '../history/detect.js';
import { openRepository } from '../git/repository.js';
import type { BlobReader } from '../git/blob-reader.js';
import { UsageError, EXIT } from '../util/errors.js';
import { CONFIG_FILE, readConfigFile, readRepositoryConfig, type RunConfig } from './run-config.js';
import { streamProgress, silentProgress, type Progress } from '../util/progress.js';

/** Output streams and environment of one CLI run (replaceable in tests). */
export interface CliIO {
  stdout: NodeJS.WritableStream & { isTTY?: boolean };
  stderr: NodeJS.WriteStream;
  env: NodeJS.ProcessEnv;
}

export function useColor(io: CliIO, flag?: boolean): boolean {
  if (flag === false) return false;
  if (io.env.NO_COLOR !== undefined && io.env.NO_COLOR !== '') return false;
  return !!io.stdout.isTTY;
}

export function progressFor(io: CliIO, quiet: boolean): Progress {
  return quiet ? silentProgress : streamProgress(io.stderr);
}

const collect = (v: string, prev: string[] | undefined): string[] => [...(prev ?? []), v];

const camel = (flag: string): string => flag.replace(/-([a-z0-9])/g, (_, c: string) => c.toUpperCase());

/** Parse a size such as `5MB`, `512k`, `1048576`. */
export function parseSize(v: string): number {
  const m = /^(\d+(?:\.\d+)?)\s*([kmg]i?b?|b)?$/i.exec(v.trim());
  if (!m) throw new UsageError(`--max-file-size ${v}: not a size (use e.g. 5MB, 512KB or a number of bytes)`);
  const n = Number(m[1]);
  const unit = (m[2] ?? 'b').toLowerCase()[0];
  const mult = unit === 'k' ? 1024 : unit === 'm' ? 1024 ** 2 : unit === 'g' ? 1024 ** 3 : 1;
  return Math.round(n * mult);
}

/** Options shared by every command that reads a repository. */
export function addRepositoryOptions(cmd: Command): Command {
  return cmd
    .option('--adapter <name>', 'ORM adapter: a short name (prisma, typeorm, knex), a package name, a file path, or auto', 'auto')
    .option('--path <path>', 'a schema file, directory or glob, relative to the repository root (overrides detection); repeat for several', collect)
    .option('--max-file-size <size>', 'files larger than this are not read (a diagnostic instead)', '5MB')
    .option('--cache-dir <dir>', `directory of the parse cache (default ${defaultCacheDir()})`)
    .option('--no-cache', 'neither read nor write the parse cache')
    .option('--config <file>', `a JSON file with adapter, paths and adapter options (default: ${CONFIG_FILE} at the repository root, read as data)`);
}

/**
 * Settle the options of a run: what the command line gave explicitly wins over `--config FILE`,
 * which wins over the repository's own configuration file.
 */
export async function applyConfig(
  cmd: Command,
  repo: string,
  ref: string,
  opts: { adapter: string; path?: string[]; config?: string; [k: string]: unknown },
  reader?: BlobReader,
): Promise<void> {
  const fromCli = (key: string): boolean => cmd.getOptionValueSource(key) === 'cli';
  const configs: RunConfig[] = [];
  if (opts.config) configs.push(readConfigFile(opts.config));
  const inRepo = await readRepositoryConfig(repo, ref, reader).catch((e) => {
    if (e instanceof UsageError) throw e;
    return undefined;
  });
  if (inRepo) configs.push(inRepo);
  for (const cfg of configs) {
    if (cfg.adapter && !fromCli('adapter') && opts.adapter === 'auto') opts.adapter = cfg.adapter;
    if (cfg.paths && !opts.path) opts.path = cfg.paths;
    for (const [flag, v] of Object.entries(cfg.options ?? {})) {
      const key = camel(flag);
      if (opts[key] === undefined) opts[key] = v;
    }
  }
}

/** Add the options each adapter declares, so that `--help` shows them and commander parses them. */
export function addAdapterOptions(cmd: Command, adapters: readonly SchemaAdapter[]): void {
  const seen = new Set<string>();
  for (const a of adapters) {
    for (const o of a.options ?? []) {
      if (seen.has(o.flag)) continue;
      seen.add(o.flag);
      cmd.addOption(adapterOption(a, o));
    }
  }
}

function adapterOption(a: SchemaAdapter, o: AdapterOption): Option {
  const label = `[${a.name}] ${o.description}`;
  let opt: Option;
  if (o.type === 'boolean') opt = new Option(`--${o.flag}`, label);
  else if (o.type === 'string[]') opt = new Option(`--${o.flag} <value>`, `${label} (repeatable)`).argParser(collect);
  else opt = new Option(`--${o.flag} <value>`, label);
  if (o.choices) opt = opt.choices(o.choices as string[]);
  return opt;
}

/** The values of an adapter's own options from parsed commander options, defaults filled in. */
export function adapterOptionValues(adapter: SchemaAdapter, opts: Record<string, unknown>): AdapterOptionValues {
  const out: Record<string, string | boolean | string[] | undefined> = {};
  for (const o of adapter.options ?? []) {
    const v = opts[camel(o.flag)];
    if (v !== undefined) out[o.flag] = v as string | boolean | string[];
    else if (o.default !== undefined) out[o.flag] = o.default;
  }
  return out;
}

/** The `--adapter` value in raw arguments (before commander runs), for loading adapter options. */
export function adapterArgument(argv: readonly string[]): string | undefined {
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i]!;
    if (a === '--adapter') return argv[i + 1];
    if (a.startsWith('--adapter=')) return a.slice('--adapter='.length);
  }
  return undefined;
}

/** Adapters whose options `--help` and parsing should know: the named one, or every installed one. */
export async function adaptersForOptions(argv: readonly string[]): Promise<SchemaAdapter[]> {
  const spec = adapterArgument(argv);
  try {
    if (spec && spec !== 'auto') return [(await loadAdapter(spec)).adapter];
    return (await installedAdapters()).map((l) => l.adapter);
  } catch {
    // a bad --adapter is reported when the command runs
    return [];
  }
}

/** Resolve `--adapter` for a repository: load the named adapter, or detect one at the ref. */
export async function resolveAdapter(spec: string, repo: string, ref: string, paths?: string[]): Promise<LoadedAdapter> {
  if (spec && spec !== 'auto') return loadAdapter(spec, repo);
  const adapters = await installedAdapters(repo);
  const info = await openRepository(repo, ref);
  if (paths && paths.length > 0 && adapters.length === 1) return adapters[0]!;
  return detectAdapter(repo, info.head, adapters);
}

export function cacheDirOf(opts: { cache?: boolean; cacheDir?: string }): string | undefined {
  if (opts.cache === false) return undefined;
  return opts.cacheDir ?? defaultCacheDir();
}

export { EXIT };
