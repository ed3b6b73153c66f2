/**
 * id_reuse: the identifier is kept and active, but its old and new terms are lexically
 * unrelated (no term matched at any level and the best term-pair similarity is below
 * `reuseSimilarity`). The most dangerous change: every mapping to the code now points at a
 * different meaning. Confidence is lowered a little when category and parents stayed the same,
 * since a complete renaming is then more plausible; it is never suppressed.
 */
import type { Detector } from '../detector.js';
import { makeChange } from '../detector.js';
import { categoryName, termSetSimilarity, round } from '../context.js';
import { activeTerms } from '../../align/alignTerms.js';
import { termTextAt } from '../../load/releaseBytes.js';
import { graphOf } from '../../load/hierarchyGraph.js';

export const idReuse: Detector<'id_reuse'> = {
  kind: 'id_reuse',
  detect(ctx) {
    const out = [];
    for (const o of ctx.olds.values()) {
      if (o.fate !== 'reused') continue;
      const n = ctx.align.sameId[o.c];
      const before = o.terms.map((t) => termTextAt(ctx.old, t));
      const newTerms = activeTerms(ctx.new, n);
      const after = newTerms.map((t) => termTextAt(ctx.new, t));
      const similarity = round(termSetSimilarity(before, after));
      const categoryBefore = categoryName(ctx.old, o.c);
      const categoryAfter = categoryName(ctx.new, n);
      const ph = ctx.input.oldHierarchy && graphOf(ctx.input.oldHierarchy).parentsOf(o.id)?.join('|');
      const nh = ctx.input.newHierarchy && graphOf(ctx.input.newHierarchy).parentsOf(o.id)?.join('|');
      const contextKept = categoryBefore === categoryAfter && (ph === undefined || ph === nh);
      const wentTo = [...o.flows.keys()].filter((k) => k !== n).map((k) => ctx.new.conceptIds[k]).sort();
      const terms = [
        ...o.terms.map((t) => ({ term: termTextAt(ctx.old, t), from: o.id, to: null, match: null })),
        ...newTerms.map((t) => ({ term: termTextAt(ctx.new, t), from: null, to: o.id, match: null })),
      ];
      // `to`: the reused identifier, then the concepts that now carry the old meaning.
      const carriers = o.carriers.map((k) => ctx.new.conceptIds[k]).sort();
      out.push(makeChange('id_reuse', [o.id], [o.id, ...carriers], terms, (1 - similarity) * (contextKept ? 0.85 : 1), {
        terms_before: before, terms_after: after, similarity, category_before: categoryBefore, category_after: categoryAfter, old_terms_went_to: wentTo,
      }));
    }
    return out;
  },
};
