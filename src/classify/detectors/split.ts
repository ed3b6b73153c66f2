/** split: one old concept carried by two or more concepts; one part may keep the identifier. */
import type { Detector } from '../detector.js';
import { makeChange } from '../detector.js';
import { groupConfidence, groupMoves, groupsOf, structuralEvidence } from './structural.js';

export const split: Detector<'split'> = {
  kind: 'split',
  detect(ctx) {
    return groupsOf(ctx, 'split').map((g) => {
      const id = ctx.old.conceptIds[g.olds[0]];
      const parts = g.news.map((n) => ctx.new.conceptIds[n]).sort();
      const ev = structuralEvidence(ctx, g);
      return makeChange('split', [id], parts, groupMoves(ctx, g), groupConfidence(ctx, g, ev), { ...ev, kept_identifier: parts.includes(id) });
    });
  },
};
