/**
 * retirement: a concept became inactive or disappeared and no concept carries its terms.
 * Successors are still proposed, in this order of evidence: `consider` rows of the history
 * table, stray terms that went to other concepts, and lexical neighbours in the new release.
 * The `consider` rows are the publisher's own record, so they come first and are all kept;
 * the guesses (stray terms, neighbours) are ranked by score and fill the list up to
 * `maxSuggestions`.
 */
import type { Detector } from '../detector.js';
import { conceptLabel, makeChange, movesOf, rankSuccessors } from '../detector.js';
import { flowCells, historyEvidence, isActive, resolveHistory, round, type DiffContext, type OldNode } from '../context.js';
import type { Successor } from '../types.js';
import { groupsOf } from './structural.js';
import { conceptIndexOf, termTextAt } from '../../load/releaseBytes.js';
import type { IndexHit } from '../../rescore/conceptIndex.js';
import type { SearchQuery } from '../../rescore/indexThread.js';

export function proposeSuccessors(ctx: DiffContext, o: OldNode): Successor[] {
  const named: Successor[] = [];
  const h = ctx.input.history;
  if (h) {
    for (const id of resolveHistory(h, ctx.new, o.id, false).targets) {
      named.push({ concept_id: id, label: conceptLabel(ctx.new, conceptIndexOf(ctx.new, id)), score: 0.5, reason: 'history_consider' });
    }
  }
  // Ranked by score alone, a lexical neighbour above 0.5 pushed the publisher's `consider`
  // rows down and the cut at maxSuggestions dropped them (found on the IANA Language Subtag
  // Registry, where "see X, Y" lists name up to nine records).
  const isNamed = new Set(named.map((s) => s.concept_id));
  const out: Successor[] = [];
  for (const [n, terms] of o.flows) {
    if (!isActive(ctx.new, n)) continue;
    out.push({ concept_id: ctx.new.conceptIds[n], label: conceptLabel(ctx.new, n), score: round(terms.length / Math.max(1, o.terms.length)), reason: 'term_flow' });
  }
  for (const hit of neighbourHits(ctx, o)) {
    if (hit.score < ctx.thresholds.neighbourMin) break;
    out.push({ concept_id: ctx.new.conceptIds[hit.concept], label: conceptLabel(ctx.new, hit.concept), score: round(hit.score), reason: 'lexical_neighbour' });
  }
  const guesses = out.filter((s) => !isNamed.has(s.concept_id));
  return [...rankSuccessors(named, named.length), ...rankSuccessors(guesses, Math.max(0, ctx.thresholds.maxSuggestions - named.length))];
}

/** The nearest-concept search for the successors of retired concept o. */
function neighbourQuery(ctx: DiffContext, o: OldNode): SearchQuery | undefined {
  if (o.terms.length === 0) return undefined;
  return { texts: o.terms.map((t) => termTextAt(ctx.old, t)), limit: ctx.thresholds.maxSuggestions * 2, skipConcept: conceptIndexOf(ctx.new, o.id) };
}

/** Searches started by `prepare`: old concept → its position in the batch, and the batch's hits. */
const ahead = new WeakMap<DiffContext, { at: Map<number, number>; hits: () => IndexHit[][] }>();

function neighbourHits(ctx: DiffContext, o: OldNode): IndexHit[] {
  const started = ahead.get(ctx);
  const at = started?.at.get(o.c);
  if (started && at !== undefined) return started.hits()[at];
  const q = neighbourQuery(ctx, o);
  return q ? ctx.newIndex().search(q.texts, q.limit, q.skipConcept) : [];
}

export const retirement: Detector<'retirement'> = {
  kind: 'retirement',
  prepare(ctx) {
    // The searches of every retired concept at once, so that they run beside the other detectors.
    const at = new Map<number, number>();
    const queries: SearchQuery[] = [];
    for (const g of groupsOf(ctx, 'retirement')) {
      const o = ctx.olds.get(g.olds[0])!;
      const q = neighbourQuery(ctx, o);
      if (q === undefined || at.has(o.c)) continue;
      at.set(o.c, queries.length);
      queries.push(q);
    }
    if (queries.length) ahead.set(ctx, { at, hits: ctx.searchAhead(queries) });
  },
  detect(ctx) {
    return groupsOf(ctx, 'retirement').map((g) => {
      const o = ctx.olds.get(g.olds[0])!;
      const status = o.fate === 'absent' ? 'absent' : 'inactive';
      const stray = flowCells(ctx, [o.c], [...o.flows.keys()].filter((n) => n !== ctx.align.sameId[o.c]));
      const strayShare = stray.reduce((a, s) => a + s.share, 0);
      const terms = [
        ...o.removed.map((t) => ({ term: termTextAt(ctx.old, t), from: o.id, to: null, match: null })),
        ...movesOf(ctx, o),
      ];
      return makeChange('retirement', [o.id], [], terms, (status === 'inactive' ? 1 : 0.95) * (1 - strayShare / 2), {
        status,
        preferred: o.preferred >= 0 ? termTextAt(ctx.old, o.preferred) : '',
        history: historyEvidence(ctx, o.c),
        suggestions: proposeSuccessors(ctx, o),
        stray_terms: stray,
      });
    });
  },
};
