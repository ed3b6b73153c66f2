/**
 * moved_synonym: terms that left one concept for another without being part of a structural
 * change (a merge, split, replacement or reorganization). Also reported when the source
 * concept then ended: the stray term is where its meaning may have gone.
 */
import type { Detector } from '../detector.js';
import { makeChange, movesOf, statusOf } from '../detector.js';
import { isActive } from '../context.js';

const LEVEL_CONFIDENCE = { term_id: 1, exact: 1, folded: 0.95, lexical: 0.85 } as const;

export const movedSynonym: Detector<'moved_synonym'> = {
  kind: 'moved_synonym',
  detect(ctx) {
    const out = [];
    for (const o of ctx.olds.values()) {
      const self = ctx.align.sameId[o.c];
      const group = o.group >= 0 ? ctx.groups[o.group] : undefined;
      for (const n of [...o.flows.keys()].sort((a, b) => a - b)) {
        if (n === self || !isActive(ctx.new, n)) continue;
        if (group && group.news.includes(n)) continue;
        if (o.fate === 'reused' && o.carriers.includes(n)) continue; // part of the id_reuse change
        const to = ctx.new.conceptIds[n];
        const moves = movesOf(ctx, o, n);
        const conf = Math.min(...moves.map((m) => LEVEL_CONFIDENCE[m.match ?? 'lexical']));
        out.push(makeChange('moved_synonym', [o.id], [to], moves, conf, { source_status: statusOf(ctx, o.id), target_existed: !ctx.news.get(n)?.created }));
      }
    }
    return out;
  },
};
