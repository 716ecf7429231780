// A repository whose object store lacks a blob (a partial or damaged clone): git itself decides
// what it cannot read. Following a literal --path through renames makes `git log -M` read the
// contents of the renamed file, and git fails; the run must stop with a one-line error that says
// what is missing and what to do (exit 1), not an internal error. A glob, which is not followed
// through renames, reads the history, and the missing blob is a diagnostic of its version.
import { readdirSync, renameSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { execFileSync } from 'node:child_process';
import { afterAll, describe, expect, it } from 'vitest';
import { extractHistory, UsageError } from '@schema-strata/core';
import prisma from '@schema-strata/adapter-prisma';
import { day, git, makeRepo, runCli, tempDir } from '../helpers/repo.js';

const tmp = tempDir();
afterAll(() => tmp.cleanup());

const SCHEMA = (extra: string): string =>
  `datasource db {\n  provider = "postgresql"\n  url      = env("DATABASE_URL")\n}\n\nmodel Tool {\n  id    Int    @id @default(autoincrement())\n  label String\n  shelf String\n  notes String?\n${extra}}\n`;

/** A history whose schema file moves with an edit, then loses the blob of its first version. */
async function damagedRepo(name: string): Promise<{ repo: string; lost: string }> {
  const repo = await makeRepo(tmp.dir, name, [
    { date: day(0), message: 'tools', files: { 'prisma/schema.prisma': SCHEMA('') } },
    { date: day(1), message: 'move the schema', files: { 'prisma/schema.prisma': null, 'db/schema.prisma': SCHEMA('  lentAt DateTime?\n') } },
  ]);
  const lost = git(repo, 'rev-parse', 'HEAD~1:prisma/schema.prisma').trim();
  // the objects loose, then one of them gone
  const packs = join(repo, '.git', 'objects', 'pack');
  for (const f of readdirSync(packs).filter((x) => x.endsWith('.pack'))) {
    const moved = join(tmp.dir, `${name}-${f}`);
    renameSync(join(packs, f), moved);
    rmSync(join(packs, f.replace(/\.pack$/, '.idx')), { force: true });
    execFileSync('git', ['-C', repo, 'unpack-objects', '-q'], { input: execFileSync('cat', [moved]) });
  }
  rmSync(join(repo, '.git', 'objects', lost.slice(0, 2), lost.slice(2)));
  expect(() => git(repo, 'cat-file', '-e', lost)).toThrow();
  return { repo, lost };
}

describe('an object git cannot read (oracle: git itself)', () => {
  it('a literal --path followed through renames stops with a one-line error naming the object and the fixes', async () => {
    const { repo, lost } = await damagedRepo('literal');
    // what git says of the same log
    expect(() => git(repo, 'log', '-M', '--raw', '--first-parent', 'HEAD', '--', 'db/schema.prisma', 'prisma/schema.prisma')).toThrow(/unable to read/);
    const run = extractHistory({ repo, adapter: prisma, paths: ['db/schema.prisma'] });
    await expect(run).rejects.toBeInstanceOf(UsageError);
    await expect(run).rejects.toThrow(new RegExp(`cannot read object ${lost}.*give the paths as globs`));
    const cli = runCli(['extract', repo, '--adapter', 'prisma', '--path', 'db/schema.prisma', '--no-cache', '--quiet', '-o', join(tmp.dir, 'out.json')]);
    expect(cli.code).toBe(1);
    expect(cli.stderr.trim().split('\n')).toHaveLength(1);
    expect(cli.stderr).toMatch(/cannot read object/);
  });

  it('a glob reads the history, the missing blob a diagnostic of its version', async () => {
    const { repo } = await damagedRepo('glob');
    const h = await extractHistory({ repo, adapter: prisma, paths: ['**/schema.prisma'] });
    expect(h.versions.map((v) => v.status)).toEqual(['ok']);
    expect(h.diagnostics.map((d) => d.code)).toContain('file/missing');
  });
});
