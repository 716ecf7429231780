// Runs every benchmark of bench/ (files named *.bench.js), one after the other, each in its own
// process so that their peak memory figures do not mix. `pnpm bench [name...]` runs only some.
import { readdirSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';

const here = dirname(fileURLToPath(import.meta.url));
const wanted = process.argv.slice(2);
const files = readdirSync(here).filter((f) => f.endsWith('.bench.js')).sort()
  .filter((f) => wanted.length === 0 || wanted.some((w) => f.startsWith(w)));
let failed = 0;
for (const f of files) {
  console.log(`\n=== ${f} ===`);
  const r = spawnSync(process.execPath, [join(here, f)], { stdio: 'inherit' });
  if (r.status !== 0) failed++;
}
process.exitCode = failed > 0 ? 1 : 0;
