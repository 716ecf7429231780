import type { Diagnostic } from '../model/types.js';

/** A value given on the command line to a setting the analysed code reads at run time. */
export type AssumedValue = string | number | boolean | null;

const ENTRY = /^\s*([A-Za-z_$][\w$]*(?:\.[\w$]+)*)\s*=(.*)$/s;

/**
 * Entries `NAME=VALUE` of a repeatable adapter option (`--knex-assume`, `--typeorm-assume`):
 * `NAME` a dotted path (`process.env.DB_CLIENT`, `APP.config.db.type`), `VALUE` a JSON scalar
 * (a number, true, false, null, a quoted string), else the text as it stands; under
 * `process.env` always the text, as Node gives it. A malformed entry is an error diagnostic of
 * the code given, and is left out.
 */
export function readAssumptions(raw: unknown, flag: string, code: string): { values: Map<string, AssumedValue>; diagnostics: Diagnostic[] } {
  const values = new Map<string, AssumedValue>();
  const diagnostics: Diagnostic[] = [];
  const list = Array.isArray(raw) ? raw : typeof raw === 'string' && raw ? [raw] : [];
  for (const entry of list) {
    const m = typeof entry === 'string' ? ENTRY.exec(entry) : null;
    if (!m) {
      diagnostics.push({
        severity: 'error', code,
        message: `--${flag} ${String(entry)}: expected NAME=VALUE, NAME a dotted path such as process.env.DB_CLIENT or APP.config.db.type`,
      });
      continue;
    }
    const path = m[1]!;
    const text = m[2]!.trim();
    const json = path.startsWith('process.env.') ? undefined : jsonScalar(text);
    values.set(path, json === undefined ? text : json);
  }
  return { values, diagnostics };
}

/** A JSON scalar's value (a number, true, false, null, a quoted string), else undefined. */
function jsonScalar(text: string): AssumedValue | undefined {
  try {
    const v: unknown = JSON.parse(text);
    return v === null || typeof v === 'string' || typeof v === 'number' || typeof v === 'boolean' ? v : undefined;
  } catch {
    return undefined;
  }
}
