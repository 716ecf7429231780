// The V8 settings the CLI and a study's children run with (V8_FLAGS) are set with
// v8.setFlagsFromString, which ignores a flag this V8 does not know. Node's own command line
// refuses one ("bad option"), so each flag is checked there: a flag renamed or dropped by a later
// V8 fails this test instead of silently doing nothing.
import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { V8_FLAGS } from '../../src/util/v8-tuning.js';

describe('V8 settings', () => {
  it('are flags this Node accepts', () => {
    expect(V8_FLAGS.length).toBeGreaterThan(0);
    for (const flag of V8_FLAGS) {
      const r = spawnSync(process.execPath, [flag, '-e', '0'], { encoding: 'utf8' });
      expect(r.stderr, flag).toBe('');
      expect(r.status, flag).toBe(0);
    }
    const bad = spawnSync(process.execPath, ['--interrupt-budget-of-no-such-kind=1', '-e', '0'], { encoding: 'utf8' });
    expect(bad.status).not.toBe(0);
  });
});
