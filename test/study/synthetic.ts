import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { ROOT } from '../helpers/repo.js';

interface PrismaHistoryLib {
  makePrismaHistory(dir: string, opts: { commits: number; models: number; seed: number }): Promise<{ commits: number; models: number; appendOne(): Promise<void> }>;
}

/** The benchmarks' synthetic Prisma history generator (bench/lib/prisma-history.js: deterministic, seedable). */
export async function prismaHistoryLib(): Promise<PrismaHistoryLib> {
  return (await import(pathToFileURL(join(ROOT, 'bench', 'lib', 'prisma-history.js')).href)) as PrismaHistoryLib;
}

/** `n` synthetic repositories `<root>/<prefix><i>` (seeds 1..n), each of `commits` commits growing to `models` models. */
export async function makeSyntheticRepos(root: string, n: number, opts: { commits: number; models: number; prefix?: string }): Promise<string[]> {
  const lib = await prismaHistoryLib();
  const out: string[] = [];
  for (let i = 1; i <= n; i++) {
    const dir = join(root, `${opts.prefix ?? 'coop'}${i}`);
    await lib.makePrismaHistory(dir, { commits: opts.commits, models: opts.models, seed: i });
    out.push(dir);
  }
  return out;
}

/** Write a JSON corpus file and return its path. */
export function writeCorpus(path: string, corpus: unknown): string {
  writeFileSync(path, JSON.stringify(corpus, null, 2) + '\n');
  return path;
}
