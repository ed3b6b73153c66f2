/** addition: a new active concept that no structural change accounts for. */
import type { Detector } from '../detector.js';
import { conceptLabel, makeChange } from '../detector.js';
import { categoryName } from '../context.js';
import type { TermMove } from '../types.js';
import { termTextAt } from '../../load/releaseBytes.js';

export const addition: Detector<'addition'> = {
  kind: 'addition',
  detect(ctx) {
    const out = [];
    for (const node of ctx.news.values()) {
      if (!node.created || !node.active || node.group !== -1) continue;
      // A new concept that carries the old meaning of a reused identifier is named by that id_reuse change.
      if ([...node.inflows.keys()].some((c) => { const o = ctx.olds.get(c); return o?.fate === 'reused' && o.carriers.includes(node.n); })) continue;
      const terms: TermMove[] = node.added.map((t) => ({ term: termTextAt(ctx.new, t), from: null, to: node.id, match: null }));
      const newShare = node.added.length / Math.max(1, node.terms.length);
      out.push(makeChange('addition', [], [node.id], terms, newShare, { preferred: conceptLabel(ctx.new, node.n), terms: node.terms.length, category: categoryName(ctx.new, node.n) }));
    }
    return out;
  },
};
