/**
 * An error the user can fix (bad option, not a repository, unknown ref...). The CLI prints its
 * message on one line, without a stack trace, and exits with `exitCode`.
 */
export class UsageError extends Error {
  readonly exitCode: number;
  constructor(message: string, exitCode = 2) {
    super(message);
    this.name = 'UsageError';
    this.exitCode = exitCode;
  }
}

/** Exit codes of the CLI (documented in the README). */
export const EXIT = {
  ok: 0,
  /** The run could not be done: not a repository, no schema found, unreadable input. */
  failure: 1,
  /** Bad command line: unknown option or command, missing argument, bad value. */
  usage: 2,
  /** `--strict`: the run completed, but diagnostics of severity error were reported. */
  diagnostics: 3,
  /** A bug in schema-strata. */
  internal: 70,
} as const;
