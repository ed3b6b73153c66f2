/** hierarchy_change: a concept active in both releases (and not reused) has different parents. */
import type { Detector } from '../detector.js';
import { makeChange } from '../detector.js';
import { isActive } from '../context.js';
import { conceptIndexOf } from '../../load/releaseBytes.js';

export const hierarchyChange: Detector<'hierarchy_change'> = {
  kind: 'hierarchy_change',
  detect(ctx) {
    const oh = ctx.input.oldHierarchy;
    const nh = ctx.input.newHierarchy;
    if (!oh || !nh) return [];
    const ids = new Set([...oh.parents.keys(), ...nh.parents.keys()]);
    const out = [];
    for (const id of [...ids].sort()) {
      const c = conceptIndexOf(ctx.old, id);
      const n = conceptIndexOf(ctx.new, id);
      if (c < 0 || n < 0 || !isActive(ctx.old, c) || !isActive(ctx.new, n)) continue;
      if (ctx.olds.get(c)?.fate === 'reused') continue;
      const before = [...new Set(oh.parents.get(id) ?? [])].sort();
      const after = [...new Set(nh.parents.get(id) ?? [])].sort();
      if (before.join('\u0001') === after.join('\u0001')) continue;
      const added = after.filter((p) => !before.includes(p));
      const removed = before.filter((p) => !after.includes(p));
      out.push(makeChange('hierarchy_change', [id], [id], [], 1, { parents_before: before, parents_after: after, added, removed }));
    }
    return out;
  },
};
