import { readFileSync } from 'node:fs';
import { basename, dirname, isAbsolute, resolve } from 'node:path';
import { UsageError, EXIT } from '../util/errors.js';

/** Values an adapter option may take in a corpus, as in a configuration file. */
export type OptionValue = string | boolean | string[];

/**
 * One repository of a study, as the corpus gives it (defaults filled in).
 *
 * ```json
 * { "label": "lending-desk", "repository": "repos/lending-desk", "adapter": "prisma",
 *   "paths": ["prisma/schema.prisma"], "ref": "main", "options": { "prisma-some-flag": true } }
 * ```
 */
export interface CorpusEntry {
  /** Name of the project in the study; its interchange file is `<label>.json`. */
  label: string;
  /** The repository as the corpus wrote it: a path (relative to the corpus file) or a clone URL. */
  repository: string;
  /** Where to read it: an absolute local path, or the clone URL. */
  location: string;
  /** True when `location` is a clone URL (cloned with full history into the cache directory). */
  remote: boolean;
  /** `auto` or an adapter name, package or file, as `extract --adapter`. */
  adapter: string;
  /** True when the corpus named the adapter (then the repository's own configuration cannot change it). */
  adapterGiven: boolean;
  /** `--path` entries, or undefined for detection. */
  paths?: string[];
  ref: string;
  since?: string;
  until?: string;
  /** Adapter options by flag name (without `--`). */
  options: Record<string, OptionValue>;
}

export interface Corpus {
  /** The corpus file as the user named it. */
  file: string;
  entries: CorpusEntry[];
}

/** File names a study writes into its output directory beside the projects' files. */
export const RESERVED_LABELS = ['study', 'tables', 'projects'] as const;

const LABEL_RE = /^[A-Za-z0-9][A-Za-z0-9._-]{0,99}$/;
const ENTRY_KEYS = ['label', 'repository', 'adapter', 'paths', 'ref', 'since', 'until', 'options', 'comment'];
const DEFAULT_KEYS = ['adapter', 'paths', 'ref', 'since', 'until', 'options', 'comment'];

/** A clone URL: `scheme://...` or the scp-like `user@host:path`. Anything else is a local path. */
export function isCloneUrl(s: string): boolean {
  return /^[a-z][a-z0-9+.-]*:\/\//i.test(s) || /^[\w.-]+@[\w.-]+:/.test(s);
}

/** The label a repository gets when the corpus gives none: the last part of its path or URL, without `.git`. */
export function labelOf(repository: string): string {
  const trimmed = repository.replace(/[/\\]+$/, '');
  const last = isCloneUrl(trimmed) ? (trimmed.split(/[/:]/).pop() ?? '') : basename(trimmed);
  const clean = last.replace(/\.git$/i, '').replace(/[^A-Za-z0-9._-]+/g, '-').replace(/^[._-]+/, '').slice(0, 100);
  return clean || 'repository';
}

function fail(file: string, where: string, message: string): never {
  throw new UsageError(`${file}: ${where}${where ? ': ' : ''}${message}`, EXIT.usage);
}

function stringList(file: string, where: string, v: unknown): string[] {
  if (!Array.isArray(v) || !v.every((x) => typeof x === 'string' && x.length > 0)) fail(file, where, 'must be a list of non-empty strings');
  return v as string[];
}

function optionsOf(file: string, where: string, v: unknown): Record<string, OptionValue> {
  if (!v || typeof v !== 'object' || Array.isArray(v)) fail(file, where, '"options" must be an object');
  const out: Record<string, OptionValue> = {};
  for (const [k, val] of Object.entries(v as Record<string, unknown>)) {
    const ok = typeof val === 'string' || typeof val === 'boolean' || (Array.isArray(val) && val.every((x) => typeof x === 'string'));
    if (!ok) fail(file, where, `option "${k}" must be a string, a boolean or a list of strings`);
    out[k.replace(/^--/, '')] = val as OptionValue;
  }
  return out;
}

interface RawSettings {
  adapter?: string;
  paths?: string[];
  ref?: string;
  since?: string;
  until?: string;
  options?: Record<string, OptionValue>;
}

function settingsOf(file: string, where: string, r: Record<string, unknown>, allowed: string[]): RawSettings {
  for (const k of Object.keys(r)) {
    if (!allowed.includes(k)) fail(file, where, `unknown key "${k}" (allowed: ${allowed.filter((a) => a !== 'comment').join(', ')})`);
  }
  const out: RawSettings = {};
  for (const k of ['adapter', 'ref', 'since', 'until'] as const) {
    if (r[k] === undefined) continue;
    if (typeof r[k] !== 'string' || r[k] === '') fail(file, where, `"${k}" must be a non-empty string`);
    out[k] = r[k] as string;
  }
  if (r.paths !== undefined) out.paths = stringList(file, `${where}${where ? ', ' : ''}"paths"`, r.paths);
  if (r.options !== undefined) out.options = optionsOf(file, where, r.options);
  return out;
}

