import { detectRenames, DEFAULT_RENAME_THRESHOLD, type RenameMatch, type RenameMode } from '../../changes/rename-heuristic.js';
import type { InterchangeDocument } from '../../interchange/document.js';
import { documentSteps } from './timeline.js';

/**
 * A document whose changes are recomputed with the chosen rename detection: `heuristic` finds
 * renames by name similarity and column overlap (each with its evidence); `stated` keeps only
 * the renames the ORM code states, undoing an earlier heuristic pass. The snapshots stay as they
 * are; the analysis replays heuristic renames from the changes.
 */
export function applyRenames(
  doc: InterchangeDocument,
  mode: RenameMode,
  threshold = DEFAULT_RENAME_THRESHOLD,
): { doc: InterchangeDocument; matches: RenameMatch[] } {
  const hasHeuristic = doc.changes.some((c) => c.basis === 'heuristic');
  if (mode === 'stated' && !hasHeuristic) return { doc, matches: [] };
  // a threshold above 1 accepts no match: the changes come out as extract computes them
  const { changes, matches } = detectRenames(documentSteps(doc), { threshold: mode === 'heuristic' ? threshold : 2 });
  return { doc: { ...doc, changes, summary: { ...doc.summary, changes: changes.length } }, matches };
}
