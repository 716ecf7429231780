// The fold across versions: a version that only appends migrations replays only those, an edit to
// an old migration refolds from it on, and the result is always the one a fresh fold gives
// (checked against core's schemaAt, which builds each commit on its own). Output is the same
// bytes with and without the disk cache; the CLI takes the adapter's options from the
// repository's schema-strata.config.json.
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { extractHistory, main, schemaAt, serialiseDocument, toDocument, type History } from '@schema-strata/core';
import knexAdapter, { KnexSession, knexOptions, parseKnexSource, type KnexFacts } from '@schema-strata/adapter-knex';
import { fixtureRepository } from './fixture.js';

const OPTIONS = { 'knex-init': ['db/base-schema.js'], 'knex-environment': 'development' };

let repo: string;
let commitIds: string[];
let history: History;

beforeAll(async () => {
  const r = await fixtureRepository('coop');
  repo = r.dir;
  commitIds = r.commitIds;
  history = await extractHistory({ repo, adapter: knexAdapter, adapterOptions: OPTIONS });
});

const parsed = (text: string): KnexFacts => (parseKnexSource(text) as { facts: KnexFacts }).facts;
/** A migration as core hands it to the session: its path, a blob id standing for its text, its facts. */
const migration = (name: string, body: string) => ({ path: `migrations/${name}`, blob: `${name}:${body}`, facts: parsed(`exports.up = async (knex) => { ${body} };\n`) });
type Input = ReturnType<typeof migration>;
/** What a new session gives for these files (the result every session must give). */
const fresh = (files: Input[]) => new KnexSession(knexOptions({})).assemble({ files, missing: [] });

