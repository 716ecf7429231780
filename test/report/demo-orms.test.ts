import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import type { Analysis, InterchangeDocument, TableMeasures } from '@schema-strata/core';
import { runMain, tempDir } from '../helpers/repo.js';

// The demo story (core's demoStory) told through the code of each ORM: Prisma schema files,
// TypeORM entity classes, Knex migrations. The three analyses must agree wherever the ORMs allow;
// where they cannot, the test names the difference and its reason.
const ADAPTERS = ['prisma', 'typeorm', 'knex'] as const;
type Adapter = (typeof ADAPTERS)[number];

const { dir, cleanup } = tempDir('strata-demo-orms-');
const docs = {} as Record<Adapter, InterchangeDocument>;
const analyses = {} as Record<Adapter, Analysis>;

beforeAll(async () => {
  for (const a of ADAPTERS) {
    const out = join(dir, a);
    const r = await runMain(['demo', out, '--adapter', a, '--quiet']);
    expect(r.code, `${a}: ${r.stderr}`).toBe(0);
    expect(r.stdout).toContain(join(out, 'report.html'));
    expect(existsSync(join(out, 'report.html')), `${a}: the demo ends with report.html`).toBe(true);
    docs[a] = JSON.parse(readFileSync(join(out, 'history.json'), 'utf8')) as InterchangeDocument;
    analyses[a] = docs[a].analysis as Analysis;
  }
}, 300_000);
afterAll(cleanup);

/** A table's measures that the ORM's way of writing the story must not change. */
const measures = (t: TableMeasures) => ({
  id: t.id,
  name: t.name,
  removed: t.removal !== null,
  spells: t.spells.length,
  birthGroup: t.birthGroup,
  columns: t.columns,
  changes: t.changes,
  countedUpdates: t.countedUpdates,
  activityBand: t.activityBand,
  inDegree: t.graph?.inDegree,
  outDegree: t.graph?.outDegree,
  selfReferences: t.graph?.selfReferences,
  class: t.graph?.class,
  classChanges: t.graph?.classChanges,
});

/** Every change, placed by the commit (its subject) rather than the version index, which the ORMs may number differently. */
const changes = (a: Adapter, values = true) =>
  docs[a].changes
    .map((c) => `${docs[a].versions[c.version]!.subject} | ${c.kind} ${c.table} ${c.column ?? ''} ${c.foreignKey ?? ''}${values ? ` ${c.before ?? ''} -> ${c.after ?? ''}` : ''}`)
    .sort();

