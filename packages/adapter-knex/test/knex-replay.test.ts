// The replay's own rules where no database can serve as the reference: what it does with code it
// cannot decide statically (documented choices), the order option, the facts' form, and the
// forkable map under the fold.
import { describe, expect, it } from 'vitest';
import type { AssembleResult } from '@schema-strata/core';
import { KnexSession, knexOptions, naturalCompare, parseKnexSource, type KnexFacts } from '../src/index.js';
import { PMap } from '../src/knex-pmap.js';

function assemble(files: Record<string, string>, options: Record<string, string | string[]> = {}): Extract<AssembleResult, { snapshot: unknown }> {
  const input = Object.entries(files)
    .sort(([a], [b]) => (a < b ? -1 : 1))
    .map(([path, text]) => ({ path, blob: path, facts: (parseKnexSource(text) as { facts: KnexFacts }).facts }));
  return new KnexSession(knexOptions(options)).assemble({ files: input, missing: [] }) as Extract<AssembleResult, { snapshot: unknown }>;
}

describe('code the replay cannot decide', () => {
  it('takes the first clause of a switch on a value it cannot know, and says so', () => {
    const r = assemble({
      'migrations/001.js':
        "exports.up = (knex) => knex.schema.createTable('pages', (t) => {\n  switch (process.env.DB) {\n    case 'pg': t.text('body'); break;\n    default: t.string('body');\n  }\n});\nexports.down = () => {};\n",
    });
    expect(r.snapshot.tables[0]!.columns.map((c) => c.nativeType)).toEqual(['text']);
    expect(r.diagnostics.map((d) => `${d.code}@${d.line}`)).toEqual(['knex/condition-unknown@2']);
  });

  it('takes the first branch of a condition it cannot know only when a branch changes the schema', () => {
    const r = assemble({
      'migrations/001.js':
        "exports.up = async (knex) => {\n  if (process.env.SEED) await knex('x').insert({});\n  if (knex.client.config.client === 'pg') await knex.schema.createTable('a', (t) => { t.increments('id'); });\n};\nexports.down = () => {};\n",
    });
    expect(r.snapshot.tables.map((t) => t.name)).toEqual(['a']);
    expect(r.diagnostics.map((d) => `${d.code}@${d.line}`)).toEqual(['knex/condition-unknown@3']);
  });

  it('decides conditions on the client through a destructured client, an imported knex instance and a substring test', () => {
    const text =
      "const db = require('../db');\nexports.up = async (knex) => {\n  const { client } = knex;\n  await knex.schema.createTable('tools', (t) => { t.increments('id'); });\n" +
      "  if (client.dialect === 'sqlite3') await knex.schema.alterTable('tools', (t) => t.string('a'));\n" +
      "  if (knex.client.config.client.includes('sqlite')) await knex.schema.alterTable('tools', (t) => t.string('b'));\n" +
      "  if (db.client.driverName === 'better-sqlite3') await knex.schema.alterTable('tools', (t) => t.string('c'));\n" +
      "  const onMysql = knex.client.dialect === 'mysql' || knex.client.dialect === 'sqlite3';\n  if (!onMysql) return;\n" +
      "  await knex.schema.alterTable('tools', (t) => t.string('d'));\n};\nexports.down = () => {};\n";
    const run = (options: Record<string, string>) => {
      const r = assemble({ 'migrations/001.js': text }, options);
      return `${r.snapshot.tables[0]!.columns.map((c) => c.name).join(',')} ${r.diagnostics.map((d) => `${d.code}@${d.line}`).join(' ')}`.trim();
    };
    expect(run({ 'knex-client': 'better-sqlite3' })).toBe('id,a,b,c,d');
    expect(run({ 'knex-client': 'pg' })).toBe('id');
    // no client known: each first branch, and its diagnostic (the early return is reported: statements after it change the schema)
    expect(run({})).toBe('id,a,b,c knex/condition-unknown@5 knex/condition-unknown@6 knex/condition-unknown@7 knex/condition-unknown@9');
  });

  it('gives a new table the id of its name unless a renamed table keeps that id', () => {
    const r = assemble({
      'migrations/001.js': "exports.up = async (knex) => {\n  await knex.schema.createTable('items', (t) => { t.increments('id'); });\n  await knex.schema.renameTable('items', 'tools');\n  await knex.schema.createTable('items', (t) => { t.increments('id'); });\n};\nexports.down = () => {};\n",
    });
    expect(r.snapshot.tables.map((t) => `${t.id}=${t.name}`).sort()).toEqual(['items=tools', 'items~2=items']);
  });
});

describe('order, facts and the fold', () => {
  it('orders naturally as ICU numeric collation does for version-named migrations', () => {
    const names = ['2.5.1.js', '2.0.0.js', '2.10.0.js', '2.2.17.js', '2.2.3.js', '2.5.108.js', '2.5.12.js', '2.1.85.js'];
    const icu = new Intl.Collator('en', { numeric: true });
    expect([...names].sort(naturalCompare)).toEqual([...names].sort(icu.compare));
    const r = assemble(
      Object.fromEntries(names.map((n, i) => [`db/migrations/${n}`, `exports.up = (knex) => knex.schema.createTable('t${i}', (t) => { t.increments('id'); });\nexports.down = () => {};\n`])),
      { 'knex-order': 'natural' },
    );
    expect(r.counters).toMatchObject({ migrations: names.length });
  });

  it('keeps facts plain JSON that depend on the text only', () => {
    const text = "import { T } from './names';\nexport async function up(knex) { for (const c of ['a', 'b']) await knex.schema.table(T, (t) => t.string(c)); }\nexport async function down() {}\n";
    const a = parseKnexSource(text);
    const b = parseKnexSource(text);
    expect(JSON.parse(JSON.stringify(a))).toEqual(a);
    expect(a).toEqual(b);
  });

  it('forks a map without changing the original', () => {
    const a = new PMap<number>();
    for (let i = 0; i < 500; i++) a.set(`k${i}`, i);
    const b = new PMap(a);
    b.set('k1', -1);
    b.delete('k2');
    b.set('new', 7);
    expect([a.get('k1'), a.has('k2'), a.has('new'), a.size]).toEqual([1, true, false, 500]);
    expect([b.get('k1'), b.has('k2'), b.get('new'), b.size]).toEqual([-1, false, 7, 500]);
    expect([...b.values()].length).toBe(500);
  });
});
