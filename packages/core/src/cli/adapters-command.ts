import type { Command } from 'commander';
import { installedAdapters } from '../adapter/loader.js';
import type { CliIO } from './common.js';
import { EXIT } from '../util/errors.js';

export function registerAdapters(program: Command, io: CliIO, setCode: (c: number) => void): void {
  program
    .command('adapters')
    .description('list the installed ORM adapters and their options')
    .action(async () => {
      const list = await installedAdapters();
      if (list.length === 0) io.stdout.write('no adapter is installed\n');
      for (const { adapter, source } of list) {
        io.stdout.write(`${adapter.name} ${adapter.version}  (${source})\n  ${adapter.description ?? ''}\n`);
        for (const o of adapter.options ?? []) {
          io.stdout.write(`  --${o.flag}${o.type === 'boolean' ? '' : ' <value>'}  ${o.description}${o.default !== undefined ? ` (default ${String(o.default)})` : ''}\n`);
        }
      }
      setCode(EXIT.ok);
    });
}