describe('the demo in Prisma, TypeORM and Knex', () => {
  test('same tables, same measures, table by table', () => {
    const want = analyses.prisma.tables.map(measures);
    for (const a of ['typeorm', 'knex'] as const) expect(analyses[a].tables.map(measures), a).toEqual(want);
  });

  test('same changes, commit by commit, and the same figures', () => {
    expect(changes('typeorm'), 'typeorm').toEqual(changes('prisma'));
    for (const a of ['typeorm', 'knex'] as const) {
      expect(changes(a, false), a).toEqual(changes('prisma', false));
      const s = analyses[a].summary;
      const p = analyses.prisma.summary;
      expect([s.tables, s.changes, s.countedUpdates, s.classes, s.birthGroups, s.activityBands], a).toEqual([p.tables, p.changes, p.countedUpdates, p.classes, p.birthGroups, p.activityBands]);
      expect(analyses[a].graph.edges.map((e) => `${e.source}>${e.target} ${e.columns}`), a).toEqual(analyses.prisma.graph.edges.map((e) => `${e.source}>${e.target} ${e.columns}`));
    }
  });

  test('the same statistics', () => {
    for (const a of ['typeorm', 'knex'] as const) {
      for (const k of ['classByBirthGroup', 'classByActivityBand'] as const) {
        expect(analyses[a].statistics[k].table.counts, `${a} ${k}`).toEqual(analyses.prisma.statistics[k].table.counts);
        expect(analyses[a].statistics[k].reading, `${a} ${k}`).toEqual(analyses.prisma.statistics[k].reading);
      }
      expect(analyses[a].statistics.degreeVersusUpdates.reading).toBe(analyses.prisma.statistics.degreeVersusUpdates.reading);
      expect(analyses[a].statistics.updatesByClass.reading).toBe(analyses.prisma.statistics.updatesByClass.reading);
    }
  });

  describe('where the ORMs differ, and why', () => {
    const statusOf = (a: Adapter, subject: string) => docs[a].versions.find((v) => v.subject === subject)?.status;
    const broken = () => docs.prisma.versions.find((v) => v.status === 'carried')!.subject;

    test('the commit that does not parse: Prisma carries the whole schema, TypeORM and Knex lose only the broken file', () => {
      // a Prisma schema is parsed as one unit, so one syntax error fails it all (design.md: `carried`);
      // entity classes and migrations are separate files, each keeping its last good parse (`partial`)
      expect(statusOf('prisma', broken())).toBe('carried');
      expect(statusOf('typeorm', broken())).toBe('partial');
      expect(statusOf('knex', broken())).toBe('partial');
    });

    test('every other commit has the same status in Prisma and TypeORM', () => {
      const others = (a: Adapter) => docs[a].versions.filter((v) => v.subject !== broken()).map((v) => `${v.subject}: ${v.status}`);
      expect(others('typeorm')).toEqual(others('prisma'));
    });

    test('the commit that renames a class but keeps its table: no change for Prisma and TypeORM, no version for Knex', () => {
      // Knex migrations have no class to rename: the commit touches no file Knex reads, so it is no version at all
      const renames = docs.prisma.versions.filter((v) => v.status === 'no change').map((v) => v.subject);
      expect(renames.length).toBe(2);
      const classRename = renames.find((s) => statusOf('knex', s) === undefined)!;
      expect(classRename).toBeDefined();
      expect(statusOf('typeorm', classRename)).toBe('no change');
      expect(docs.knex.versions.length).toBe(docs.prisma.versions.length - 1);
      expect(docs.typeorm.versions.length).toBe(docs.prisma.versions.length);
    });

    test("unstated referential actions: Prisma's engine fills in its defaults, a Knex migration leaves them to the database", () => {
      // Prisma 7 (its schema engine): onUpdate Cascade, onDelete Restrict for a required relation, when the
      // schema states none; a Knex foreign key without .onDelete()/.onUpdate() has none (the database's NO ACTION)
      const prismaWithoutDefaults = changes('prisma').map((c) => c.replace(/ on update cascade/g, '').replace(/ on delete restrict/g, ''));
      expect(changes('knex')).toEqual(prismaWithoutDefaults.sort());
      expect(changes('knex')).not.toEqual(changes('prisma'));
    });

    test('the many-to-many join table: created implicitly by Prisma and TypeORM, written out in a Knex migration', () => {
      const kinds = (a: Adapter) => analyses[a].tables.filter((t) => t.kind === 'implicit-join').map((t) => t.id);
      expect(kinds('prisma')).toEqual(['_TagToTool']);
      expect(kinds('typeorm')).toEqual(['_TagToTool']);
      expect(kinds('knex')).toEqual([]);
      expect(analyses.knex.tables.find((t) => t.id === '_TagToTool')!.kind).toBe('table');
    });

    test('coverage: each adapter counts what it could not read in its own terms', () => {
      const codes = (a: Adapter) => new Set(docs[a].versions.flatMap((v) => v.diagnostics.map((d) => d.code.split('/')[0])));
      expect(codes('prisma')).toContain('prisma');
      expect(codes('typeorm')).toContain('typeorm');
      expect(codes('knex')).toContain('knex');
      // the Knex story carries one raw SQL statement (a raw schema statement it cannot replay)
      expect(docs.knex.versions.at(-1)!.counters.rawSchemaStatements).toBe(1);
    });
  });
});
