import { createRequire } from 'node:module';
import type { Diagnostic } from '@schema-strata/core';

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

const DATASOURCE_OPEN = /^\s*datasource\s+\w+\s*\{/;
const OBSOLETE_PROPERTY = /^(\s*)(url|directUrl|shadowDatabaseUrl)(\s*=)/;
const OLD_RELATION_MODE = /^(\s*)referentialIntegrity(\s*=)/;

/**
 * Make a schema written for an older Prisma acceptable to the current engine without changing
 * its meaning or its line numbers: connection-URL properties of the datasource (which the
 * current engine rejects and which say nothing about the schema) become blank, and the old
 * name `referentialIntegrity` becomes `relationMode`.
 */
export function modernise(text: string): { text: string; rewritten: string[] } {
  const lines = text.split('\n');
  const rewritten: string[] = [];
  let inDatasource = false;
  for (let i = 0; i < lines.length; i++) {
    const line = lines[i]!;
    if (!inDatasource) {
      if (DATASOURCE_OPEN.test(line)) inDatasource = true;
      continue;
    }
    if (/^\s*\}/.test(line)) {
      inDatasource = false;
      continue;
    }
    const m = OBSOLETE_PROPERTY.exec(line);
    if (m) {
      lines[i] = ' '.repeat(line.length);
      rewritten.push(m[2]!);
      continue;
    }
    if (OLD_RELATION_MODE.test(line)) {
      lines[i] = line.replace(OLD_RELATION_MODE, '$1relationMode$2');
      rewritten.push('referentialIntegrity');
    }
  }
  return { text: lines.join('\n'), rewritten };
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
