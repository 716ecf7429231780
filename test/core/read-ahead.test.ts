// The locate steps of the Knex and TypeORM adapters ask core to read ahead the files that the next
// commits of the walk add or change (TreeView.walk.readAhead), so that git reads them while the
// walk goes on. It is a hint only: checked against the same adapters given walks without it, byte
// for byte, over histories that add, edit, delete and rename the files it reads ahead, and with a
// revision window; and the count of reads asked ahead shows that the hint was taken. Texts a
// locate step read but did not locate are dropped after it (counted), with the same output.
import { afterAll, describe, expect, it } from 'vitest';
import { extractHistory, serialiseDocument, toDocument, GENERATOR, type ExtractRequest, type SchemaAdapter, type ScriptedCommit } from '@schema-strata/core';
import knexAdapter from '@schema-strata/adapter-knex';
import typeormAdapter from '@schema-strata/adapter-typeorm';
import { day, git, makeRepo, tempDir } from '../helpers/repo.js';
import { knexMigration as mig, knexSteps, typeormSteps } from '../helpers/sources.js';

const tmp = tempDir();
afterAll(() => tmp.cleanup());

/** The adapter with every walk stripped of its read-ahead. */
function withoutReadAhead(adapter: SchemaAdapter): SchemaAdapter {
  return {
    ...adapter,
    locate: (tree, req) => {
      if (!tree.walk) return adapter.locate(tree, req);
      const { readAhead: _r, ...walk } = tree.walk;
      return adapter.locate(Object.assign(Object.create(tree) as typeof tree, { walk }), req);
    },
  };
}

const doc = async (req: ExtractRequest): Promise<string> => serialiseDocument(toDocument(await extractHistory(req), GENERATOR));

describe('reading ahead during the walk', () => {
  it('gives the bytes of a walk without it (Knex: appended, edited, deleted and renamed migrations)', async () => {
    const files = knexSteps(150, 't', (i, step) => {
      if (i % 31 === 0) step['src/app.js'] = `exports.v = ${i};\n`;
    });
    const commits: ScriptedCommit[] = files.map((f, i) => ({ date: day(i), message: `step ${i}`, files: f }));
    // a migration renamed (its place in the order kept)
    commits.push({ date: day(files.length), message: 'rename', files: { 'db/migrations/010_t10.js': null, 'db/migrations/010_t10_renamed.js': mig('t10') } });
    const repo = await makeRepo(tmp.dir, 'knex', commits);
    const h = await extractHistory({ repo, adapter: knexAdapter });
    expect(h.stats.blobsReadAhead).toBeGreaterThan(100);
    expect(serialiseDocument(toDocument(h, GENERATOR))).toBe(await doc({ repo, adapter: withoutReadAhead(knexAdapter) }));
    const mid = git(repo, 'rev-list', '--first-parent', '--skip=60', '-1', 'HEAD').trim();
    expect(await doc({ repo, adapter: knexAdapter, since: mid })).toBe(await doc({ repo, adapter: withoutReadAhead(knexAdapter), since: mid }));
  }, 120_000);

  it('gives the bytes of a walk without it (TypeORM: entity files edited, added and removed, other sources changed)', async () => {
    const files = typeormSteps();
    const commits: ScriptedCommit[] = files.map((f, i) => ({ date: day(i), message: `step ${i}`, files: f }));
    const repo = await makeRepo(tmp.dir, 'typeorm', commits);
    const h = await extractHistory({ repo, adapter: typeormAdapter });
    expect(h.stats.blobsReadAhead).toBeGreaterThan(40);
    // the service file's texts were read to be scanned, then dropped (they are not entity files)
    expect(h.stats.locateTextsDropped).toBeGreaterThanOrEqual(20);
    expect(serialiseDocument(toDocument(h, GENERATOR))).toBe(await doc({ repo, adapter: withoutReadAhead(typeormAdapter) }));
  }, 120_000);
});
