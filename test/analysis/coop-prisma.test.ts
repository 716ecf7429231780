import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createRequire } from 'node:module';
import { parse } from 'csv-parse/sync';
import { CHANGE_KINDS, main, writeRepository, type Analysis, type InterchangeDocument } from '@schema-strata/core';
import { COOP_DATES, COOP_MESSAGES, coopSchemas, prismaSchema } from '../fixtures/analysis/coop-story.js';
import { checkAgainstHandWorked } from '../fixtures/analysis/check-hand-worked.js';

const require = createRequire(import.meta.url);
const Ajv2020 = require('ajv/dist/2020').default as typeof import('ajv').default;
const addFormats = require('ajv-formats') as (a: unknown) => void;
const schema = JSON.parse(readFileSync(require.resolve('@schema-strata/core/schema/history.schema.json'), 'utf8'));

async function run(args: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const io = {
    stdout: { write: (s: string) => ((out += s), true) } as unknown as NodeJS.WritableStream,
    stderr: { write: (s: string) => ((err += s), true) } as unknown as NodeJS.WriteStream,
    env: {},
  };
  const code = await main(args, io);
  return { code, out, err };
}

let dir: string;
let repo: string;
let doc: InterchangeDocument;

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'strata-coop-'));
  repo = join(dir, 'repo');
  await writeRepository(repo, coopSchemas().map((s, i) => ({ date: COOP_DATES[i]!, message: COOP_MESSAGES[i]!, files: { 'prisma/schema.prisma': prismaSchema(s) } })));
  // a tag at version 4, for --initial-until with a revision (made by git itself)
  const commits = execFileSync('git', ['-C', repo, 'rev-list', '--reverse', 'HEAD'], { encoding: 'utf8' }).trim().split('\n');
  execFileSync('git', ['-C', repo, 'tag', 'tags-arrive', commits[4]!]);
  const r = await run(['extract', repo, '--adapter', 'prisma', '--analyze', '--renames', 'heuristic', '-o', join(dir, 'history.json'), '--quiet', '--no-cache']);
  expect(r.err).toBe('');
  expect(r.code).toBe(0);
  doc = JSON.parse(readFileSync(join(dir, 'history.json'), 'utf8'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('the co-op history end to end: git commits of Prisma schemas, extract --analyze, analyze, export, diff', () => {
  test('the Prisma adapter and the heuristic give every hand-worked measure', () => {
    expect(doc.versions.map((v) => v.status)).toEqual(Array(12).fill('ok'));
    const a = doc.analysis as Analysis;
    checkAgainstHandWorked(a);
    expect(a.renames.map((r) => [r.version, r.kind, r.from, r.to])).toEqual([[2, 'table', 'tool_kit', 'tool_kits'], [8, 'column', 'joined_on', 'joined_at']]);
    expect(doc.changes.filter((c) => c.basis === 'heuristic').map((c) => c.kind)).toEqual(['table-renamed', 'column-renamed']);
  });

  test('the file with its analysis is valid against the JSON Schema (ajv, draft 2020-12, strict)', () => {
    const ajv = new Ajv2020({ allErrors: true, strict: true });
    addFormats(ajv);
    const validate = ajv.compile(schema);
    const ok = validate(doc);
    expect(validate.errors ?? []).toEqual([]);
    expect(ok).toBe(true);
  });

  test('every field of the schema has a description', () => {
    const missing: string[] = [];
    const walk = (node: unknown, path: string): void => {
      if (!node || typeof node !== 'object') return;
      const n = node as Record<string, unknown>;
      if (n.properties) {
        for (const [k, v] of Object.entries(n.properties as Record<string, Record<string, unknown>>)) {
          if (typeof v.description !== 'string' || v.description.length === 0) missing.push(`${path}.${k}`);
        }
      }
      for (const [k, v] of Object.entries(n)) if (typeof v === 'object') walk(v, `${path}.${k}`);
    };
    walk(schema, '#');
    expect(missing).toEqual([]);
  });

  test('analyze prints aligned tables, percentages, one sentence per test and the caution; --json is the embedded analysis', async () => {
    const text = await run(['analyze', join(dir, 'history.json'), '--no-color']);
    expect(text.code).toBe(0);
    expect(text.out).toMatch(/^Topology class by birth group \(16 tables; count, row %, expected count\)$/m);
    expect(text.out).toMatch(/^ {2}source +0 +0\.0% +\(2\.50\) +5 +100\.0% +\(2\.50\) +5$/m);
    expect(text.out).toMatch(/Topology class and birth group: chi-square = 9\.000 with 3 degrees of freedom, p = 0\.0293: an association at the 0\.05 level\./);
    expect(text.out).toMatch(/exact test \(Fisher-Freeman-Halton; all 80 tables with the observed margins enumerated\) p = 0\.0260/);
    expect(text.out).toMatch(/Spearman's rho = 0\.586 over 16 tables, p = 0\.0171 \(t approximation\)/);
    expect(text.out).toMatch(/not evidence that one causes the other/);
    expect(text.out).toMatch(/parallel foreign keys \(counted once\): loans -> members \(2\)/);
    const json = await run(['analyze', join(dir, 'history.json'), '--json']);
    expect(JSON.parse(json.out)).toEqual(doc.analysis);
    // the same bytes twice
    expect((await run(['analyze', join(dir, 'history.json'), '--no-color'])).out).toBe(text.out);
  });

  test('analyze with options recomputes; --initial-until takes a tag of the repository', async () => {
    const r = await run(['analyze', join(dir, 'history.json'), '--json', '--initial-until', 'tags-arrive', '--repo', repo]);
    expect(r.code).toBe(0);
    const a = JSON.parse(r.out) as Analysis;
    expect(a.options.initialCutoff).toBe(4);
    expect(a.summary.birthGroups).toEqual({ initial: 12, later: 4 });
    expect(a.options.renames).toBe('heuristic');
    const stated = JSON.parse((await run(['analyze', join(dir, 'history.json'), '--json', '--renames', 'stated'])).out) as Analysis;
    expect(stated.tables.map((t) => t.id)).toContain('tool_kits');
  });

  test('usage errors are one line with a non-zero exit', async () => {
    for (const args of [
      ['analyze', join(dir, 'history.json'), '--high-above', 'many'],
      ['analyze', join(dir, 'missing.json')],
      ['analyze', join(dir, 'history.json'), '--count', 'column-moved'],
      ['export', join(dir, 'history.json'), '--format', 'xlsx', '-o', dir],
      ['analyze', join(dir, 'history.json'), '--initial-until', 'no-such-tag', '--repo', repo],
    ]) {
      const r = await run(args);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.err.trimEnd().split('\n'), args.join(' ')).toHaveLength(1);
    }
  });

  test('export --format csv: read back with csv-parse, every row equals the JSON', async () => {
    const out = join(dir, 'csv');
    const r = await run(['export', join(dir, 'history.json'), '--format', 'csv', '-o', out]);
    expect(r.code).toBe(0);
    const a = doc.analysis as Analysis;
    const read = (f: string) => {
      const text = readFileSync(join(out, f), 'utf8');
      expect(text.includes('\r\n')).toBe(true); // RFC 4180 line ends
      return parse(text, { columns: true, skip_empty_lines: true }) as Array<Record<string, string>>;
    };
    const tables = read('tables.csv');
    expect(tables.map((t) => t.id)).toEqual(a.tables.map((t) => t.id));
    tables.forEach((row, i) => {
      const t = a.tables[i]!;
      expect(row.birth_date).toBe(t.birth.date);
      expect(Date.parse(row.birth_date!)).not.toBeNaN();
      expect(row.removal_version).toBe(t.removal ? String(t.removal.version) : '');
      expect(Number(row.lifetime_days)).toBe(t.lifetime.days);
      expect(Number(row.counted_updates)).toBe(t.countedUpdates);
      expect(row.updates_per_year).toBe(t.updatesPerYear === null ? '' : String(t.updatesPerYear));
      expect(Number(row.updates_per_version)).toBe(t.updatesPerVersion);
      for (const k of CHANGE_KINDS) expect(Number(row[`changes_${k.replace(/-/g, '_')}`])).toBe(t.changes[k]);
      expect([row.topology_class, Number(row.in_degree), Number(row.out_degree)]).toEqual([t.graph!.class, t.graph!.inDegree, t.graph!.outDegree]);
      expect(row.classes).toBe(t.graph!.classes.map((c) => `${c.from}-${c.to}:${c.class}`).join(';'));
      expect(row.included).toBe('true');
    });
    const changes = read('changes.csv');
    expect(changes.length).toBe(doc.changes.length);
    changes.forEach((row, i) => {
      const c = doc.changes[i]!;
      expect([Number(row.version), row.table, row.kind, row.column, row.before, row.after, row.evidence]).toEqual([c.version, c.table, c.kind, c.column ?? '', c.before ?? '', c.after ?? '', c.evidence ?? '']);
      expect(row.date).toBe(doc.versions[c.version]!.committerTime);
    });
    // a field with a comma is quoted and comes back whole
    expect(changes.some((row) => row.evidence!.includes(','))).toBe(true);
    const versions = read('versions.csv');
    expect(versions.map((v) => [Number(v.tables), Number(v.columns), Number(v.foreign_keys), Number(v.counted_updates), Number(v.sink)])).toEqual(
      a.versions.map((v) => [v.tables, v.columns, v.foreignKeys, v.countedUpdates, v.classes.sink]),
    );
  });

  test('diff between two refs gives the changes extract found at that version', async () => {
    const commits = doc.versions.map((v) => v.commit);
    for (const v of [2, 8, 9]) {
      const r = await run(['diff', repo, commits[v - 1]!, commits[v]!, '--adapter', 'prisma', '--json', '--renames', 'heuristic']);
      expect(r.code).toBe(0);
      const got = JSON.parse(r.out) as { changes: unknown[] };
      expect(got.changes).toEqual(doc.changes.filter((c) => c.version === v).map(({ version: _v, ...rest }) => rest));
    }
    const text = await run(['diff', repo, commits[8]!, commits[9]!, '--adapter', 'prisma', '--no-color']);
    expect(text.out).toMatch(/^changes from \S+ \(\w{12}\) to \S+ \(\w{12}\): 5 changes in 5 tables$/m);
    expect(text.out).toMatch(/^ {2}foreign key changed +\(loan_id\) +.*on delete restrict.* -> .*on delete cascade/m);
  });
});

describe('extract checks the analysis options before it reads the history', () => {
  test('analysis options without --analyze, and bad values, are one-line usage errors', async () => {
    for (const args of [['--count', 'column-added'], ['--analyze', '--high-above', '-1'], ['--analyze', '--band-by', 'age'], ['--renames', 'guess']]) {
      const r = await run(['extract', repo, '--adapter', 'prisma', '-o', join(dir, 'never.json'), '--quiet', '--no-cache', ...args]);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.err.trimEnd().split('\n'), args.join(' ')).toHaveLength(1);
    }
  });
});
