/** synonym_removed: terms of a continuing concept that went nowhere (not moved out). */
import type { Detector } from '../detector.js';
import { makeChange } from '../detector.js';
import { conceptEdits } from './conceptEdits.js';
import { termTextAt } from '../../load/releaseBytes.js';

export const synonymRemoved: Detector<'synonym_removed'> = {
  kind: 'synonym_removed',
  detect(ctx) {
    const out = [];
    for (const e of conceptEdits(ctx)) {
      const removed = e.o.removed.filter((t) => !(e.preferredChanged && t === e.oldPreferred));
      if (removed.length === 0) continue;
      out.push(makeChange('synonym_removed', [e.o.id], [e.n.id], removed.map((t) => ({ term: termTextAt(ctx.old, t), from: e.o.id, to: null, match: null })), 1, { count: removed.length }));
    }
    return out;
  },
};
