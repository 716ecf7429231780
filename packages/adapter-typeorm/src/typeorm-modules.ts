import { posix } from 'node:path';
import picomatch from 'picomatch';
import type { TsconfigFact } from './typeorm-parse.js';

/**
 * Module resolution as TypeScript's `node`/`bundler` resolution does it for the project's own
 * files (relative specifiers, tsconfig `baseUrl` and `paths`, index files, `.js` specifiers
 * standing for `.ts` files), over the paths of one commit's tree. Shared by the locate step and
 * the assembly, so that both follow the same files.
 */

const EXTENSIONS = ['.ts', '.tsx', '.mts', '.cts', '.d.ts', '.js', '.jsx', '.mjs', '.cjs'];
const JS_TO_TS: Record<string, string[]> = { '.js': ['.ts', '.tsx'], '.jsx': ['.tsx'], '.mjs': ['.mts'], '.cjs': ['.cts'] };

export const SOURCE_FILE = /\.(tsx?|mts|cts|jsx?|mjs|cjs)$/;
export const isDeclarationFile = (p: string): boolean => /\.d\.[cm]?ts$/.test(p);

export type Resolved =
  | { kind: 'typeorm'; sub: string }
  | { kind: 'file'; path: string }
  /** A project file the specifier names, absent from the tree. */
  | { kind: 'missing'; path: string }
  | { kind: 'external'; module: string };

/** The compiler options of one tsconfig chain that matter here, with paths made relative to the repository root. */
export interface TsconfigView {
  /** The tsconfig files of the chain, nearest first. */
  files: string[];
  strictNullChecks: boolean;
  baseUrl?: string;
  /** `paths` patterns with their targets (relative to the repository root). */
  paths?: Array<{ pattern: string; targets: string[] }>;
  outDir?: string;
  rootDir?: string;
  /** Set when an `extends` names a package or a missing file, whose settings are unknown. */
  unknownBase?: string;
}

