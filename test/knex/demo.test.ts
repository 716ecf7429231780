// `schema-strata demo --adapter knex`: core's demo story written as Knex migrations, extracted
// again, with the same physical tables and columns as the Prisma demo at every commit.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { demoStory, snapshotOfVersion, type DemoStory, type InterchangeDocument } from '@schema-strata/core';
import { renderKnexDemo, parseKnexSource } from '@schema-strata/adapter-knex';

const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
// core's demoStory() can be called once per process (its tables are shared module data), so the
// story is read once here and the CLI runs in its own processes
const story: DemoStory = demoStory();

/** Run `schema-strata demo DIR --adapter NAME` as a user would, and read the document it wrote. */
function demo(adapter: string): InterchangeDocument {
  const dir = join(mkdtempSync(join(tmpdir(), `strata-demo-${adapter}-`)), 'demo');
  const r = spawnSync(process.execPath, [join(ROOT, 'packages/core/bin/schema-strata.js'), 'demo', dir, '--adapter', adapter, '--quiet'], { cwd: ROOT, encoding: 'utf8' });
  expect(r.status, r.stderr).toBe(0);
  expect(r.stdout).toContain(`demo (${adapter})`);
  return JSON.parse(readFileSync(join(dir, 'history.json'), 'utf8')) as InterchangeDocument;
}

/** table -> column names, for the version that stands at each commit of the story (by subject). */
function namesByStep(doc: InterchangeDocument, subjects: string[]): Array<Record<string, string[]>> {
  return subjects.map((s) => {
    const i = doc.versions.findIndex((v) => v.subject === s);
    const idx = i >= 0 ? i : Math.max(...doc.versions.filter((v) => subjects.indexOf(v.subject) < subjects.indexOf(s)).map((v) => v.index));
    const snap = snapshotOfVersion(doc, doc.versions[idx]!.index)!;
    return Object.fromEntries(snap.tables.map((t) => [t.name, t.columns.map((c) => c.name).sort()]));
  });
}

describe('the demo story as Knex migrations', () => {
  it('writes one new migration per step, a broken one that the next step fixes, and a formatting-only edit', () => {
    const files = renderKnexDemo(story);
    expect(files).toHaveLength(story.steps.length);
    const broken = story.steps.findIndex((s) => s.variant === 'broken');
    const brokenPath = Object.keys(files[broken]!.files).find((p) => p.startsWith('migrations/'))!;
    expect(parseKnexSource(files[broken]!.files[brokenPath]!).ok).toBe(false);
    expect(parseKnexSource(files[broken + 1]!.files[brokenPath]!).ok).toBe(true);
    const reformat = story.steps.findIndex((s) => s.variant === 'reformat');
    const [edited] = Object.keys(files[reformat]!.files);
    expect(Object.keys(files[0]!.files)).toContain(edited);
    for (const f of files) for (const text of Object.values(f.files)) if (text && f !== files[broken]) expect(text.includes('exports.up') ? parseKnexSource(text).ok : true).toBe(true);
  });

  it('runs as `schema-strata demo --adapter knex` and shows every kind of event', () => {
    const doc = demo('knex');
    const statuses = new Set(doc.versions.map((v) => v.status));
    expect(statuses).toEqual(new Set(['ok', 'no change', 'partial']));
    const kinds = new Set(doc.changes.map((c) => c.kind));
    for (const k of ['table-added', 'table-removed', 'column-added', 'column-removed', 'column-type-changed', 'column-unique-changed', 'column-enum-values-changed', 'primary-key-changed', 'foreign-key-added', 'foreign-key-removed', 'foreign-key-changed']) {
      expect(kinds, k).toContain(k);
    }
    const last = snapshotOfVersion(doc, doc.versions.length - 1)!;
    const join = last.tables.find((t) => t.name === '_TagToTool')!;
    expect(join.columns.map((c) => c.name)).toEqual(['A', 'B']);
    expect(join.primaryKey).toEqual(['A', 'B']);
    expect(join.foreignKeys.map((f) => `${f.columns[0]}->${f.referencedTable}`).sort()).toEqual(['A->tags', 'B->tools']);
  });

  it('has the same physical tables and columns as the Prisma demo at every step', () => {
    const subjects = story.steps.map((s) => s.message);
    const knex = namesByStep(demo('knex'), subjects);
    const prisma = namesByStep(demo('prisma'), subjects);
    subjects.forEach((s, i) => expect(knex[i], s).toEqual(prisma[i]));
  });
});
