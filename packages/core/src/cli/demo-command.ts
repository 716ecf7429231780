import { existsSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import type { Command } from 'commander';
import { loadAdapter } from '../adapter/loader.js';
import { demoStory } from '../demo/story.js';
import { writeRepository, type ScriptedCommit } from '../demo/git-writer.js';
import { serialiseDocument } from '../interchange/document.js';
import { writeFileAtomic } from '../util/atomic-write.js';
import { UsageError, EXIT } from '../util/errors.js';
import { runExtract, type ExtractOptions } from './extract-command.js';
import type { CliIO } from './common.js';

const MARKER = '.schema-strata-demo';

/** Hooks that add outputs to the demo (the report, once installed), each returning the paths it wrote. */
export const demoHooks: Array<(dir: string, historyFile: string, io: CliIO) => Promise<string[]>> = [];

export function registerDemo(program: Command, io: CliIO, setCode: (c: number) => void): void {
  program
    .command('demo')
    .description('build a demo git repository (an invented tool-lending co-op) and analyse it')
    .argument('[dir]', 'directory for the demo repository and its outputs', 'schema-strata-demo')
    .option('--adapter <name>', 'ORM the demo story is written in', 'prisma')
    .option('--quiet', 'no progress on standard error')
    .action(async (dir: string, opts: { adapter: string; quiet?: boolean }) => {
      const out = resolve(dir);
      if (existsSync(out) && readdirSync(out).length > 0 && !existsSync(join(out, MARKER))) {
        throw new UsageError(`${dir} exists and is not an earlier demo directory; choose an empty or new directory`, EXIT.usage);
      }
      const loaded = await loadAdapter(opts.adapter);
      const render = loaded.adapter.renderDemo;
      if (!render) throw new UsageError(`adapter ${loaded.adapter.name} cannot write the demo story`, EXIT.usage);
      rmSync(out, { recursive: true, force: true });
      const story = demoStory();
      const files = render.call(loaded.adapter, story);
      const commits: ScriptedCommit[] = story.steps.map((s, i) => ({
        date: s.date,
        message: s.message,
        files: files[i]!.files,
        ...(files[i]!.replaceTree ? { replaceTree: true } : {}),
      }));
      const repo = join(out, 'repo');
      await writeRepository(repo, commits);
      writeFileSync(join(out, MARKER), 'made by schema-strata demo; safe to delete\n');
      const extractOpts: ExtractOptions = {
        adapter: opts.adapter, ref: 'HEAD', output: join(out, 'history.json'), maxFileSize: '5MB', cache: false, quiet: opts.quiet, analyze: true,
      };
      const { doc } = await runExtract(repo, extractOpts, io);
      writeFileAtomic(extractOpts.output, serialiseDocument(doc));
      const written = [repo, extractOpts.output];
      for (const hook of demoHooks) written.push(...(await hook(out, extractOpts.output, io)));
      const s = doc.summary;
      io.stdout.write(
        `demo (${loaded.adapter.name}): ${commits.length} commits, ${s.versions} versions, ${s.tableIds} tables, ${s.changes} changes\n` +
          written.map((p) => `  ${p}\n`).join(''),
      );
      setCode(EXIT.ok);
    });
}
