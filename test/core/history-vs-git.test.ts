import { afterAll, describe, expect, it } from 'vitest';
import { extractHistory } from '@schema-strata/core';
import prisma from '@schema-strata/adapter-prisma';
import { day, git, LOAN, makeRepo, MEMBER, prismaSchema, tempDir, TOOL } from '../helpers/repo.js';

const tmp = tempDir();
afterAll(() => tmp.cleanup());

describe('the version list against git itself', () => {
  it('equals `git log --first-parent --follow` of the schema file, oldest first (oracle: git)', async () => {
    // A history with commits that do not touch the schema, a side branch merged into main
    // (its schema change is seen at the merge), a move of the schema file, and a
    // formatting-only change.
    const repo = await makeRepo(tmp.dir, 'follow', [
      { date: day(0), message: 'app skeleton', files: { 'src/app.ts': 'export {};\n' } },
      { date: day(1), message: 'schema', files: { 'schema.prisma': prismaSchema(MEMBER.replace('  loans Loan[]\n', '')) } },
      { date: day(2), message: 'app code', files: { 'src/app.ts': 'export const a = 1;\n' } },
      { date: day(3), message: 'tools', files: { 'schema.prisma': prismaSchema(MEMBER.replace('  loans Loan[]\n', '') + TOOL.replace('  loans Loan[]\n', '')) } },
      { date: day(4), message: 'start loans on a branch', branch: 'loans', from: 3, files: { 'schema.prisma': prismaSchema(MEMBER + TOOL + LOAN) } },
      { date: day(5), message: 'readme on main', files: { 'README.md': 'co-op\n' } },
      { date: day(6), message: 'merge loans', merge: 4, files: { 'schema.prisma': prismaSchema(MEMBER + TOOL + LOAN) } },
      { date: day(7), message: 'move the schema', files: { 'schema.prisma': null, 'prisma/schema.prisma': prismaSchema(MEMBER + TOOL + LOAN) } },
      { date: day(8), message: 'format', files: { 'prisma/schema.prisma': prismaSchema(MEMBER + TOOL + LOAN).replace(/ {2,}/g, ' ') } },
      { date: day(9), message: 'more app code', files: { 'src/app.ts': 'export const a = 2;\n' } },
    ]);
    const h = await extractHistory({ repo, adapter: prisma });
    const expected = git(repo, 'log', '--first-parent', '--follow', '--format=%H', '--', 'prisma/schema.prisma').trim().split('\n').reverse();
    expect(h.versions.map((v) => v.commit)).toEqual(expected);
    expect(h.versions.map((v) => v.subject)).toEqual(['schema', 'tools', 'merge loans', 'move the schema', 'format']);
    expect(h.versions.map((v) => v.status)).toEqual(['ok', 'ok', 'ok', 'no change', 'no change']);
    // the first parent of each version, as git records it
    for (const v of h.versions) expect(v.parent).toBe(git(repo, 'rev-parse', `${v.commit}^1`).trim());
    // blob ids as git records them
    const last = h.versions[h.versions.length - 1]!;
    expect(last.files).toEqual([{ path: 'prisma/schema.prisma', blob: git(repo, 'rev-parse', `${last.commit}:prisma/schema.prisma`).trim() }]);
    // dates as git records them (committer date, strict ISO 8601)
    expect(h.versions[0]!.committerTime).toBe(git(repo, 'log', '-1', '--format=%cI', h.versions[0]!.commit).trim());
  });

  it('follows a --path given at its head name back through the move (oracle: git --follow)', async () => {
    const repo = await makeRepo(tmp.dir, 'follow-path', [
      { date: day(0), message: 'schema in db/', files: { 'db/main.prisma': prismaSchema(MEMBER.replace('  loans Loan[]\n', '')) } },
      { date: day(1), message: 'tools', files: { 'db/main.prisma': prismaSchema(MEMBER.replace('  loans Loan[]\n', '') + TOOL.replace('  loans Loan[]\n', '')) } },
      { date: day(2), message: 'rename', files: { 'db/main.prisma': null, 'schema/coop.prisma': prismaSchema(MEMBER.replace('  loans Loan[]\n', '') + TOOL.replace('  loans Loan[]\n', '')) } },
      { date: day(3), message: 'loans', files: { 'schema/coop.prisma': prismaSchema(MEMBER + TOOL + LOAN) } },
    ]);
    const h = await extractHistory({ repo, adapter: prisma, paths: ['schema/coop.prisma'] });
    const expected = git(repo, 'log', '--first-parent', '--follow', '--format=%H', '--', 'schema/coop.prisma').trim().split('\n').reverse();
    expect(h.versions.map((v) => v.commit)).toEqual(expected);
    expect(h.versions.map((v) => v.files[0]!.path)).toEqual(['db/main.prisma', 'db/main.prisma', 'schema/coop.prisma', 'schema/coop.prisma']);
    expect(h.versions.map((v) => v.status)).toEqual(['ok', 'ok', 'no change', 'ok']);
  });
});
