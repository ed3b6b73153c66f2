/** category_change: a continuing concept has a different semantic category. */
import type { Detector } from '../detector.js';
import { makeChange } from '../detector.js';
import { categoryName } from '../context.js';
import { conceptEdits } from './conceptEdits.js';

export const categoryChange: Detector<'category_change'> = {
  kind: 'category_change',
  detect(ctx) {
    if (!ctx.old.hasColumn.category || !ctx.new.hasColumn.category) return [];
    const out = [];
    for (const e of conceptEdits(ctx)) {
      const before = categoryName(ctx.old, e.o.c);
      const after = categoryName(ctx.new, e.n.n);
      if (before === after) continue;
      out.push(makeChange('category_change', [e.o.id], [e.n.id], [], 1, { before, after }));
    }
    return out;
  },
};
