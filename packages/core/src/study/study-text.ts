import type { RepositoryOutcome } from './runner.js';

/** What became of the repositories of a run: counts, then each failure with its reason. */
export function formatRunSummary(outcomes: readonly RepositoryOutcome[], output: string): string {
  const n = (s: RepositoryOutcome['status']): number => outcomes.filter((o) => o.status === s).length;
  const failed = outcomes.filter((o) => o.status === 'failed');
  const lines = [
    `study of ${outcomes.length} repositor${outcomes.length === 1 ? 'y' : 'ies'}: ${n('extracted')} extracted, ${n('unchanged')} unchanged since the last run, ${failed.length} failed; results in ${output}`,
  ];
  if (failed.length > 0) {
    lines.push(`failed (${failed.length}):`);
    for (const o of failed) lines.push(`  ${o.label}: ${o.reason ?? 'unknown reason'}${o.earlier ? ' (failed the same way in the last run; --retry-failed runs it again)' : ''}`);
  }
  return lines.join('\n') + '\n';
}
