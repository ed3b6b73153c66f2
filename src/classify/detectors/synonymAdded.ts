/** synonym_added: new terms of a continuing concept that came from nowhere (not moved in). */
import type { Detector } from '../detector.js';
import { makeChange } from '../detector.js';
import { conceptEdits } from './conceptEdits.js';
import { termTextAt } from '../../load/releaseBytes.js';

export const synonymAdded: Detector<'synonym_added'> = {
  kind: 'synonym_added',
  detect(ctx) {
    const out = [];
    for (const e of conceptEdits(ctx)) {
      const added = e.n.added.filter((t) => !(e.preferredChanged && t === e.newPreferred));
      if (added.length === 0) continue;
      out.push(makeChange('synonym_added', [e.o.id], [e.n.id], added.map((t) => ({ term: termTextAt(ctx.new, t), from: null, to: e.n.id, match: null })), 1, { count: added.length }));
    }
    return out;
  },
};
