/**
 * classifyChanges: run every detector over the diff context and return the changes in a
 * deterministic order (by kind, as CHANGE_KINDS lists them, then by id).
 */
import { CHANGE_KINDS, type Change, type ChangeKind } from './types.js';
import { DETECTORS } from './detectors/index.js';
import type { DiffContext } from './context.js';

/**
 * Every detector's `prepare` runs first (the retirement detector starts its successor searches
 * there, which run on the index's worker thread while the other detectors run here), and kinds
 * that wait for the new release's index run last (rescore/indexThread.ts). Detectors are
 * independent of each other, so the order they run in changes nothing but the wait.
 */
const LAST: readonly ChangeKind[] = ['retirement'];

export function classifyChanges(ctx: DiffContext): Change[] {
  for (const kind of CHANGE_KINDS) DETECTORS[kind].prepare?.(ctx);
  const found = new Map<ChangeKind, Change[]>();
  for (const kind of [...CHANGE_KINDS.filter((k) => !LAST.includes(k)), ...LAST]) {
    found.set(kind, (DETECTORS[kind].detect(ctx) as Change[]).sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0)));
  }
  return CHANGE_KINDS.flatMap((kind) => found.get(kind)!);
}
