/** preferred_term_change: a continuing concept is named differently (beyond case and punctuation). */
import type { Detector } from '../detector.js';
import { makeChange } from '../detector.js';
import { conceptEdits } from './conceptEdits.js';
import type { TermMove } from '../types.js';
import { termTextAt } from '../../load/releaseBytes.js';

export const preferredTermChange: Detector<'preferred_term_change'> = {
  kind: 'preferred_term_change',
  detect(ctx) {
    return conceptEdits(ctx)
      .filter((e) => e.preferredChanged)
      .map((e) => {
        const before = e.oldPreferred >= 0 ? termTextAt(ctx.old, e.oldPreferred) : '';
        const after = e.newPreferred >= 0 ? termTextAt(ctx.new, e.newPreferred) : '';
        const link = e.oldPreferred >= 0 ? ctx.align.links[ctx.align.linkOfOld[e.oldPreferred]] : undefined;
        const kept = link !== undefined && ctx.new.termConcept[link.newTerm] === e.n.n && link.newTerm !== e.newPreferred;
        const terms: TermMove[] = [];
        if (before) terms.push({ term: before, from: e.o.id, to: link && ctx.new.termConcept[link.newTerm] === e.n.n ? e.n.id : null, match: link?.level ?? null });
        if (after) terms.push({ term: after, from: ctx.align.linkOfNew[e.newPreferred] >= 0 ? e.o.id : null, to: e.n.id, match: ctx.align.linkOfNew[e.newPreferred] >= 0 ? ctx.align.links[ctx.align.linkOfNew[e.newPreferred]].level : null });
        return makeChange('preferred_term_change', [e.o.id], [e.n.id], terms, 1, { before, after, old_preferred_kept_as_synonym: kept });
      });
  },
};
