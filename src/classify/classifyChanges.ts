/**
 * classifyChanges: run every detector over the diff context and return the changes in a
 * deterministic order (by kind, as CHANGE_KINDS lists them, then by id).
 */
import { CHANGE_KINDS, type Change } from './types.js';
import { DETECTORS } from './detectors/index.js';
import type { DiffContext } from './context.js';

export function classifyChanges(ctx: DiffContext): Change[] {
  const out: Change[] = [];
  for (const kind of CHANGE_KINDS) {
    const found = (DETECTORS[kind].detect(ctx) as Change[]).sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
    out.push(...found);
  }
  return out;
}
