import type { LoggedCommit } from '../git/log-pass.js';

/**
 * Follow user-given literal paths (files or directories) back through renames and moves.
 * Returns, for every commit index of the log, the names the given paths had after that
 * commit. Paths given as globs are not followed: they match what they match.
 */
export function pathLineage(commits: readonly LoggedCommit[], paths: readonly string[]): string[][] {
  const out: string[][] = new Array(commits.length);
  let names = paths.map((p) => p.replace(/\/+$/, ''));
  for (let i = commits.length - 1; i >= 0; i--) {
    out[i] = [...names];
    const renames = commits[i]!.changes.filter((c) => c.status === 'R');
    if (renames.length === 0) continue;
    names = names.map((name) => {
      for (const r of renames) {
        if (r.path === name) return r.from;
      }
      // a directory moved: every rename into it comes from one old directory
      const inside = renames.filter((r) => r.path.startsWith(name + '/'));
      if (inside.length === 0) return name;
      const olds = new Set(
        inside.map((r) => {
          const rest = r.path.slice(name.length);
          return r.from.endsWith(rest) ? r.from.slice(0, r.from.length - rest.length) : null;
        }),
      );
      if (olds.size === 1) {
        const [old] = [...olds];
        if (old) return old;
      }
      return name;
    });
  }
  return out;
}
