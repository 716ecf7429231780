// Bad input: every version is still built and complete; each mistake is a diagnostic with its
// file, line and a stable code, and the rest of the history is replayed.
import { beforeAll, describe, expect, it } from 'vitest';
import { extractHistory, snapshotOfVersion, toDocument, type Diagnostic, type InterchangeDocument } from '@schema-strata/core';
import knexAdapter from '@schema-strata/adapter-knex';
import { fixtureRepository } from './fixture.js';

let doc: InterchangeDocument;

beforeAll(async () => {
  const repo = await fixtureRepository('bad');
  doc = toDocument(await extractHistory({ repo: repo.dir, adapter: knexAdapter }), { name: 'test', version: '0' });
});

const version = (subject: string) => doc.versions.find((v) => v.subject === subject)!;
const tables = (subject: string) => snapshotOfVersion(doc, version(subject).index)!.tables;
const codes = (ds: Diagnostic[], code: string) => ds.filter((d) => d.code === code).map((d) => `${d.file}:${d.line ?? ''}`);

describe('bad input to the Knex adapter', () => {
  it('builds a snapshot at every commit', () => {
    expect(doc.versions).toHaveLength(9);
    expect(doc.versions.every((v) => v.snapshot !== null)).toBe(true);
  });

  it('skips a migration with a syntax error and replays the later ones', () => {
    const v = version('Categories (does not parse yet) and tools');
    expect(v.status).toBe('partial');
    expect(codes(v.diagnostics, 'knex/syntax-error')).toEqual(['migrations/002_categories.js:5']);
    expect(codes(v.diagnostics, 'file/skipped')).toEqual(['migrations/002_categories.js:']);
    expect(tables('Categories (does not parse yet) and tools').map((t) => t.name).sort()).toEqual(['members', 'tools']);
    expect(v.counters).toMatchObject({ migrations: 3, skippedMigrations: 1 });
  });

  it('reports an unknown builder method and keeps the rest of the table', () => {
    const v = version('Reviews, with a typo in a method');
    expect(codes(v.diagnostics, 'knex/unknown-method')).toEqual(['migrations/004_reviews.js:4', 'migrations/004_reviews.js:7']);
    expect(v.diagnostics.find((d) => d.line === 4)!.message).toContain('stringy()');
    const reviews = tables('Reviews, with a typo in a method').find((t) => t.name === 'reviews')!;
    expect(reviews.columns.map((c) => c.name)).toEqual(['id', 'note']);
    expect(tables('Reviews, with a typo in a method').some((t) => t.name === 'ratings')).toBe(false);
  });

  it('reports dropping a table that does not exist, and goes on', () => {
    const v = version('Drop a table that was never made');
    expect(codes(v.diagnostics, 'knex/no-such-table')).toEqual(['migrations/005_drop_missing.js:2']);
    expect(v.diagnostics.find((d) => d.code === 'knex/no-such-table')!.message).toContain('workshops');
    expect(tables('Drop a table that was never made').some((t) => t.name === 'badges')).toBe(true);
  });

  it('reports altering a column that does not exist, and alters the one that does', () => {
    const v = version('Alter a column that does not exist');
    expect(codes(v.diagnostics, 'knex/no-such-column')).toEqual(['migrations/006_alter_missing.js:3']);
    const members = tables('Alter a column that does not exist').find((t) => t.name === 'members')!;
    expect(members.columns.map((c) => [c.name, c.nativeType])).toEqual([['id', 'increments'], ['email', 'string(300)']]);
    expect(doc.changes.filter((c) => c.version === v.index).map((c) => `${c.kind}:${c.table}.${c.column}`)).toEqual(['column-type-changed:members.email']);
  });

  it('reports two migrations with the same name in different directories, and replays both in Knex order', () => {
    const v = version('A legacy migration with a name already taken');
    expect(codes(v.diagnostics, 'knex/duplicate-name')).toEqual(['legacy/migrations/003_tools.js:']);
    expect(v.diagnostics.find((d) => d.code === 'knex/duplicate-name')!.message).toContain('migrations/003_tools.js, legacy/migrations/003_tools.js');
    expect(tables('A legacy migration with a name already taken').map((t) => t.name)).toEqual(expect.arrayContaining(['tools', 'tool_archive']));
  });

  it('replays a migration once it is fixed', () => {
    const v = version('Fix the categories migration');
    expect(v.status).toBe('ok');
    expect(tables('Fix the categories migration').some((t) => t.name === 'categories')).toBe(true);
    expect(doc.changes.filter((c) => c.version === v.index).map((c) => `${c.kind}:${c.table}`)).toEqual(['table-added:categories']);
  });

  it('reports names and calls it cannot follow, without guessing', () => {
    const v = version('Names from nowhere');
    expect(codes(v.diagnostics, 'knex/name-unknown')).toEqual(['migrations/007_unresolved.js:5']);
    expect(codes(v.diagnostics, 'knex/call-not-followed')).toEqual(['migrations/007_unresolved.js:10']);
    expect(codes(v.diagnostics, 'knex/loop-unknown')).toEqual(['migrations/007_unresolved.js:11']);
    const notes = tables('Names from nowhere').find((t) => t.name === 'notes')!;
    expect(notes.columns.map((c) => c.name)).toEqual(['id']);
    expect(v.counters).toMatchObject({ unresolved: 3 });
  });

  it('keeps the last good parse of a migration that breaks later', () => {
    const v = version('Break the first migration after the fact');
    expect(v.status).toBe('partial');
    expect(codes(v.diagnostics, 'file/kept-last-good')).toEqual(['migrations/001_members.js:']);
    expect(tables('Break the first migration after the fact').find((t) => t.name === 'members')!.columns.map((c) => c.name)).toEqual(['id', 'email']);
    expect(doc.changes.filter((c) => c.version === v.index)).toEqual([]);
  });

  it('gives every diagnostic a file and a code', () => {
    for (const v of doc.versions) for (const d of v.diagnostics) expect(d.file && d.code, JSON.stringify(d)).toBeTruthy();
  });
});
