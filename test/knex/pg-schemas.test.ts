// PostgreSQL-only constructs against Knex itself on PGlite: database schemas (withSchema, dotted
// names, a schema dropped with its tables), native enums (created, then reused with
// existingType), jsonb defaults, arrays, time precision. Every commit of the fixture history is
// run by Knex and compared with the adapter's version (its knexfile is one flat configuration).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PGlite } from '@electric-sql/pglite';
import { extractHistory, snapshotOfVersion, toDocument, type InterchangeDocument, type NeutralType } from '@schema-strata/core';
import knexAdapter from '@schema-strata/adapter-knex';
import { fixtureRepository, tablesOf, type FixtureHistory } from './fixture.js';
import { resetPg, runKnex } from './oracle.js';
import { fromDatabase, fromReplay, neutralOfPg } from './compare.js';

let pg: PGlite;
let history: FixtureHistory;
let commitIds: string[];
let doc: InterchangeDocument;

beforeAll(async () => {
  pg = await PGlite.create();
  const repo = await fixtureRepository('pg-schemas');
  history = repo.history;
  commitIds = repo.commitIds;
  doc = toDocument(await extractHistory({ repo: repo.dir, adapter: knexAdapter }), { name: 'test', version: '0' });
});

afterAll(async () => {
  await pg?.close();
});

const clean = (t: NeutralType): unknown => JSON.parse(JSON.stringify(t));

describe('PostgreSQL schemas and native types (oracle: Knex 3 with its PostgreSQL client on PGlite)', () => {
  it('agrees with PostgreSQL after every commit, types included', async () => {
    for (let i = 0; i < history.trees.length; i++) {
      await resetPg(pg);
      const oracle = await runKnex(history.trees[i]!, { engine: 'pglite', pglite: pg, environment: 'production' });
      const v = doc.versions.find((x) => x.commit === commitIds[i])!;
      const replay = tablesOf(snapshotOfVersion(doc, v.index)!);
      expect(fromReplay(replay, 'pg'), `commit ${i}`).toEqual(fromDatabase(oracle.final, 'pg'));
      for (const t of replay) {
        const dt = oracle.final.find((x) => x.name === t.name && x.schema === t.namespace)!;
        for (const c of t.columns) expect(clean(c.type), `${t.id}.${c.name}`).toEqual(clean(neutralOfPg(dt, c.name)));
      }
    }
  });

  it('keeps a table renamed inside a schema as the same table, with its namespace', () => {
    const last = tablesOf(snapshotOfVersion(doc, doc.versions.length - 1)!);
    expect(last.map((t) => t.id).sort()).toEqual(['members', 'reporting.loan_totals', 'reporting.yearly_totals']);
    expect(last.find((t) => t.id === 'reporting.loan_totals')).toMatchObject({ name: 'member_totals', namespace: 'reporting' });
    const kinds = doc.changes.map((c) => `${c.version}:${c.kind}:${c.table}${c.column ? '.' + c.column : ''}`);
    expect(kinds).toContain('2:table-renamed:reporting.loan_totals');
    expect(kinds).toContain('2:column-renamed:reporting.loan_totals.loan_count');
    // the scratch schema's table came and went inside one migration: never in a snapshot
    expect(kinds.some((k) => k.includes('scratch'))).toBe(false);
  });
});
