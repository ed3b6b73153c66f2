/**
 * The detector interface and helpers shared by the detectors in detectors/.
 * A detector reads the DiffContext and returns the changes of one kind.
 */
import { ACTIVE, type Release } from '../load/types.js';
import type { Change, ChangeKind, ChangeOf, Successor, TermMove } from './types.js';
import type { DiffContext, OldNode } from './context.js';
import { round, isActive } from './context.js';
import { conceptIndexOf, termTextAt } from '../load/releaseBytes.js';

export interface Detector<K extends ChangeKind = ChangeKind> {
  kind: K;
  /** Called for every detector before any detects: start work that can run beside the others (e.g. ctx.searchAhead). */
  prepare?(ctx: DiffContext): void;
  detect(ctx: DiffContext): ChangeOf<K>[];
}

export function changeId(kind: ChangeKind, from: string[], to: string[]): string {
  return `${kind}:${from.join('+')}>${to.join('+')}`;
}

/** Build a change with its deterministic id. */
export function makeChange<K extends ChangeKind>(kind: K, from: string[], to: string[], terms: TermMove[], confidence: number, evidence: ChangeOf<K>['evidence']): ChangeOf<K> {
  return { id: changeId(kind, from, to), kind, from, to, terms, confidence: round(Math.max(0, Math.min(1, confidence))), evidence } as unknown as ChangeOf<K>;
}

/** The preferred term of concept c (first preferred active term, else first term), or ''. */
export function conceptLabel(r: Release, c: number): string {
  // One pass over the concept's terms, no list (re-scoring asks this for every mapping).
  const s = r.conceptTermStart[c];
  const e = r.conceptTermStart[c + 1];
  let firstActive = -1;
  for (let k = s; k < e; k++) {
    const t = r.conceptTerms[k];
    if (r.termStatus[t] !== ACTIVE) continue;
    if (r.termType[t] === 0) return termTextAt(r, t);
    if (firstActive < 0) firstActive = t;
  }
  if (firstActive >= 0) return termTextAt(r, firstActive);
  return s < e ? termTextAt(r, r.conceptTerms[s]) : '';
}

/** Term moves for old terms of `o` that went to new concept n (or anywhere, when n is -1). */
export function movesOf(ctx: DiffContext, o: OldNode, only?: number): TermMove[] {
  const out: TermMove[] = [];
  for (const [n, terms] of o.flows) {
    if (only !== undefined && n !== only) continue;
    for (const t of terms) {
      const link = ctx.align.links[ctx.align.linkOfOld[t]];
      const newText = termTextAt(ctx.new, link.newTerm);
      const move: TermMove = { term: termTextAt(ctx.old, t), from: o.id, to: ctx.new.conceptIds[n], match: link.level };
      if (newText !== move.term) move.new_term = newText;
      out.push(move);
    }
  }
  return out;
}

export function statusOf(ctx: DiffContext, id: string): 'active' | 'inactive' | 'absent' {
  const n = conceptIndexOf(ctx.new, id);
  if (n < 0) return 'absent';
  return isActive(ctx.new, n) ? 'active' : 'inactive';
}

/** Sort successors best first, by id on ties, and keep the first of each concept. */
export function rankSuccessors(list: Successor[], max: number): Successor[] {
  const seen = new Set<string>();
  return list
    .sort((a, b) => b.score - a.score || (a.concept_id < b.concept_id ? -1 : 1))
    .filter((s) => (seen.has(s.concept_id) ? false : (seen.add(s.concept_id), true)))
    .slice(0, max);
}
