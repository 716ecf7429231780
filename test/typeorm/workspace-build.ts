/**
 * The oracle for fixtures that are monorepos: the workspace is built as its own tools would build
 * it, then TypeORM builds its metadata. The files are written to a temporary directory, each
 * workspace package is linked under `node_modules/<its name>` as a workspace install links it,
 * each package is compiled by TypeScript from its own tsconfig (`tsconfig.build.json` when it has
 * one), in the order given, so that a sibling package's import resolves, at compile time, to the
 * declarations that package's build emitted (through its package.json `types`), and at run time,
 * by Node's own resolution, to its compiled JavaScript (through `main`). Only our own fixture code
 * is compiled and run.
 */
import { existsSync, mkdirSync, mkdtempSync, realpathSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import ts from 'typescript';
import { oracleTables, typeormMetadata, type OracleResult } from './oracle.js';
import type { DataSource } from 'typeorm';

export interface WorkspaceBuild {
  result: OracleResult;
  ds: DataSource;
  /** TypeScript's diagnostics of every package's build (empty when every import resolved and type-checked). */
  errors: string[];
}

/** The package directory of a dependency of the test workspace. */
const packageDir = (name: string): string => realpathSync(fileURLToPath(new URL(`../node_modules/${name}`, import.meta.url)));

/**
 * Build the workspace `files` (repository path -> text): compile `packages` (their directories, in
 * build order), load every compiled module whose name matches `load`, and let TypeORM build the
 * metadata of the entity classes they export.
 */
export async function buildWorkspace(files: Record<string, string>, packages: string[], load: RegExp = /\.entity\.js$/): Promise<WorkspaceBuild> {
  const root = mkdtempSync(join(tmpdir(), 'strata-workspace-'));
  try {
    for (const [p, text] of Object.entries(files)) {
      mkdirSync(dirname(join(root, p)), { recursive: true });
      writeFileSync(join(root, p), text);
    }
    // what a workspace install does: each package linked under its name, and the dependencies
    const link = (name: string, target: string): void => {
      const at = join(root, 'node_modules', name);
      mkdirSync(dirname(at), { recursive: true });
      symlinkSync(target, at, 'dir');
    };
    for (const dir of packages) link((JSON.parse(files[`${dir}/package.json`]!) as { name: string }).name, join(root, dir));
    for (const dep of ['typeorm', 'reflect-metadata']) link(dep, packageDir(dep));

    const errors: string[] = [];
    const emitted: string[] = [];
    for (const dir of packages) {
      const config = existsSync(join(root, dir, 'tsconfig.build.json')) ? join(root, dir, 'tsconfig.build.json') : join(root, dir, 'tsconfig.json');
      const parsed = ts.getParsedCommandLineOfConfigFile(config, {}, { ...ts.sys, onUnRecoverableConfigFileDiagnostic: (d) => errors.push(ts.flattenDiagnosticMessageText(d.messageText, ' ')) });
      if (!parsed) continue;
      const program = ts.createProgram({ rootNames: parsed.fileNames, options: parsed.options });
      for (const d of [...parsed.errors, ...ts.getPreEmitDiagnostics(program)]) {
        errors.push(`${d.file ? d.file.fileName.slice(root.length + 1) : dir}: ${ts.flattenDiagnosticMessageText(d.messageText, ' ')}`);
      }
      program.emit(undefined, (name, text) => {
        mkdirSync(dirname(name), { recursive: true });
        writeFileSync(name, text);
        if (name.endsWith('.js')) emitted.push(name);
      });
    }
    // Node's own resolution from the built tree (a require in the temporary directory)
    const requireThere = createRequire(join(root, 'package.json'));
    const modules = new Map<string, Record<string, unknown>>();
    for (const f of emitted.sort()) if (load.test(f)) modules.set(f.slice(root.length + 1), requireThere(f) as Record<string, unknown>);
    const ds = await typeormMetadata(modules);
    return { result: oracleTables(ds), ds, errors };
  } finally {
    rmSync(root, { recursive: true, force: true });
  }
}
