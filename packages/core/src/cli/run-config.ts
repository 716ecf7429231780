import { readFileSync } from 'node:fs';
import type { BlobReader } from '../git/blob-reader.js';
import { runGit } from '../git/run-git.js';
import { KNOWN_ADAPTERS } from '../adapter/loader.js';
import { UsageError, EXIT } from '../util/errors.js';

/** Name of the configuration file read from the root of the analysed repository (as data). */
export const CONFIG_FILE = 'schema-strata.config.json';

/** What a configuration file may set: the adapter, the paths and adapter options. */
export interface RunConfig {
  adapter?: string;
  paths?: string[];
  options?: Record<string, string | boolean | string[]>;
  /** Where it was read from, for messages. */
  from?: string;
}

function validate(raw: unknown, from: string): RunConfig {
  if (!raw || typeof raw !== 'object' || Array.isArray(raw)) throw new UsageError(`${from}: not a JSON object`, EXIT.usage);
  const r = raw as Record<string, unknown>;
  const out: RunConfig = { from };
  for (const k of Object.keys(r)) {
    if (!['adapter', 'paths', 'options', '$schema', 'comment'].includes(k)) throw new UsageError(`${from}: unknown key "${k}" (allowed: adapter, paths, options)`, EXIT.usage);
  }
  if (r.adapter !== undefined) {
    if (typeof r.adapter !== 'string') throw new UsageError(`${from}: "adapter" must be a string`, EXIT.usage);
    out.adapter = r.adapter;
  }
  if (r.paths !== undefined) {
    if (!Array.isArray(r.paths) || !r.paths.every((p) => typeof p === 'string')) throw new UsageError(`${from}: "paths" must be a list of strings`, EXIT.usage);
    out.paths = r.paths as string[];
  }
  if (r.options !== undefined) {
    if (!r.options || typeof r.options !== 'object' || Array.isArray(r.options)) throw new UsageError(`${from}: "options" must be an object`, EXIT.usage);
    const opts: Record<string, string | boolean | string[]> = {};
    for (const [k, v] of Object.entries(r.options as Record<string, unknown>)) {
      const flag = k.replace(/^--/, '');
      if (typeof v === 'string' || typeof v === 'boolean' || (Array.isArray(v) && v.every((x) => typeof x === 'string'))) opts[flag] = v as string | boolean | string[];
      else throw new UsageError(`${from}: option "${k}" must be a string, a boolean or a list of strings`, EXIT.usage);
    }
    out.options = opts;
  }
  return out;
}

/** Read `--config FILE` (a file of the user's). */
export function readConfigFile(path: string): RunConfig {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch {
    throw new UsageError(`--config ${path}: cannot read the file`, EXIT.usage);
  }
  try {
    return validate(JSON.parse(text), path);
  } catch (e) {
    if (e instanceof UsageError) throw e;
    throw new UsageError(`--config ${path}: not valid JSON (${(e as Error).message})`, EXIT.usage);
  }
}

/**
 * Read the configuration file at the root of the analysed repository, at `ref`, as data (one
 * `git cat-file` process, or through the run's blob reader when given). It may name only one of the known adapters by short name: a
 * configuration inside the analysed repository cannot make us load code.
 */
export async function readRepositoryConfig(repo: string, ref: string, reader?: BlobReader): Promise<RunConfig | undefined> {
  const from = `${CONFIG_FILE} (in the repository at ${ref})`;
  let text: string;
  if (reader) {
    // through the run's own `cat-file` process (one git process fewer)
    const got = await reader.read(`${ref}:${CONFIG_FILE}`);
    if (got.kind === 'missing') return undefined;
    if (got.kind !== 'text') throw new UsageError(`${from}: not a JSON text file (${got.kind === 'binary' ? 'binary' : `${got.size} bytes, over the file-size limit`})`, EXIT.usage);
    reader.forget(`${ref}:${CONFIG_FILE}`);
    text = got.text;
  } else {
    const r = await runGit(repo, ['cat-file', 'blob', `${ref}:${CONFIG_FILE}`]);
    if (r.code !== 0) return undefined;
    text = r.stdout;
  }
  let cfg: RunConfig;
  try {
    cfg = validate(JSON.parse(text), from);
  } catch (e) {
    if (e instanceof UsageError) throw e;
    throw new UsageError(`${from}: not valid JSON (${(e as Error).message})`, EXIT.usage);
  }
  if (cfg.adapter && cfg.adapter !== 'auto' && !(KNOWN_ADAPTERS as readonly string[]).includes(cfg.adapter)) {
    throw new UsageError(`${from} names adapter "${cfg.adapter}"; a repository's own configuration may only name ${KNOWN_ADAPTERS.join(', ')} or auto`, EXIT.usage);
  }
  return cfg;
}
