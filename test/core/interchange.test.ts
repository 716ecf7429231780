import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { runCli, tempDir, ROOT } from '../helpers/repo.js';
import { schemaErrors } from '../helpers/validate.js';

const tmp = tempDir();
afterAll(() => tmp.cleanup());

describe('the demo and its interchange file', () => {
  const dir = join(tmp.dir, 'demo');
  let doc: any;

  it('builds a repository of at least 30 commits over two simulated years and writes history.json', () => {
    const r = runCli(['demo', dir, '--quiet']);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain(join(dir, 'history.json'));
    doc = JSON.parse(readFileSync(join(dir, 'history.json'), 'utf8'));
    expect(doc.versions.length).toBeGreaterThanOrEqual(30);
    const first = Date.parse(doc.summary.firstDate);
    const last = Date.parse(doc.summary.lastDate);
    expect((last - first) / 86_400_000).toBeGreaterThan(700);
  });

  it('validates against the JSON Schema (ajv, draft 2020-12)', () => {
    expect(schemaErrors(doc)).toEqual([]);
  });

  it('holds every event the demo promises', () => {
    const kinds = new Set(doc.changes.map((c: { kind: string }) => c.kind));
    for (const k of ['table-added', 'table-removed', 'column-added', 'column-removed', 'column-type-changed', 'primary-key-changed',
      'foreign-key-added', 'foreign-key-removed', 'foreign-key-changed', 'column-unique-changed', 'column-enum-values-changed']) {
      expect(kinds, k).toContain(k);
    }
    const laterBorn = doc.changes.filter((c: { kind: string; version: number }) => c.kind === 'table-added' && c.version > 0);
    expect(laterBorn.length).toBeGreaterThan(5);
    const statuses = doc.versions.map((v: { status: string }) => v.status);
    expect(statuses).toContain('carried');
    expect(statuses).toContain('no change');
    const tables = Object.values(doc.tables) as Array<{ kind: string; foreignKeys: Array<{ referencedTable: string }>; id: string }>;
    expect(tables.some((t) => t.kind === 'implicit-join')).toBe(true);
    expect(tables.some((t) => t.foreignKeys.some((f) => f.referencedTable === t.id))).toBe(true);
    const carried = doc.versions.find((v: { status: string }) => v.status === 'carried');
    const parseError = carried.diagnostics.find((d: { code: string }) => d.code === 'prisma/parse-error');
    expect(parseError.file).toBe('prisma/schema.prisma');
    expect(parseError.line).toBeGreaterThan(0);
    expect(parseError.message).not.toMatch(/\u001b\[/);
  });

  it('is deterministic: the same input gives the same bytes, and no absolute local path is in it', () => {
    const again = join(tmp.dir, 'again.json');
    const r = runCli(['extract', join(dir, 'repo'), '-o', again, '--no-cache', '--quiet'], { cwd: tmp.dir });
    expect(r.code).toBe(0);
    const a = readFileSync(again, 'utf8');
    const r2 = runCli(['extract', join(dir, 'repo'), '-o', '-', '--quiet'], { cwd: tmp.dir, env: { XDG_CACHE_HOME: join(tmp.dir, 'xdg') } });
    expect(r2.stdout).toBe(a);
    // the only local path is the repository as the user typed it
    const withoutSource = a.split(JSON.stringify(join(dir, 'repo'))).join('""');
    expect(withoutSource).not.toContain(tmp.dir);
    expect(withoutSource).not.toContain(ROOT);
  });

  it('refuses to overwrite a directory that is not an earlier demo', () => {
    const r = runCli(['demo', ROOT, '--quiet']);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('is not an earlier demo directory');
  });

  it('`show` prints the schema rebuilt at one commit, as text and as JSON', () => {
    const text = runCli(['show', join(dir, 'repo'), '--ref', 'HEAD~30']);
    expect(text.code).toBe(0);
    expect(text.stdout).toContain('members');
    expect(text.stdout).toMatch(/id\s+integer\s+not null\s+primary key, default autoincrement\(\)\s+Int/);
    const json = runCli(['show', join(dir, 'repo'), '--json']);
    const s = JSON.parse(json.stdout);
    expect(s.tables.map((t: { id: string }) => t.id)).toContain('favourites');
    const fav = s.tables.find((t: { id: string }) => t.id === 'favourites');
    expect(fav.primaryKey).toEqual(['member_id', 'tool_id']);
    expect(fav.origin.file).toBe('prisma/schema.prisma');
  });
});

describe('the codebook', () => {
  it('docs/codebook.md is generated from the JSON Schema and up to date', async () => {
    const { spawnSync } = await import('node:child_process');
    const r = spawnSync(process.execPath, [join(ROOT, 'scripts', 'make-codebook.mjs'), '--check'], { encoding: 'utf8' });
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
  });

  it('every field of the JSON Schema has a description', () => {
    const schema = JSON.parse(readFileSync(join(ROOT, 'packages', 'core', 'schema', 'history.schema.json'), 'utf8'));
    const missing: string[] = [];
    const walk = (s: any, path: string): void => {
      if (!s || typeof s !== 'object') return;
      for (const [k, v] of Object.entries<any>(s.properties ?? {})) {
        if (!v.description) missing.push(`${path}.${k}`);
        walk(v, `${path}.${k}`);
      }
      for (const [k, v] of Object.entries<any>(s.$defs ?? {})) walk(v, `$defs.${k}`);
      if (s.items) walk(s.items, `${path}[]`);
    };
    walk(schema, '');
    expect(missing).toEqual([]);
  });
});
