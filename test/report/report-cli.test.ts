import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, test } from 'vitest';
import { analyzeDocument, buildReport, demoStory, documentFromSnapshots, serialiseDocument } from '@schema-strata/core';
import { coopSnapshotVersions } from '../fixtures/analysis/coop-story.js';
import { runCli, runMain, tempDir } from '../helpers/repo.js';

const { dir, cleanup } = tempDir('strata-report-cli-');
afterAll(cleanup);
const doc = documentFromSnapshots(coopSnapshotVersions({ stated: true }), { repository: 'work/coop' });
const history = join(dir, 'history.json');
writeFileSync(history, serialiseDocument(doc));

describe('schema-strata report', () => {
  test('writes the page the library builds, from a file without an embedded analysis', async () => {
    const out = join(dir, 'r.html');
    const r = await runMain(['report', history, '-o', out]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toBe(`wrote ${out}\n`);
    expect(readFileSync(out, 'utf8')).toBe(await buildReport(doc, analyzeDocument(doc)));
  });

  test('analysis options, --top and --title reach the page; -o - prints it', async () => {
    const r = await runMain(['report', history, '-o', '-', '--top', '2', '--high-above', '1', '--title', 'Co-op <test>']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('<title>Schema history: Co-op &lt;test&gt;</title>');
    expect(r.stdout).toContain('<em>high</em> (more than 1)');
    const rows = /<table class="data" id="most-changed-table">[\s\S]*?<tbody>([\s\S]*?)<\/tbody>/.exec(r.stdout)![1]!;
    expect(rows.match(/<tr>/g)).toHaveLength(2);
  });

  test('usage errors are one line and exit 2', () => {
    const bad = runCli(['report', join(dir, 'missing.json')]);
    expect(bad.code).toBe(2);
    expect(bad.stderr.trim().split('\n')).toHaveLength(1);
    const top = runCli(['report', history, '--top', '0', '-o', '-']);
    expect(top.code).toBe(2);
    expect(top.stderr).toMatch(/--top 0/);
  });
});

describe('the demo', () => {
  test('the story is the same at every telling (one process can run the demo in several ORMs)', () => {
    expect(JSON.stringify(demoStory())).toBe(JSON.stringify(demoStory()));
  });

  test('ends with report.html, the same bytes at every run', async () => {
    const a = join(dir, 'demo-a');
    const r = await runMain(['demo', a, '--quiet']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain(join(a, 'report.html'));
    const first = readFileSync(join(a, 'report.html'), 'utf8');
    expect(first).toContain('Schema history: the tool-lending co-op demo (prisma)');
    await runMain(['demo', a, '--quiet']);
    expect(readFileSync(join(a, 'report.html'), 'utf8')).toBe(first);
  });
});

describe('the one-install package', () => {
  test("its bin is the CLI, and it finds the adapters it depends on from any working directory", async () => {
    const { spawnSync } = await import('node:child_process');
    const { createRequire } = await import('node:module');
    const pkgFile = createRequire(import.meta.url).resolve('schema-strata/package.json');
    const pkg = JSON.parse(readFileSync(pkgFile, 'utf8')) as { bin: Record<string, string>; dependencies: Record<string, string> };
    const bin = join(pkgFile, '..', pkg.bin['schema-strata']!);
    const adapters = Object.keys(pkg.dependencies).filter((d) => d.startsWith('@schema-strata/adapter-')).map((d) => d.slice('@schema-strata/adapter-'.length));
    expect(adapters).toContain('prisma');
    const r = spawnSync(process.execPath, [bin, 'adapters'], { cwd: dir, encoding: 'utf8' });
    expect(r.status, r.stderr).toBe(0);
    for (const a of adapters) expect(r.stdout).toMatch(new RegExp(`^${a} \\d`, 'm'));
  });
});
