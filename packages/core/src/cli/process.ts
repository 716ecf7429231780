import { main } from './main.js';
import { tuneV8 } from '../util/v8-tuning.js';

/**
 * Run the CLI as the process: arguments from `process.argv`, the exit code set from the result.
 * Output piped into a program that stops reading (`| head`) ends the run quietly, as
 * command-line tools do. The process runs with the tool's V8 settings (`tuneV8`).
 */
export function runAsProcess(): void {
  tuneV8();
  process.stdout.on('error', (err: NodeJS.ErrnoException) => {
    if (err.code === 'EPIPE') process.exit(0);
    throw err;
  });
  main(process.argv.slice(2)).then(
    (code) => {
      process.exitCode = code;
    },
    (err: unknown) => {
      process.stderr.write(`schema-strata: internal error: ${err instanceof Error ? err.message : String(err)}\n`);
      process.exitCode = 70;
    },
  );
}
