/** hierarchy_change: a concept active in both releases (and not reused) has different parents. */
import type { Detector } from '../detector.js';
import { makeChange } from '../detector.js';
import { isActive } from '../context.js';

const EMPTY: readonly string[] = [];

/** The list sorted and without duplicates; the list itself when it is so already (a canonical hierarchy). */
function sortedSet(list: readonly string[] | undefined): string[] {
  if (!list) return EMPTY as string[];
  for (let k = 1; k < list.length; k++) if (!(list[k - 1] < list[k])) return [...new Set(list)].sort();
  return list as string[];
}

function sameList(a: readonly string[], b: readonly string[]): boolean {
  if (a.length !== b.length) return false;
  for (let k = 0; k < a.length; k++) if (a[k] !== b[k]) return false;
  return true;
}

export const hierarchyChange: Detector<'hierarchy_change'> = {
  kind: 'hierarchy_change',
  detect(ctx) {
    const oh = ctx.input.oldHierarchy;
    const nh = ctx.input.newHierarchy;
    if (!oh || !nh) return [];
    const out = [];
    // Every concept of the old release with the same id in the new one (the alignment's match of
    // the two id lists; no lookup per hierarchy row), in the release's id order.
    const match = ctx.align.sameId;
    for (let c = 0; c < ctx.old.conceptCount; c++) {
      const n = match[c];
      if (n < 0 || !isActive(ctx.old, c) || !isActive(ctx.new, n)) continue;
      const id = ctx.old.conceptIds[c];
      const before = sortedSet(oh.parents.get(id));
      const after = sortedSet(nh.parents.get(id));
      if (sameList(before, after)) continue;
      if (ctx.olds.get(c)?.fate === 'reused') continue;
      const added = after.filter((p) => !before.includes(p));
      const removed = before.filter((p) => !after.includes(p));
      out.push(makeChange('hierarchy_change', [id], [id], [], 1, { parents_before: before, parents_after: after, added, removed }));
    }
    out.sort((x, y) => (x.from[0] < y.from[0] ? -1 : x.from[0] > y.from[0] ? 1 : 0));
    return out;
  },
};
