import { describe, expect, it } from 'vitest';
import type { Located, TreeView } from '@schema-strata/core';
import { importResolutions, locateTypeorm } from '@schema-strata/adapter-typeorm';
import { memoryTree } from './harness.js';

/**
 * The locate step keeps import resolutions from commit to commit of a walk and drops those that
 * a commit's added or removed paths, tsconfig files, package.json files or directories could
 * change. At every commit of a seeded random history it must give exactly what a locate of that
 * commit's tree alone gives (nothing kept). The history moves every imported module between the
 * forms an import can resolve to (a file of one extension or another, an index file, both at
 * once, neither), through relative imports, a `.js` import of a TypeScript source, tsconfig
 * `paths` and `baseUrl`, a tsconfig `extends` whose target comes and goes, and a workspace
 * package whose entry points into compiled output mapped back to its sources.
 */

function rng(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s * 1664525 + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

const E = 'packages/app/src/entities';

/** Each imported module: the paths it can live at, in the order the resolution prefers them. */
const MODULES: Record<string, { paths: string[]; text: (n: number) => string }> = {
  kind: {
    paths: [`${E}/kind.js`, `${E}/kind.ts`, `${E}/kind.tsx`, `${E}/kind/index.ts`],
    text: (n) => `export enum Kind {\n  A = 'a${n}',\n  B = 'b',\n}\n`,
  },
  row: {
    paths: [`${E}/row.ts`, `${E}/row.tsx`, `${E}/row/index.ts`, `${E}/row/index.js`],
    text: (n) => `import { Column } from 'typeorm';\n\nexport class Row {\n  @Column({ length: ${10 + n} })\n  note: string;\n}\n`,
  },
  code: {
    paths: ['libs/shared/src/code.ts', 'libs/shared/src/code/index.ts', 'libs/other/src/code.ts', 'libs/other/src/code/index.mts'],
    text: (n) => `import { Column } from 'typeorm';\n\nexport function Code() {\n  return Column({ type: 'varchar', length: ${20 + n} });\n}\n`,
  },
  label: {
    paths: ['shared/label.ts', 'shared/label/index.ts', 'shared/label.cts'],
    text: (n) => `import { Column } from 'typeorm';\n\nexport function Label() {\n  return Column({ length: ${30 + n} });\n}\n`,
  },
  base: {
    paths: ['packages/common/src/index.ts', 'packages/common/dist/index.ts', 'packages/common/index.ts', 'packages/common/dist/index.js'],
    text: (n) => `import { Column, PrimaryGeneratedColumn } from 'typeorm';\n\nexport abstract class Base {\n  @PrimaryGeneratedColumn()\n  id: number;\n  @Column({ default: ${n} })\n  rev: number;\n}\n`,
  },
};

function entity(i: number, dir: string): string {
  const up = dir === E ? '.' : '../entities';
  return [
    "import { Column, Entity } from 'typeorm';",
    "import { Base } from '@coop/common';",
    `import { Kind } from '${up}/kind.js';`,
    `import { Row } from '${up}/row';`,
    "import { Code } from '@lib/code';",
    "import { Label } from 'shared/label';",
    '',
    '@Entity()',
    `export class Tool${i} extends Base {`,
    "  @Column({ type: 'enum', enum: Kind })\n  kind: Kind;",
    '  @Column(() => Row)\n  row: Row;',
    '  @Code()\n  code: string;',
    '  @Label()\n  label: string;',
    '}',
    '',
  ].join('\n');
}

interface State {
  present: Record<string, Set<string>>;
  entities: Set<number>;
  pathsTarget: 'shared' | 'other';
  main: string;
  extendsBase: boolean;
  baseJson: boolean;
  strict: boolean;
  rev: number;
}

function files(st: State): Record<string, string> {
  const f: Record<string, string> = {};
  for (const [m, set] of Object.entries(st.present)) for (const p of set) f[p] = MODULES[m]!.text(st.rev);
  for (const i of st.entities) {
    const dir = i % 3 === 0 ? 'packages/app/src/more' : E;
    f[`${dir}/tool${i}.ts`] = entity(i, dir);
  }
  f['tsconfig.json'] = JSON.stringify({
    ...(st.extendsBase ? { extends: './tsconfig.base' } : {}),
    compilerOptions: { baseUrl: '.', paths: { '@lib/*': [`libs/${st.pathsTarget}/src/*`] } },
  });
  if (st.baseJson) f['tsconfig.base.json'] = JSON.stringify({ compilerOptions: { strict: st.strict } });
  f['packages/common/package.json'] = JSON.stringify({ name: '@coop/common', version: `1.${st.rev}.0`, main: st.main });
  f['packages/app/package.json'] = JSON.stringify({ name: '@coop/app', version: `1.${st.rev}.0` });
  return f;
}

/** Every commit's whole tree, and the paths it added, changed or removed. */
function history(seed: number, length: number): Array<{ files: Record<string, string>; changed: string[] }> {
  const rand = rng(seed);
  const pick = <T>(xs: readonly T[]): T => xs[Math.floor(rand() * xs.length)]!;
  const st: State = {
    present: Object.fromEntries(Object.entries(MODULES).map(([m, d]) => [m, new Set([d.paths[1]!])])),
    entities: new Set([1, 2, 3, 4, 5, 6]),
    pathsTarget: 'shared',
    main: 'dist/index.js',
    extendsBase: true,
    baseJson: true,
    strict: false,
    rev: 0,
  };
  const out: Array<Record<string, string>> = [];
  for (let k = 0; k < length; k++) {
    if (k > 0) {
      const r = rand();
      if (r < 0.5) {
        // a module moves, gains a second form or loses one
        const m = pick(Object.keys(MODULES));
        const p = pick(MODULES[m]!.paths);
        const set = st.present[m]!;
        if (set.has(p)) set.delete(p);
        else {
          if (rand() < 0.6) set.clear();
          set.add(p);
        }
      } else if (r < 0.6) {
        const i = 1 + Math.floor(rand() * 9);
        if (st.entities.has(i)) st.entities.delete(i);
        else st.entities.add(i);
      } else if (r < 0.66) st.pathsTarget = st.pathsTarget === 'shared' ? 'other' : 'shared';
      else if (r < 0.72) st.main = pick(['dist/index.js', 'index.js', 'src/index.ts', 'lib/index.js']);
      else if (r < 0.76) st.extendsBase = !st.extendsBase;
      else if (r < 0.8) st.baseJson = !st.baseJson;
      else if (r < 0.84) st.strict = !st.strict;
      // texts only: every resolution still holds
      else st.rev++;
    }
    out.push(files(st));
  }
  return withChanges(out);
}

/** Commits given as whole trees, with what each changed since the one before. */
function withChanges(trees: Array<Record<string, string>>): Array<{ files: Record<string, string>; changed: string[] }> {
  let before: Record<string, string> = {};
  return trees.map((now) => {
    const changed = [...new Set([...Object.keys(before), ...Object.keys(now)])].filter((p) => before[p] !== now[p]);
    before = now;
    return { files: now, changed };
  });
}

/** Locate every commit as one walk, then every commit's tree alone. */
async function walkAndAlone(seed: number, length: number): Promise<{ walked: Located[]; alone: Located[]; reused: number; resolved: number }> {
  return locateBoth(history(seed, length));
}

async function locateBoth(commits: Array<{ files: Record<string, string>; changed: string[] }>): Promise<{ walked: Located[]; alone: Located[]; reused: number; resolved: number }> {
  const id = {};
  const reused0 = importResolutions.reused;
  const resolved0 = importResolutions.resolved;
  const walked: Located[] = [];
  for (const c of commits) {
    const tree: TreeView = { ...memoryTree(c.files), walk: { id, changed: c.changed } };
    walked.push(await locateTypeorm(tree, { options: {} }));
  }
  const reused = importResolutions.reused - reused0;
  const resolved = importResolutions.resolved - resolved0;
  const alone: Located[] = [];
  for (const c of commits) alone.push(await locateTypeorm(memoryTree(c.files), { options: {} }));
  return { walked, alone, reused, resolved };
}

describe('import resolutions kept across the commits of a walk', () => {
  for (const seed of [3, 11, 29]) {
    it(`give at every commit what the commit's tree alone gives (seed ${seed})`, async () => {
      const { walked, alone, reused, resolved } = await walkAndAlone(seed, 90);
      walked.forEach((w, k) => expect(w, `commit ${k}`).toEqual(alone[k]));
      // the walk reused resolutions, and worked out again those a commit could change
      expect(reused).toBeGreaterThan(resolved);
      expect(resolved).toBeGreaterThan(walked[0]!.files.length);
      // and the history made the located files differ from commit to commit
      expect(new Set(alone.map((l) => l.files.join('\n'))).size).toBeGreaterThan(20);
    });
  }

  const tool = (imports: string): string =>
    `import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';\n${imports}\n\n@Entity()\nexport class Tool {\n  @PrimaryGeneratedColumn()\n  id: number;\n  @Code()\n  code: string;\n}\n`;
  const code = MODULES.code!.text(0);

  it('work a package import out again when a directory its entry maps into appears', async () => {
    // `main: dist/index.js`, no tsconfig outDir: the sources are looked for under src/ only when
    // that directory exists, so a src/ that appears (with an unrelated file first) changes what
    // the import resolves to once src/index.ts comes
    const pkg = { 'packages/common/package.json': JSON.stringify({ name: '@coop/common', main: 'dist/index.js' }), 'packages/app/src/tool.ts': tool("import { Code } from '@coop/common';") };
    const commits = withChanges([
      { ...pkg, 'packages/common/index.ts': code },
      { ...pkg, 'packages/common/index.ts': code, 'packages/common/src/notes.ts': 'export const notes = 1;\n' },
      { ...pkg, 'packages/common/index.ts': code, 'packages/common/src/notes.ts': 'export const notes = 1;\n', 'packages/common/src/index.ts': code },
      { ...pkg, 'packages/common/index.ts': code, 'packages/common/src/index.ts': code },
      { ...pkg, 'packages/common/index.ts': code },
    ]);
    const { walked, alone } = await locateBoth(commits);
    expect(alone.map((l) => l.files.includes('packages/common/src/index.ts'))).toEqual([false, false, true, true, false]);
    walked.forEach((w, k) => expect(w, `commit ${k}`).toEqual(alone[k]));
  });

  it("work a tsconfig paths import out again when the file a tsconfig's extends names changes", async () => {
    // `extends: './configs/base'` names configs/base.json before configs/base/tsconfig.json: a
    // JSON file there (not a tsconfig by its name) hides the paths of the other
    const base = {
      'tsconfig.json': JSON.stringify({ extends: './configs/base' }),
      'configs/base/tsconfig.json': JSON.stringify({ compilerOptions: { baseUrl: '../..', paths: { '@lib/*': ['libs/shared/src/*'] } } }),
      'libs/shared/src/code.ts': code,
      'packages/app/src/tool.ts': tool("import { Code } from '@lib/code';"),
    };
    const commits = withChanges([base, { ...base, 'configs/base.json': '{}\n' }, base]);
    const { walked, alone } = await locateBoth(commits);
    expect(alone.map((l) => l.files.includes('libs/shared/src/code.ts'))).toEqual([true, false, true]);
    walked.forEach((w, k) => expect(w, `commit ${k}`).toEqual(alone[k]));
  });
});