describe('the fold across versions', () => {
  it('replays only the appended migration, and refolds from an edited one', () => {
    const m = migration;
    const a = m('001.js', "await knex.schema.createTable('a', (t) => { t.increments('id'); t.string('x', 10); });");
    const b = m('002.js', "await knex.schema.alterTable('a', (t) => { t.string('y'); });");
    const c = m('003.js', "await knex.schema.createTable('c', (t) => { t.increments('id'); t.integer('a_id').references('a.id'); });");
    const a2 = m('001.js', "await knex.schema.createTable('a', (t) => { t.increments('id'); t.string('x', 20); });");
    const session = new KnexSession(knexOptions({}));
    const runs: Array<[Input[], number]> = [
      [[a, b], 2],
      [[a, b, c], 1],
      [[a, b, c], 0],
      [[a2, b, c], 3],
      [[a2, b], 0],
      [[a2, c], 1],
    ];
    for (const [files, replayed] of runs) {
      const before = session.replayed;
      const r = session.assemble({ files, missing: [] });
      expect(session.replayed - before, files.map((f) => f.blob).join(' ')).toBe(replayed);
      expect(r).toEqual(fresh(files));
    }
  });

  it('after an edit, takes over the later migrations that did not read what the edit changed', () => {
    const m = migration;
    const a = m('001.js', "await knex.schema.createTable('a', (t) => { t.increments('id'); t.string('x', 10); });");
    const d = m('002.js', "await knex.schema.createTable('d', (t) => { t.increments('id'); t.text('note'); });");
    const b = m('003.js', "await knex.schema.alterTable('a', (t) => { t.string('y'); });");
    const e = m('004.js', "await knex.schema.alterTable('d', (t) => { t.integer('n').notNullable().defaultTo(3); });");
    const a2 = m('001.js', "await knex.schema.createTable('a', (t) => { t.increments('id'); t.string('x', 20); });");
    const r = m('005.js', "await knex.schema.alterTable('d', (t) => { t.renameColumn('note', 'remark'); });");
    const session = new KnexSession(knexOptions({}));
    // [files, replayed, taken over]
    const runs: Array<[Input[], number, number]> = [
      [[a, d, b, e], 4, 0],
      [[a2, d, b, e], 2, 2], // a and b replayed (b alters a); d and e did not look at a
      [[a2, b, e], 1, 1], // d gone: b (reads a) is taken over, e (reads d, now missing) replayed
      [[a2, d, b, e, r], 3, 1], // d back in the middle, r new: d, e and r replayed, b taken over
      [[a, d, b, e, r], 3, 2], // a, and b that reads it, replayed; r renames a column, which scans every table
    ];
    for (const [files, replayed, taken] of runs) {
      const before = [session.replayed, session.carriedOver];
      const got = session.assemble({ files, missing: [] });
      expect([session.replayed - before[0]!, session.carriedOver - before[1]!], files.map((f) => f.blob).join(' ')).toEqual([replayed, taken]);
      expect(got).toEqual(fresh(files));
    }
  });

  it('extends the last plan when migrations are only appended, and plans anew otherwise', () => {
    const knexfile = { path: 'knexfile.js', blob: 'k', facts: parsed("module.exports = { client: 'pg', migrations: { directory: 'migrations' } };\n") };
    const m = migration;
    const a = m('001.js', "await knex.schema.createTable('a', (t) => { t.increments('id'); });");
    const b = m('002.js', "await knex.schema.createTable('b', (t) => { t.increments('id'); });");
    const c = m('003.js', "await knex.schema.alterTable('a', (t) => { t.string('label'); });");
    const early = m('0015.js', "await knex.schema.createTable('e', (t) => { t.increments('id'); });");
    const session = new KnexSession(knexOptions({}));
    // [files, extended]
    const runs: Array<[Input[], boolean]> = [
      [[knexfile, a], false],
      [[knexfile, a, b], true],
      [[knexfile, a, b, c], true],
      [[knexfile, a, b], false], // the last migration removed
      [[knexfile, a, b], true], // the same files again
      [[early, knexfile, a, b].sort((x, y) => (x.path < y.path ? -1 : 1)), false], // Knex orders it before 002
      [[knexfile, a, b], false],
    ];
    for (const [files, extended] of runs) {
      const before = session.plansExtended;
      const got = session.assemble({ files, missing: [] });
      expect(session.plansExtended - before, files.map((f) => f.path).join(' ')).toBe(extended ? 1 : 0);
      expect(got).toEqual(fresh(files));
    }
  });

  it('gives at every commit the schema that a fresh build of that commit gives (core schemaAt)', async () => {
    for (const [i, commit] of commitIds.entries()) {
      const v = history.versions.find((x) => x.commit === commit)!;
      const at = await schemaAt({ repo, ref: commit, adapter: knexAdapter, options: OPTIONS });
      expect(at.meaningHash, `commit ${i}`).toBe(history.snapshots.get(v.snapshot!)!.meaningHash);
    }
  });

  it('parses every distinct blob once and assembles every version once', () => {
    expect(history.stats.filesParsed).toBeLessThanOrEqual(history.stats.blobsRead);
    expect(history.stats.assembled).toBe(history.versions.length);
  });

  it('writes the same bytes with the disk cache, cold and warm', async () => {
    const cacheDir = mkdtempSync(join(tmpdir(), 'strata-knex-cache-'));
    const doc = (h: History) => serialiseDocument(toDocument(h, { name: 'test', version: '0' }));
    const plain = doc(history);
    const cold = await extractHistory({ repo, adapter: knexAdapter, adapterOptions: OPTIONS, cacheDir });
    const warm = await extractHistory({ repo, adapter: knexAdapter, adapterOptions: OPTIONS, cacheDir });
    expect(doc(cold)).toBe(plain);
    expect(doc(warm)).toBe(plain);
    expect(warm.stats.filesParsed).toBe(0);
    expect(warm.stats.assembleCacheHits).toBe(warm.versions.length);
  });

  it('records a stated table rename and a stated column rename as renames', () => {
    const kinds = history.changes.map((c) => `${c.kind}:${c.table}${c.column ? '.' + c.column : ''}`);
    expect(kinds).toContain('table-renamed:notices');
    expect(kinds).toContain('column-renamed:members.display_name');
    expect(kinds).toContain('column-type-changed:repairs.cost');
    expect(kinds).toContain('foreign-key-removed:tools');
    expect(kinds.filter((k) => k.startsWith('table-removed:notices'))).toEqual([]);
  });
});

describe('the CLI with the repository configuration', () => {
  it('reads --knex-init and --knex-environment from schema-strata.config.json', async () => {
    const out = join(mkdtempSync(join(tmpdir(), 'strata-knex-cli-')), 'history.json');
    const err: string[] = [];
    const code = await main(['extract', repo, '--adapter', 'knex', '-o', out, '--quiet', '--no-cache'], {
      stdout: { write: () => true }, stderr: { write: (s: string) => err.push(s) }, env: {},
    } as never);
    expect(code, err.join('')).toBe(0);
    const doc = JSON.parse(readFileSync(out, 'utf8'));
    expect(doc.source.options).toMatchObject({ 'knex-init': ['db/base-schema.js'], 'knex-environment': 'development' });
    const first = doc.snapshots[doc.versions[0].snapshot].tables.map((h: string) => doc.tables[h].name).sort();
    expect(first).toEqual(['members', 'settings', 'tools']);
    expect(doc.versions[0].files.map((f: { path: string }) => f.path)).toContain('db/base-schema.js');
  });

  it('shows its options in extract --help', async () => {
    const out: string[] = [];
    await main(['extract', '--help', '--adapter', 'knex'], { stdout: { write: (s: string) => out.push(s) }, stderr: { write: () => true }, env: {} } as never);
    const help = out.join('');
    for (const flag of ['--knex-init', '--knex-order', '--knex-environment', '--knex-client']) expect(help).toContain(flag);
  });
});
