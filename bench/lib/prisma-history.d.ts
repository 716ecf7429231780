/** One commit of a synthetic history: its date, message and the files it writes. */
export interface SyntheticCommit {
  date: string;
  message: string;
  files: Record<string, string>;
}
/** The commits of a synthetic Prisma history (the schema file is `prisma/schema.prisma`). */
export function prismaHistoryCommits(opts?: { commits?: number; models?: number; seed?: number; startDate?: number; schemaShare?: number }): {
  commits: SyntheticCommit[];
};
/** Write the synthetic history to `dir`. */
export function makePrismaHistory(dir: string, opts?: { commits?: number; models?: number; seed?: number }): Promise<{ commits: number; models: number; appendOne(): Promise<void> }>;
export { rng } from './rng.js';
