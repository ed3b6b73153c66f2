/**
 * merge: two or more old concepts carried by one concept. `from` lists every merged concept,
 * the survivor included when it existed before; `to` is the survivor.
 */
import type { Detector } from '../detector.js';
import { makeChange } from '../detector.js';
import { groupConfidence, groupMoves, groupsOf, structuralEvidence } from './structural.js';

export const merge: Detector<'merge'> = {
  kind: 'merge',
  detect(ctx) {
    return groupsOf(ctx, 'merge').map((g) => {
      const survivor = ctx.new.conceptIds[g.news[0]];
      const absorbed = g.olds.map((c) => ctx.old.conceptIds[c]).filter((id) => id !== survivor);
      const node = ctx.news.get(g.news[0]);
      const from = [...absorbed];
      if (node && !node.created) from.push(survivor);
      from.sort();
      const ev = structuralEvidence(ctx, g);
      return makeChange('merge', from, [survivor], groupMoves(ctx, g), groupConfidence(ctx, g, ev), { ...ev, survivor, absorbed: absorbed.sort() });
    });
  },
};
