import { createRequire } from 'node:module';
import type { Diagnostic } from '@schema-strata/core/extract';

/** The engine's data model (the subset of Prisma's DMMF datamodel that the adapter reads). */
export interface DmmfField {
  name: string;
  dbName?: string | null;
  kind: 'scalar' | 'enum' | 'object' | 'unsupported';
  isList: boolean;
  isRequired: boolean;
  isUnique: boolean;
  isId: boolean;
  hasDefaultValue: boolean;
  type: string;
  nativeType?: [string, string[]] | null;
  default?: unknown;
  isUpdatedAt?: boolean;
  relationName?: string;
  relationFromFields?: string[];
  relationToFields?: string[];
  relationOnDelete?: string;
  relationOnUpdate?: string;
}
export interface DmmfModel {
  name: string;
  dbName: string | null;
  schema?: string | null;
  fields: DmmfField[];
  primaryKey: { name: string | null; fields: string[] } | null;
  uniqueFields: string[][];
  uniqueIndexes: Array<{ name: string | null; fields: string[] }>;
}
export interface DmmfEnum {
  name: string;
  dbName?: string | null;
  values: Array<{ name: string; dbName: string | null }>;
}
export interface Datamodel {
  models: DmmfModel[];
  enums: DmmfEnum[];
}

interface SchemaWasm {
  get_datamodel(params: string): string;
}

let wasm: SchemaWasm | null = null;
function engine(): SchemaWasm {
  if (!wasm) {
    const require = createRequire(import.meta.url);
    wasm = require('@prisma/prisma-schema-wasm') as SchemaWasm;
  }
  return wasm;
}

/** Version of Prisma's schema engine the adapter parses with (the npm version of the wasm module). */
export function engineVersion(): string {
  const require = createRequire(import.meta.url);
  return (require('@prisma/prisma-schema-wasm/package.json') as { version: string }).version;
}

const BLOCK_OPEN = /^\s*(datasource|generator)\s+\w+\s*\{/;
const OBSOLETE_PROPERTY = /^(\s*)(url|directUrl|shadowDatabaseUrl)(\s*=)/;
const OLD_RELATION_MODE = /^(\s*)referentialIntegrity(\s*=)/;
const PREVIEW_FEATURES = /^(\s*previewFeatures\s*=\s*)\[/;

/** Net depth of brackets and parentheses on a line, outside strings and `//` comments. */
function depthChange(line: string): number {
  let depth = 0;
  let inString = false;
  for (let i = 0; i < line.length; i++) {
    const ch = line[i];
    if (inString) {
      if (ch === '\\') i++;
      else if (ch === '"') inString = false;
      continue;
    }
    if (ch === '"') inString = true;
    else if (ch === '/' && line[i + 1] === '/') break;
    else if (ch === '(' || ch === '[') depth++;
    else if (ch === ')' || ch === ']') depth--;
  }
  return depth;
}

/** Lines from `i` to the one that closes what line `i` opens (a value spread over several lines). */
function valueEnd(lines: string[], i: number): number {
  let depth = depthChange(lines[i]!);
  let j = i;
  while (depth > 0 && j + 1 < lines.length) depth += depthChange(lines[++j]!);
  return j;
}

export interface ModerniseOptions {
  /** Preview features to leave out of `previewFeatures` lists (names the current engine no longer knows). */
  dropPreviewFeatures?: ReadonlySet<string>;
}

/**
 * Make a schema written for an older Prisma acceptable to the current engine without changing
 * its meaning or its line numbers: connection-URL properties of the datasource (which the
 * current engine rejects and which say nothing about the schema) become blank, also when their
 * value spans several lines; the old name `referentialIntegrity` becomes `relationMode`; and
 * the preview features named in `dropPreviewFeatures` leave the `previewFeatures` lists
 * (preview features switch on client or engine features; a feature that the current engine
 * no longer knows gates no syntax it still parses).
 */
export function modernise(text: string, options: ModerniseOptions = {}): { text: string; rewritten: string[] } {
  const lines = text.split('\n');
  const rewritten: string[] = [];
  const drop = options.dropPreviewFeatures;
  let block: string | null = null;
  for (let i = 0; i < lines.length; i++) {
    const line = lines[i]!;
    if (!block) {
      block = BLOCK_OPEN.exec(line)?.[1] ?? null;
      continue;
    }
    if (/^\s*\}/.test(line)) {
      block = null;
      continue;
    }
    const m = block === 'datasource' ? OBSOLETE_PROPERTY.exec(line) : null;
    if (m) {
      const last = valueEnd(lines, i);
      for (let k = i; k <= last; k++) lines[k] = lines[k]!.endsWith('\r') ? ' '.repeat(lines[k]!.length - 1) + '\r' : ' '.repeat(lines[k]!.length);
      rewritten.push(m[2]!);
      i = last;
      continue;
    }
    if (block === 'datasource' && OLD_RELATION_MODE.test(line)) {
      lines[i] = line.replace(OLD_RELATION_MODE, '$1relationMode$2');
      rewritten.push('referentialIntegrity');
      continue;
    }
    const pf = drop && drop.size > 0 ? PREVIEW_FEATURES.exec(line) : null;
    if (pf) {
      const last = valueEnd(lines, i);
      const span = lines.slice(i, last + 1).join('\n');
      const open = span.indexOf('[', pf[1]!.length - 1);
      const close = span.lastIndexOf(']');
      if (close < open) continue;
      const names = [...span.slice(open + 1, close).matchAll(/"((?:[^"\\]|\\.)*)"/g)].map((x) => x[1]!);
      const kept = names.filter((n) => !drop!.has(n));
      if (kept.length === names.length) continue;
      rewritten.push(...names.filter((n) => drop!.has(n)).map((n) => `previewFeatures:${n}`));
      // the new list on the first line, the lines it spanned left empty, so that line numbers stay
      const rest = span.slice(close + 1).split('\n').pop()!;
      lines[i] = `${span.slice(0, open)}[${kept.map((n) => `"${n}"`).join(', ')}]${rest}`;
      for (let k = i + 1; k <= last; k++) lines[k] = lines[k]!.endsWith('\r') ? '\r' : '';
      i = last;
    }
  }
  return { text: lines.join('\n'), rewritten };
}