/**
 * Parse a corpus. JSON: `{ "repositories": [...], "defaults": {...} }` or a bare list; each
 * repository is an object (`label`, `repository`, `adapter`, `paths`, `ref`, `since`, `until`,
 * `options`) or a string (its path or URL). Text: one path or URL per line; blank lines and
 * lines starting with `#` are skipped. Relative paths are relative to the corpus file.
 * Labels default to the repository's last path segment; given labels must be unique.
 */
export function parseCorpus(text: string, file: string): Corpus {
  const base = dirname(resolve(file));
  const trimmed = text.replace(/^\uFEFF/, '').trimStart();
  const raws: Array<{ where: string; label?: string; repository: string; settings: RawSettings }> = [];
  let defaults: RawSettings = {};
  if (trimmed.startsWith('{') || trimmed.startsWith('[')) {
    let json: unknown;
    try {
      json = JSON.parse(trimmed);
    } catch (e) {
      fail(file, '', `not valid JSON (${(e as Error).message})`);
    }
    let list: unknown;
    if (Array.isArray(json)) list = json;
    else {
      const o = json as Record<string, unknown>;
      for (const k of Object.keys(o)) {
        if (!['repositories', 'defaults', '$schema', 'comment'].includes(k)) fail(file, '', `unknown key "${k}" (allowed: repositories, defaults)`);
      }
      if (o.defaults !== undefined) {
        if (!o.defaults || typeof o.defaults !== 'object' || Array.isArray(o.defaults)) fail(file, '', '"defaults" must be an object');
        defaults = settingsOf(file, 'defaults', o.defaults as Record<string, unknown>, DEFAULT_KEYS);
      }
      list = o.repositories;
      if (!Array.isArray(list)) fail(file, '', '"repositories" must be a list');
    }
    (list as unknown[]).forEach((item, i) => {
      const where = `repository ${i + 1}`;
      if (typeof item === 'string') {
        if (!item.trim()) fail(file, where, 'an empty string');
        raws.push({ where, repository: item.trim(), settings: {} });
        return;
      }
      if (!item || typeof item !== 'object' || Array.isArray(item)) fail(file, where, 'must be an object or a string');
      const r = item as Record<string, unknown>;
      if (typeof r.repository !== 'string' || !r.repository.trim()) fail(file, where, '"repository" (a path or a clone URL) is required');
      if (r.label !== undefined && typeof r.label !== 'string') fail(file, where, '"label" must be a string');
      raws.push({ where, label: r.label as string | undefined, repository: r.repository.trim(), settings: settingsOf(file, where, r, ENTRY_KEYS) });
    });
  } else {
    text.split(/\r?\n/).forEach((line, i) => {
      const s = line.trim();
      if (!s || s.startsWith('#')) return;
      raws.push({ where: `line ${i + 1}`, repository: s, settings: {} });
    });
  }
  if (raws.length === 0) fail(file, '', 'lists no repository');

  const taken = new Set<string>();
  const given = new Set(raws.filter((r) => r.label !== undefined).map((r) => r.label!.toLowerCase()));
  const entries: CorpusEntry[] = [];
  for (const r of raws) {
    let label: string;
    if (r.label !== undefined) {
      if (!LABEL_RE.test(r.label)) fail(file, r.where, `label "${r.label}" must be letters, digits, '.', '_' or '-' (up to 100, starting with a letter or digit)`);
      if ((RESERVED_LABELS as readonly string[]).includes(r.label.toLowerCase())) fail(file, r.where, `label "${r.label}" is reserved for the study's own files (${RESERVED_LABELS.join(', ')})`);
      if (taken.has(r.label.toLowerCase())) fail(file, r.where, `label "${r.label}" is used twice (labels are compared without case)`);
      label = r.label;
    } else {
      const stem = labelOf(r.repository);
      label = stem;
      for (let n = 2; taken.has(label.toLowerCase()) || given.has(label.toLowerCase()) || (RESERVED_LABELS as readonly string[]).includes(label.toLowerCase()); n++) label = `${stem}-${n}`;
    }
    taken.add(label.toLowerCase());
    const s = { ...defaults, ...r.settings, options: { ...(defaults.options ?? {}), ...(r.settings.options ?? {}) } };
    const remote = isCloneUrl(r.repository);
    entries.push({
      label,
      repository: r.repository,
      location: remote ? r.repository : isAbsolute(r.repository) ? r.repository : resolve(base, r.repository),
      remote,
      adapter: s.adapter ?? 'auto',
      adapterGiven: s.adapter !== undefined,
      ...(s.paths ? { paths: s.paths } : {}),
      ref: s.ref ?? 'HEAD',
      ...(s.since ? { since: s.since } : {}),
      ...(s.until ? { until: s.until } : {}),
      options: s.options,
    });
  }
  return { file, entries };
}

/** Read a corpus file (see `parseCorpus`); an unreadable file is a one-line usage error. */
export function readCorpus(file: string): Corpus {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch {
    throw new UsageError(`${file}: cannot read the corpus file`, EXIT.usage);
  }
  return parseCorpus(text, file);
}
