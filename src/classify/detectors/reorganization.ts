/** reorganization: a many-to-many group that is no merge and no split; its flow matrix is the evidence. */
import type { Detector } from '../detector.js';
import { makeChange } from '../detector.js';
import { groupConfidence, groupMoves, groupsOf, structuralEvidence } from './structural.js';

export const reorganization: Detector<'reorganization'> = {
  kind: 'reorganization',
  detect(ctx) {
    return groupsOf(ctx, 'reorganization').map((g) => {
      const ev = structuralEvidence(ctx, g);
      return makeChange('reorganization', g.olds.map((c) => ctx.old.conceptIds[c]).sort(), g.news.map((n) => ctx.new.conceptIds[n]).sort(), groupMoves(ctx, g), groupConfidence(ctx, g, ev), ev);
    });
  },
};