const norm = (p: string): string => {
  const n = posix.normalize(p).replace(/^\.\//, '').replace(/\/+$/, '');
  return n === '.' ? '' : n;
};

/** Join a repository-relative directory and a relative path; null when it leaves the repository. */
export function joinRepo(dir: string, rel: string): string | null {
  const n = norm(posix.join(dir || '.', rel));
  return n.startsWith('../') || n === '..' ? null : n;
}

/**
 * The view of the tsconfig chain starting at `path`: compiler options merged along `extends`
 * (a relative file; a package base is noted as unknown).
 */
export function tsconfigView(path: string, factsOf: (p: string) => TsconfigFact | undefined, has: (p: string) => boolean): TsconfigView {
  const chain: Array<{ path: string; fact: TsconfigFact }> = [];
  let unknownBase: string | undefined;
  const visit = (p: string, depth: number): void => {
    if (depth > 8 || chain.some((c) => c.path === p)) return;
    const fact = factsOf(p);
    if (!fact) return;
    chain.push({ path: p, fact });
    for (const ext of fact.extends ?? []) {
      if (ext.startsWith('.') || ext.startsWith('/')) {
        const base = joinRepo(posix.dirname(p), ext);
        const cand = base === null ? [] : [base, base + '.json', `${base}/tsconfig.json`];
        const found = cand.find((c) => has(c));
        if (found) visit(found, depth + 1);
        else unknownBase = ext;
      } else unknownBase = ext;
    }
  };
  visit(path, 0);
  const view: TsconfigView = { files: chain.map((c) => c.path), strictNullChecks: false };
  // nearest wins: walk from the farthest base to the file itself
  let strict: boolean | undefined;
  let snc: boolean | undefined;
  for (let i = chain.length - 1; i >= 0; i--) {
    const { path: p, fact } = chain[i]!;
    const dir = posix.dirname(p) === '.' ? '' : posix.dirname(p);
    if (fact.strict !== undefined) strict = fact.strict;
    if (fact.strictNullChecks !== undefined) snc = fact.strictNullChecks;
    if (fact.baseUrl !== undefined) view.baseUrl = joinRepo(dir, fact.baseUrl) ?? '';
    if (fact.paths) {
      const base = fact.baseUrl !== undefined ? joinRepo(dir, fact.baseUrl) ?? '' : dir;
      view.paths = Object.entries(fact.paths).map(([pattern, targets]) => ({ pattern, targets: targets.map((t) => joinRepo(base, t) ?? t) }));
    }
    if (fact.outDir !== undefined) view.outDir = joinRepo(dir, fact.outDir) ?? undefined;
    if (fact.rootDir !== undefined) view.rootDir = joinRepo(dir, fact.rootDir) ?? undefined;
  }
  view.strictNullChecks = snc ?? strict ?? false;
  if (unknownBase) view.unknownBase = unknownBase;
  return view;
}

/** The nearest `tsconfig.json` in the directories above a file, or undefined. */
export function nearestTsconfig(file: string, has: (p: string) => boolean): string | undefined {
  let dir = posix.dirname(file);
  for (;;) {
    const d = dir === '.' ? '' : dir;
    const p = d ? `${d}/tsconfig.json` : 'tsconfig.json';
    if (has(p)) return p;
    if (!d) return undefined;
    dir = posix.dirname(d);
  }
}

/** Resolves import specifiers of the project's files against one commit's paths. */
export class ModuleResolver {
  private readonly memo = new Map<string, Resolved>();

  constructor(
    private readonly has: (p: string) => boolean,
    private readonly tsconfigOf: (file: string) => TsconfigView | undefined,
  ) {}

  private tryFile(base: string): string | undefined {
    const ext = posix.extname(base);
    if (ext && this.has(base) && SOURCE_FILE.test(base)) return base;
    const ts = JS_TO_TS[ext];
    if (ts) {
      const stem = base.slice(0, -ext.length);
      for (const e of ts) if (this.has(stem + e)) return stem + e;
    }
    for (const e of EXTENSIONS) if (this.has(base + e)) return base + e;
    for (const e of EXTENSIONS) if (this.has(`${base}/index${e}`)) return `${base}/index${e}`;
    return undefined;
  }

  resolve(from: string, spec: string): Resolved {
    const key = `${posix.dirname(from)}\u0000${spec}`;
    let r = this.memo.get(key);
    if (!r) {
      r = this.resolveUncached(from, spec);
      this.memo.set(key, r);
    }
    return r;
  }

  private resolveUncached(from: string, spec: string): Resolved {
    if (spec === 'typeorm' || spec.startsWith('typeorm/')) return { kind: 'typeorm', sub: spec.slice('typeorm'.length).replace(/^\//, '') };
    if (spec.startsWith('./') || spec.startsWith('../') || spec === '.' || spec === '..') {
      const base = joinRepo(posix.dirname(from), spec);
      if (base === null) return { kind: 'external', module: spec };
      const found = this.tryFile(base);
      return found ? { kind: 'file', path: found } : { kind: 'missing', path: base };
    }
    const cfg = this.tsconfigOf(from);
    if (cfg?.paths) {
      let matchedAny = false;
      for (const { pattern, targets } of cfg.paths) {
        const star = pattern.indexOf('*');
        let rest: string | null = null;
        if (star < 0) rest = pattern === spec ? '' : null;
        else {
          const pre = pattern.slice(0, star);
          const post = pattern.slice(star + 1);
          if (spec.startsWith(pre) && spec.endsWith(post) && spec.length >= pre.length + post.length) rest = spec.slice(pre.length, spec.length - post.length);
        }
        if (rest === null) continue;
        matchedAny = true;
        for (const t of targets) {
          const cand = t.includes('*') ? t.replace('*', rest) : t;
          const found = this.tryFile(norm(cand));
          if (found) return { kind: 'file', path: found };
        }
      }
      if (matchedAny && !spec.startsWith('@') ) return { kind: 'missing', path: spec };
    }
    if (cfg?.baseUrl !== undefined) {
      const base = joinRepo(cfg.baseUrl, spec);
      if (base !== null) {
        const found = this.tryFile(base);
        if (found) return { kind: 'file', path: found };
      }
    }
    return { kind: 'external', module: spec };
  }
}

/** A glob matcher over repository-relative paths (picomatch, as core uses). */
export function globMatcher(globs: readonly string[]): (p: string) => boolean {
  if (globs.length === 0) return () => false;
  return picomatch(globs as string[], { dot: true });
}
