// `--path DIR` names a migration directory: Knex reads that directory's own files, not its
// subdirectories (its file-system migration source lists each directory with readdir). Checked
// against Knex 3 running the same tree on better-sqlite3: a migration kept in a subdirectory
// (an archive of old ones) is not run, and the replay with `--path migrations` leaves it out too;
// a glob or a file entry that names it brings it in.
import { afterAll, describe, expect, it } from 'vitest';
import { extractHistory, schemaAt, type History, type ScriptedCommit } from '@schema-strata/core';
import knexAdapter from '@schema-strata/adapter-knex';
import { day, makeRepo, tempDir } from '../helpers/repo.js';
import { runKnex } from './oracle.js';
import { fromDatabase, fromReplay } from './compare.js';

const tmp = tempDir();
afterAll(() => tmp.cleanup());

const KNEXFILE = "module.exports = { client: 'better-sqlite3', useNullAsDefault: true, migrations: { directory: './migrations' } };\n";
const create = (table: string, extra = '') =>
  `exports.up = (knex) => knex.schema.createTable('${table}', (t) => { t.increments('id'); t.string('label', 40);${extra} });\nexports.down = () => {};\n`;

const FILES: Record<string, string> = {
  'knexfile.js': KNEXFILE,
  'migrations/001_members.js': create('members', " t.string('email').unique();"),
  'migrations/002_tools.js': create('tools', " t.integer('owner_id').references('id').inTable('members');"),
  // an old migration kept in a subdirectory: Knex does not run it
  'migrations/archive/000_old_tools.js': create('old_tools'),
};

const lastTables = (h: History) => h.snapshots.get(h.versions[h.versions.length - 1]!.snapshot!)!.tables.map((t) => t.table);

describe('--path with a migration directory', () => {
  it("replays the directory's own migrations, as Knex runs them", async () => {
    const oracle = await runKnex(new Map(Object.entries(FILES)), { engine: 'sqlite', environment: 'development' });
    expect(oracle.migrations).toEqual(['001_members.js', '002_tools.js']);
    const commits: ScriptedCommit[] = [{ date: day(0), message: 'members and tools, an archive of old migrations', files: FILES }];
    const repo = await makeRepo(tmp.dir, 'path-dir', commits);
    const options = { 'knex-client': 'sqlite' };
    const h = await extractHistory({ repo, adapter: knexAdapter, paths: ['migrations'], adapterOptions: options });
    expect(fromReplay(lastTables(h), 'sqlite')).toEqual(fromDatabase(oracle.final, 'sqlite'));
    expect(h.versions.at(-1)!.counters).toMatchObject({ migrations: 2 });
    // the same at one commit (show, diff)
    const at = await schemaAt({ repo, ref: 'HEAD', adapter: knexAdapter, paths: ['migrations'], options });
    expect(at.tables.map((t) => t.name).sort()).toEqual(['members', 'tools']);
    // a glob, or the file itself, names the archived migration: then it is replayed
    const glob = await extractHistory({ repo, adapter: knexAdapter, paths: ['migrations/**/*.js'], adapterOptions: options });
    expect(lastTables(glob).map((t) => t.name).sort()).toEqual(['members', 'old_tools', 'tools']);
    const named = await extractHistory({ repo, adapter: knexAdapter, paths: ['migrations', 'migrations/archive/000_old_tools.js'], adapterOptions: options });
    expect(lastTables(named).map((t) => t.name).sort()).toEqual(['members', 'old_tools', 'tools']);
  }, 60_000);
});
