// Writes docs/codebook.md: every field of the interchange JSON (from the descriptions in
// packages/core/schema/history.schema.json) and, when present, of the CSV files (from
// packages/core/schema/csv-fields.json). `node scripts/make-codebook.mjs --check` exits 1 when
// docs/codebook.md is out of date (the tests run it).
import { existsSync, readFileSync, writeFileSync, mkdirSync } from 'node:fs';

const root = new URL('../', import.meta.url);
const schema = JSON.parse(readFileSync(new URL('packages/core/schema/history.schema.json', root), 'utf8'));
const csvPath = new URL('packages/core/schema/csv-fields.json', root);
const csv = existsSync(csvPath) ? JSON.parse(readFileSync(csvPath, 'utf8')) : null;
const graphPath = new URL('packages/core/schema/graph-fields.json', root);
const graphFields = existsSync(graphPath) ? JSON.parse(readFileSync(graphPath, 'utf8')) : null;

const defs = schema.$defs ?? {};
const typeOf = (s) => {
  if (!s) return '';
  if (s.$ref) return `[${s.$ref.split('/').pop()}](#${s.$ref.split('/').pop().toLowerCase()})`;
  if (s.oneOf) return s.oneOf.map(typeOf).join(' or ');
  if (s.const !== undefined) return `\`${JSON.stringify(s.const)}\``;
  if (s.enum) return s.enum.map((v) => `\`${v}\``).join(', ');
  const t = Array.isArray(s.type) ? s.type.join(' or ') : s.type;
  if (t === 'array') return `list of ${typeOf(s.items)}`;
  if (t === 'object' && s.additionalProperties && typeof s.additionalProperties === 'object') return `map of ${typeOf(s.additionalProperties)}`;
  return t ?? '';
};
const esc = (s) => String(s ?? '').replace(/\|/g, '\\|').replace(/\n/g, ' ');

const out = ['# Codebook', '', 'Every field of the files schema-strata writes. Generated from the JSON Schema\n(`packages/core/schema/history.schema.json`), `csv-fields.json` and `graph-fields.json` by `node scripts/make-codebook.mjs`; do not edit by hand.', ''];
const table = (title, s) => {
  out.push(`## ${title}`, '', esc(s.description), '');
  if (!s.properties) return;
  const req = new Set(s.required ?? []);
  out.push('| field | type | required | meaning |', '|---|---|---|---|');
  for (const [k, v] of Object.entries(s.properties)) out.push(`| \`${k}\` | ${esc(typeOf(v))} | ${req.has(k) ? 'yes' : 'no'} | ${esc(v.description)} |`);
  out.push('');
};
out.push('# The interchange JSON file', '');
table('history (the document)', schema);
const nested = (name, s) => {
  for (const [k, v] of Object.entries(s.properties ?? {})) {
    if (v.type === 'object' && v.properties) table(`${name}.${k}`, v);
  }
};
nested('history', schema);
for (const [name, d] of Object.entries(defs)) {
  table(name, d);
  nested(name, d);
}
const studyPath = new URL('packages/core/schema/study.schema.json', root);
if (existsSync(studyPath)) {
  const study = JSON.parse(readFileSync(studyPath, 'utf8'));
  out.push('# The study file (study.json)', '', 'Generated from `packages/core/schema/study.schema.json`; statistics and options are those of the interchange file above.', '');
  table('study (the document)', study);
  for (const [name, d] of Object.entries(study.$defs ?? {})) {
    table(name, d);
    nested(name, d);
  }
}
if (csv) {
  out.push('# The CSV files', '', esc(csv.description ?? ''), '');
  for (const [file, spec] of Object.entries(csv.files ?? {})) {
    out.push(`## ${file}`, '', esc(spec.description), '', '| column | type | meaning |', '|---|---|---|');
    for (const c of spec.columns) out.push(`| \`${c.name}\` | ${esc(c.type)} | ${esc(c.description)} |`);
    out.push('');
  }
}
if (graphFields) {
  out.push('# The graph exports (GEXF, GraphML, DOT)', '', esc(graphFields.description), '');
  for (const [owner, title] of [['node', 'Node attributes'], ['edge', 'Edge attributes']]) {
    out.push(`## ${title}`, '', '| attribute | type | meaning |', '|---|---|---|');
    for (const a of graphFields[owner]) out.push(`| \`${a.name}\` | ${esc(a.type)} | ${esc(a.description)} |`);
    out.push('');
  }
}
const text = out.join('\n') + '\n';
const target = new URL('docs/codebook.md', root);
if (process.argv.includes('--check')) {
  const current = existsSync(target) ? readFileSync(target, 'utf8') : '';
  if (current !== text) {
    console.error('docs/codebook.md is out of date: run node scripts/make-codebook.mjs');
    process.exit(1);
  }
} else {
  mkdirSync(new URL('docs/', root), { recursive: true });
  writeFileSync(target, text);
}
