/** addition: a new active concept that no structural change accounts for. */
import type { Detector } from '../detector.js';
import { conceptLabel, makeChange } from '../detector.js';
import { categoryName } from '../context.js';
import type { TermMove } from '../types.js';

export const addition: Detector<'addition'> = {
  kind: 'addition',
  detect(ctx) {
    const out = [];
    for (const node of ctx.news.values()) {
      if (!node.created || !node.active || node.group !== -1) continue;
      const terms: TermMove[] = node.added.map((t) => ({ term: ctx.new.termText[t], from: null, to: node.id, match: null }));
      const newShare = node.added.length / Math.max(1, node.terms.length);
      out.push(makeChange('addition', [], [node.id], terms, newShare, { preferred: conceptLabel(ctx.new, node.n), terms: node.terms.length, category: categoryName(ctx.new, node.n) }));
    }
    return out;
  },
};
