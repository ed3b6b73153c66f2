/** replacement: one concept ended and one concept with a new identifier carries its meaning. */
import type { Detector } from '../detector.js';
import { makeChange } from '../detector.js';
import { groupConfidence, groupMoves, groupsOf, structuralEvidence } from './structural.js';

export const replacement: Detector<'replacement'> = {
  kind: 'replacement',
  detect(ctx) {
    return groupsOf(ctx, 'replacement').map((g) => {
      const ev = structuralEvidence(ctx, g);
      return makeChange('replacement', g.olds.map((c) => ctx.old.conceptIds[c]), g.news.map((n) => ctx.new.conceptIds[n]), groupMoves(ctx, g), groupConfidence(ctx, g, ev), ev);
    });
  },
};
