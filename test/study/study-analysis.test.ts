import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import Ajv2020 from 'ajv/dist/2020.js';
import addFormats from 'ajv-formats';
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadStudy } from '@schema-strata/core';
import { ROOT, runCli, tempDir } from '../helpers/repo.js';
import { makeSyntheticRepos, writeCorpus } from './synthetic.js';

const tmp = tempDir('strata-study-analysis-');
afterAll(() => tmp.cleanup());

const out = join(tmp.dir, 'out');
let stdout = '';
beforeAll(async () => {
  // three small projects of the synthetic generator (deterministic: seeds 1, 2, 3)
  await makeSyntheticRepos(tmp.dir, 3, { commits: 120, models: 12 });
  const corpus = writeCorpus(join(tmp.dir, 'corpus.json'), ['coop1', 'coop2', 'coop3']);
  const r = runCli(['study', corpus, '-o', out, '--no-cache', '--quiet']);
  expect(r.code).toBe(0);
  stdout = r.stdout;
});

const close = (actual: number, expected: number, rel = 1e-9): void => {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(rel * Math.abs(expected));
};
const csv = (f: string): Record<string, string>[] => parse(readFileSync(f), { columns: true, record_delimiter: '\r\n' });

describe('study analysis: per project, pooled, and stratified by project', () => {
  it('each project row and its statistics are those of its own analysis; the pooled table is their sum', () => {
    const s = loadStudy(out);
    const a = s.study.analysis!;
    expect(s.study.projects.map((p) => [p.label, p.status, p.file])).toEqual([['coop1', 'done', 'coop1.json'], ['coop2', 'done', 'coop2.json'], ['coop3', 'done', 'coop3.json']]);
    for (const row of a.projects) {
      const own = s.project(row.project).analysis as any;
      const units = own.tables.filter((t: any) => t.included);
      expect(row.included).toBe(units.length);
      for (const c of ['isolated', 'source', 'sink', 'intermediate'] as const) {
        expect(row.classes[c]).toBe(units.filter((t: any) => t.graph.class === c).length);
      }
      expect(a.perProject.find((p) => p.project === row.project)!.statistics).toEqual(own.statistics);
    }
    for (const key of ['classByBirthGroup', 'classByActivityBand'] as const) {
      const sum = a.perProject.map((p) => p.statistics[key].table.counts).reduce((x, y) => x.map((r, i) => r.map((v, j) => v + y[i]![j]!)));
      expect(a.pooled.statistics[key].table.counts).toEqual(sum);
    }
    expect(a.pooled.units).toBe(a.projects.reduce((n, r) => n + r.included, 0));
  });

  it('the stratified tests equal R mantelhaen.test on the projects\' tables', () => {
    const a = loadStudy(out).study.analysis!;
    // the projects' tables (rows isolated, source, sink, intermediate), fixed by the seeded generator:
    const birth = a.perProject.map((p) => p.statistics.classByBirthGroup.table.counts);
    const band = a.perProject.map((p) => p.statistics.classByActivityBand.table.counts);
    expect(birth).toEqual([[[0, 1], [1, 3], [1, 1], [3, 1]], [[1, 1], [1, 3], [2, 0], [1, 2]], [[0, 2], [0, 2], [1, 0], [4, 2]]]);
    expect(band).toEqual([[[0, 1, 0], [0, 3, 1], [0, 1, 1], [0, 4, 0]], [[0, 2, 0], [0, 4, 0], [0, 1, 1], [0, 2, 1]], [[1, 1, 0], [0, 2, 0], [0, 1, 0], [0, 5, 1]]]);
    // R 4.2.2, with mk <- function(...) { l <- list(...); a <- array(0, dim = c(nrow(l[[1]]), ncol(l[[1]]), length(l))); for (k in seq_along(l)) a[, , k] <- l[[k]]; a }:
    // mantelhaen.test(mk(matrix(c(0,1, 1,3, 1,1, 3,1), nrow = 4, byrow = TRUE), matrix(c(1,1, 1,3, 2,0, 1,2), nrow = 4, byrow = TRUE),
    //                    matrix(c(0,2, 0,2, 1,0, 4,2), nrow = 4, byrow = TRUE)))  ->  M^2 = 7.0599756690997557, df 3, p 0.070010514361691853
    const b = a.stratified.classByBirthGroup;
    if (!b.computable) throw new Error(b.reason);
    expect(b.df).toBe(3);
    close(b.statistic, 7.0599756690997557);
    close(b.pValue, 0.070010514361691853);
    // mantelhaen.test(mk(matrix(c(0,1,0, 0,3,1, 0,1,1, 0,4,0), nrow = 4, byrow = TRUE), matrix(c(0,2,0, 0,4,0, 0,1,1, 0,2,1), nrow = 4, byrow = TRUE),
    //                    matrix(c(1,1,0, 0,2,0, 0,1,0, 0,5,1), nrow = 4, byrow = TRUE)))  ->  M^2 = 7.2801089314993117, df 6, p 0.29571793192681511
    const d = a.stratified.classByActivityBand;
    if (!d.computable) throw new Error(d.reason);
    expect(d.df).toBe(6);
    close(d.statistic, 7.2801089314993117);
    close(d.pValue, 0.29571793192681511);
    expect(b.reading).toContain('Cochran-Mantel-Haenszel M^2 = 7.060 with 3 degrees of freedom over 3 projects, p = 0.0700: no association within projects shown at the 0.05 level.');
  });

  it('tables.csv is tidy: a project column, then each project\'s own tables.csv rows (read back with csv-parse)', () => {
    const all = csv(join(out, 'tables.csv'));
    for (const label of ['coop1', 'coop2', 'coop3']) {
      const dir = join(tmp.dir, `export-${label}`);
      const e = runCli(['export', join(out, `${label}.json`), '--format', 'csv', '-o', dir]);
      expect(e.code).toBe(0);
      const own = csv(join(dir, 'tables.csv'));
      const mine = all.filter((r) => r.project === label).map(({ project: _p, ...rest }) => rest);
      expect(mine).toEqual(own);
    }
    expect(Object.keys(all[0]!)[0]).toBe('project');
    const projects = csv(join(out, 'projects.csv'));
    expect(projects.map((r) => r.project)).toEqual(['coop1', 'coop2', 'coop3']);
    const a = loadStudy(out).study.analysis!;
    projects.forEach((r, i) => {
      expect(Number(r.intermediate)).toBe(a.projects[i]!.classes.intermediate);
      expect(Number(r.birth_chi_square_p)).toBe((a.perProject[i]!.statistics.classByBirthGroup.chiSquare as { pValue: number }).pValue);
    });
  });

  it('prints the projects side by side, the tests per project and pooled, and the caution', () => {
    expect(stdout).toContain('Topology classes by project (tables in the measures; count and share)');
    expect(stdout).toMatch(/\n {2}coop1 +\d+ +\d+ /);
    expect(stdout).toMatch(/\n {2}pooled +\d+ /);
    expect(stdout).toContain('Tests per project (p-values; - where not computable)');
    expect(stdout).toContain('Pooled: topology class by birth group');
    expect(stdout).toContain('Within projects (stratified by project)');
    expect(stdout).toContain('association only');
  });

  it('study.json is valid against packages/core/schema/study.schema.json (ajv, a JSON Schema 2020-12 reference implementation), which is current', () => {
    const schemaDir = join(ROOT, 'packages', 'core', 'schema');
    const ajv = new (Ajv2020 as unknown as typeof Ajv2020.default)({ allErrors: true, strict: true });
    (addFormats as unknown as typeof addFormats.default)(ajv);
    ajv.addSchema(JSON.parse(readFileSync(join(schemaDir, 'history.schema.json'), 'utf8')));
    const validate = ajv.compile(JSON.parse(readFileSync(join(schemaDir, 'study.schema.json'), 'utf8')));
    const ok = validate(JSON.parse(readFileSync(join(out, 'study.json'), 'utf8')));
    expect(validate.errors ?? []).toEqual([]);
    expect(ok).toBe(true);
    // a study with a failed project and one without any done project are valid too
    expect(validate({ format: 'schema-strata-study', formatVersion: '1.0.0', generator: { name: 'schema-strata', version: '0.1.0' }, projects: [{ label: 'gone', repository: 'gone', status: 'failed', reason: 'gone: no such directory' }], analysis: null })).toBe(true);
    const check = spawnSync(process.execPath, [join(ROOT, 'scripts', 'make-study-schema.mjs'), '--check'], { encoding: 'utf8' });
    expect(check.stderr).toBe('');
    expect(check.status).toBe(0);
  });

  it('study.json is the same bytes when the study is run again (nothing redone) and when pooled from scratch', () => {
    const before = readFileSync(join(out, 'study.json'));
    const corpus = join(tmp.dir, 'corpus.json');
    const again = runCli(['study', corpus, '-o', out, '--no-cache', '--quiet']);
    expect(again.stdout).toContain('0 extracted, 3 unchanged');
    expect(again.stdout).toContain('the pooled study is unchanged: study.json, tables.csv, projects.csv');
    expect(readFileSync(join(out, 'study.json')).equals(before)).toBe(true);
    // a pooled file changed by hand is made again
    const tables = readFileSync(join(out, 'tables.csv'));
    writeFileSync(join(out, 'tables.csv'), 'project\r\n');
    const third = runCli(['study', corpus, '-o', out, '--no-cache', '--quiet']);
    expect(third.stdout).toContain('wrote study.json, tables.csv, projects.csv');
    expect(readFileSync(join(out, 'tables.csv')).equals(tables)).toBe(true);
    const fresh = join(tmp.dir, 'fresh');
    expect(runCli(['study', corpus, '-o', fresh, '--jobs', '1', '--cache-dir', join(tmp.dir, 'cache'), '--quiet']).code).toBe(0);
    expect(readFileSync(join(fresh, 'study.json')).equals(before)).toBe(true);
    expect(readFileSync(join(fresh, 'tables.csv')).equals(readFileSync(join(out, 'tables.csv')))).toBe(true);
  });
});
