import { existsSync, realpathSync } from 'node:fs';
import { createRequire } from 'node:module';
import { isAbsolute, join, relative, resolve as resolvePath } from 'node:path';
import { pathToFileURL } from 'node:url';
import type { AdapterModule, SchemaAdapter } from './api.js';
import { UsageError, EXIT } from '../util/errors.js';

/** Short names of the adapters of this project, tried by `--adapter auto`. */
export const KNOWN_ADAPTERS = ['prisma', 'typeorm', 'knex'] as const;

export interface LoadedAdapter {
  adapter: SchemaAdapter;
  /** The package name or file the adapter came from. */
  source: string;
}

function looksLikePath(spec: string): boolean {
  return spec.startsWith('.') || isAbsolute(spec) || /\.(m?js|cjs)$/.test(spec);
}

function packageNameOf(spec: string): string {
  if (/^[a-z0-9][a-z0-9._-]*$/.test(spec) && !spec.includes('/')) return `@schema-strata/adapter-${spec}`;
  return spec;
}

function isInside(child: string, parent: string): boolean {
  const rel = relative(parent, child);
  return rel === '' || (!rel.startsWith('..') && !isAbsolute(rel));
}

function safeRealpath(p: string): string {
  try {
    return realpathSync(p);
  } catch {
    return resolvePath(p);
  }
}

const extraBases: string[] = [];

/**
 * Add a place adapters are resolved from (a file URL or path inside a package): a package that
 * bundles schema-strata with adapters calls it with its own `import.meta.url`, so that its
 * adapters are found whatever the package manager's layout.
 */
export function registerAdapterBase(base: string): void {
  if (!extraBases.includes(base)) extraBases.push(base);
}

/**
 * Where a package is resolved from: the user's working project first (the current directory),
 * then the registered bases, then schema-strata's own installation. A module inside the
 * analysed repository is never loaded: its code is data to us.
 */
function resolvePackage(name: string, analysedRepo?: string): string | undefined {
  const bases = [join(process.cwd(), 'noop.js'), ...extraBases, import.meta.url];
  const repoReal = analysedRepo ? safeRealpath(analysedRepo) : undefined;
  for (const base of bases) {
    try {
      const req = createRequire(base);
      const found = req.resolve(name);
      if (repoReal && isInside(safeRealpath(found), repoReal)) continue;
      return found;
    } catch {
      // not resolvable from this base
    }
  }
  return undefined;
}

function checkAdapter(mod: AdapterModule, source: string): SchemaAdapter {
  const a = (mod.default ?? mod.adapter) as SchemaAdapter | undefined;
  const problems: string[] = [];
  if (!a || typeof a !== 'object') problems.push('exports no adapter (default export or `adapter`)');
  else {
    if (typeof a.name !== 'string' || !a.name) problems.push('has no name');
    if (typeof a.version !== 'string' || !a.version) problems.push('has no version');
    if (!Array.isArray(a.watch)) problems.push('has no watch list');
    if (typeof a.locate !== 'function') problems.push('has no locate()');
    if (typeof a.assemble !== 'function') problems.push('has no assemble()');
  }
  if (problems.length > 0) throw new UsageError(`adapter ${source} ${problems.join(', ')}`, EXIT.usage);
  return a!;
}

/**
 * Load an adapter by short name (`prisma` resolves `@schema-strata/adapter-prisma`), by package
 * name, or by file path (for third-party adapters).
 */
export async function loadAdapter(spec: string, analysedRepo?: string): Promise<LoadedAdapter> {
  if (looksLikePath(spec)) {
    const file = resolvePath(spec);
    if (!existsSync(file)) throw new UsageError(`adapter file ${spec} not found`, EXIT.usage);
    if (analysedRepo && isInside(safeRealpath(file), safeRealpath(analysedRepo))) {
      throw new UsageError(`refusing to load adapter ${spec} from inside the analysed repository`, EXIT.usage);
    }
    const mod = (await import(pathToFileURL(file).href)) as AdapterModule;
    return { adapter: checkAdapter(mod, spec), source: spec };
  }
  const name = packageNameOf(spec);
  const found = resolvePackage(name, analysedRepo);
  if (!found) {
    throw new UsageError(
      `adapter '${spec}' is not installed (looked for package ${name} in the current project and in schema-strata's installation)`,
      EXIT.usage,
    );
  }
  const mod = (await import(pathToFileURL(found).href)) as AdapterModule;
  return { adapter: checkAdapter(mod, name), source: name };
}

/** The known adapters that are installed, loaded. */
export async function installedAdapters(analysedRepo?: string): Promise<LoadedAdapter[]> {
  const out: LoadedAdapter[] = [];
  for (const short of KNOWN_ADAPTERS) {
    const name = packageNameOf(short);
    if (!resolvePackage(name, analysedRepo)) continue;
    out.push(await loadAdapter(short, analysedRepo));
  }
  return out;
}
