/**
 * Per-concept edits of a continuing concept (same identifier, active in both releases, same
 * meaning): what its preferred term, synonyms and category became. Shared by the
 * preferred_term_change, synonym_added, synonym_removed and category_change detectors.
 */
import type { DiffContext, NewNode, OldNode } from '../context.js';
import { foldTerm } from '../../text/normalize.js';
import { PREFERRED } from '../../load/types.js';
import { termTextAt } from '../../load/releaseBytes.js';

export interface ConceptEdit {
  o: OldNode;
  n: NewNode;
  /** Old preferred term (typed preferred), -1 when none. */
  oldPreferred: number;
  newPreferred: number;
  preferredChanged: boolean;
}

function typedPreferred(terms: number[], types: Uint8Array): number {
  for (const t of terms) if (types[t] === PREFERRED) return t;
  return -1;
}

/** Continuing frontier concepts with their counterpart, in old-release order. */
export function conceptEdits(ctx: DiffContext): ConceptEdit[] {
  const out: ConceptEdit[] = [];
  for (const o of ctx.olds.values()) {
    if (o.fate !== 'continues') continue;
    const n = ctx.news.get(ctx.align.sameId[o.c]);
    if (!n) continue;
    const oldPreferred = ctx.old.hasColumn.term_type ? typedPreferred(o.terms, ctx.old.termType) : -1;
    const newPreferred = ctx.new.hasColumn.term_type ? typedPreferred(n.terms, ctx.new.termType) : -1;
    let preferredChanged = false;
    if (oldPreferred >= 0 || newPreferred >= 0) {
      const a = oldPreferred >= 0 ? foldTerm(termTextAt(ctx.old, oldPreferred)) : '';
      const b = newPreferred >= 0 ? foldTerm(termTextAt(ctx.new, newPreferred)) : '';
      // Case, punctuation and compatibility forms alone do not change a name.
      preferredChanged = a !== b;
    }
    out.push({ o, n, oldPreferred, newPreferred, preferredChanged });
  }
  return out;
}
