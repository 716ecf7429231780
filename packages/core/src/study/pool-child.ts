/**
 * A child process of the study's worker pool (see `pool.ts`): it runs one repository job at a
 * time and answers with its outcome. It ends when its parent goes away.
 */
import { logInParts } from '../git/log-pass.js';
import { runRepository, type RepositoryJob } from './runner.js';
import { tuneV8 } from '../util/v8-tuning.js';

tuneV8();

// the pool runs repositories side by side: each one's log in one git process
logInParts(false);

const reply = (m: object): void => {
  // the parent may be gone (a killed worker): the result is on disk anyway
  if (process.connected) process.send?.(m, () => undefined);
};

process.on('disconnect', () => process.exit(0));
process.on('message', (msg: { id: number; job: RepositoryJob }) => {
  runRepository(msg.job).then(
    (result) => reply({ id: msg.id, ok: true, result }),
    (e: unknown) => reply({ id: msg.id, ok: false, error: e instanceof Error ? e.message : String(e) }),
  );
});
