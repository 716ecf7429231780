import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import Ajv2020 from 'ajv/dist/2020.js';
import addFormats from 'ajv-formats';
import { ROOT } from './repo.js';

const schema = JSON.parse(readFileSync(join(ROOT, 'packages', 'core', 'schema', 'history.schema.json'), 'utf8'));
// ajv's own JSON Schema 2020-12 validator (a reference implementation), strict about the schema itself
const ajv = new (Ajv2020 as unknown as typeof Ajv2020.default)({ allErrors: true, strict: true });
(addFormats as unknown as typeof addFormats.default)(ajv);
const validateFn = ajv.compile(schema);

/** Validate an interchange document against packages/core/schema/history.schema.json; returns the errors as text. */
export function schemaErrors(doc: unknown): string[] {
  if (validateFn(doc)) return [];
  return (validateFn.errors ?? []).map((e) => `${e.instancePath} ${e.message}`);
}
