/** hierarchy_change: a concept active in both releases (and not reused) has different parents. */
import type { Detector } from '../detector.js';
import { makeChange } from '../detector.js';
import { isActive } from '../context.js';
import { graphOf, sameParentNodes } from '../../load/hierarchyGraph.js';

export const hierarchyChange: Detector<'hierarchy_change'> = {
  kind: 'hierarchy_change',
  detect(ctx) {
    const oh = ctx.input.oldHierarchy;
    const nh = ctx.input.newHierarchy;
    if (!oh || !nh) return [];
    const out = [];
    // Every concept of the old release with the same id in the new one (the alignment's match of
    // the two id lists), in the release's id order; its node in each hierarchy from one merge of
    // the id lists (load/hierarchyGraph.ts), and the parent lists compared as integers.
    const og = graphOf(oh);
    const ng = graphOf(nh);
    const oldNodes = og.conceptNodes(ctx.old);
    const newNodes = ng.conceptNodes(ctx.new);
    const oldInNew = og.nodesIn(ng);
    const match = ctx.align.sameId;
    for (let c = 0; c < ctx.old.conceptCount; c++) {
      const n = match[c];
      if (n < 0 || !isActive(ctx.old, c) || !isActive(ctx.new, n)) continue;
      const a = oldNodes[c];
      const b = newNodes[n];
      if (sameParentNodes(og, a, ng, b, oldInNew)) continue;
      if (ctx.olds.get(c)?.fate === 'reused') continue;
      const id = ctx.old.conceptIds[c];
      const before = a < 0 ? [] : og.parentIds(a);
      const after = b < 0 ? [] : ng.parentIds(b);
      const added = after.filter((p) => !before.includes(p));
      const removed = before.filter((p) => !after.includes(p));
      out.push(makeChange('hierarchy_change', [id], [id], [], 1, { parents_before: before, parents_after: after, added, removed }));
    }
    out.sort((x, y) => (x.from[0] < y.from[0] ? -1 : x.from[0] > y.from[0] ? 1 : 0));
    return out;
  },
};