const UNKNOWN_PREVIEW_FEATURE = /^The preview feature "([^"]+)" is not known/;

/** Names of the preview features that the engine's diagnostics call unknown. */
export function unknownPreviewFeatures(diagnostics: readonly Diagnostic[]): Set<string> {
  const out = new Set<string>();
  for (const d of diagnostics) {
    const m = UNKNOWN_PREVIEW_FEATURE.exec(d.message);
    if (m) out.add(m[1]!);
  }
  return out;
}

// eslint-disable-next-line no-control-regex
const ANSI = /\u001b\[[0-9;]*m/g;

/** Turn the engine's error text into diagnostics with file, line and message, colour codes removed. */
export function engineDiagnostics(raw: string): Diagnostic[] {
  let message = raw;
  try {
    const parsed = JSON.parse(raw.replace(/^Error:\s*/, '')) as { message?: string };
    if (parsed.message) message = parsed.message;
  } catch {
    // not JSON: keep the text
  }
  message = message.replace(ANSI, '');
  const parts = message.split(/\n(?=error: )/).map((s) => s.trim()).filter((s) => s.startsWith('error:'));
  if (parts.length === 0) return [{ severity: 'error', code: 'prisma/parse-error', message: message.trim().split('\n')[0] ?? 'parse error' }];
  return parts.map((p) => {
    const head = p.split('\n')[0]!.replace(/^error:\s*/, '');
    const at = /-->\s+(.+?):(\d+)/.exec(p);
    const d: Diagnostic = { severity: 'error', code: 'prisma/parse-error', message: head };
    if (at) {
      d.file = at[1]!;
      d.line = Number(at[2]);
    }
    return d;
  });
}

export type ParseOutcome = { ok: true; datamodel: Datamodel } | { ok: false; diagnostics: Diagnostic[] };

/** Parse the files of one schema with Prisma's own engine (`get_datamodel`). */
export function parseWithEngine(files: Array<{ path: string; text: string }>): ParseOutcome {
  const params = JSON.stringify({ prismaSchema: files.map((f) => [f.path, f.text]) });
  try {
    const out = engine().get_datamodel(params);
    return { ok: true, datamodel: JSON.parse(out) as Datamodel };
  } catch (e) {
    return { ok: false, diagnostics: engineDiagnostics(String((e as Error)?.message ?? e)) };
  }
}
