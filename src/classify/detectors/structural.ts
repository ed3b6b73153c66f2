/**
 * Shared evidence for the structural kinds (replacement, merge, split, reorganization):
 * the flow matrix of the group, history rows and where they disagree with the terms, the
 * status of every concept involved, and the preferred terms before and after.
 */
import type { DiffContext, StructuralGroup } from '../context.js';
import { flowCells, historyEvidence } from '../context.js';
import type { StructuralEvidence, TermMove } from '../types.js';
import { conceptLabel, movesOf, statusOf } from '../detector.js';
import { conceptIndexOf } from '../../load/releaseBytes.js';

export function structuralEvidence(ctx: DiffContext, g: StructuralGroup): StructuralEvidence {
  const history = g.olds.flatMap((c) => historyEvidence(ctx, c));
  const status: StructuralEvidence['status'] = {};
  const before: Record<string, string> = {};
  const after: Record<string, string> = {};
  for (const c of g.olds) {
    const id = ctx.old.conceptIds[c];
    status[id] = statusOf(ctx, id);
    before[id] = conceptLabel(ctx.old, c);
  }
  for (const n of g.news) {
    const id = ctx.new.conceptIds[n];
    status[id] = statusOf(ctx, id);
    after[id] = conceptLabel(ctx.new, n);
  }
  return {
    basis: g.basis,
    flows: flowCells(ctx, g.olds, g.news),
    history,
    history_disagrees: history.filter((h) => h.agrees_with_terms === false),
    status,
    preferred_before: before,
    preferred_after: after,
  };
}

/** Moves of the group's old concepts into the group's new concepts. */
export function groupMoves(ctx: DiffContext, g: StructuralGroup): TermMove[] {
  const into = new Set(g.news);
  return g.olds.flatMap((c) => movesOf(ctx, ctx.olds.get(c)!).filter((m) => m.to !== null && into.has(conceptIndexOf(ctx.new, m.to))));
}

/**
 * Confidence of a flow-based group: the mean share of each ending old concept's terms that
 * the group's new concepts carry; 0.8 for a group decided by history alone. A history row
 * that contradicts the flow lowers it by a fifth.
 */
export function groupConfidence(ctx: DiffContext, g: StructuralGroup, ev: StructuralEvidence): number {
  let conf: number;
  if (g.basis === 'history') conf = 0.8;
  else {
    const shares = g.olds.map((c) => {
      const o = ctx.olds.get(c)!;
      let carried = 0;
      for (const n of g.news) carried += o.flows.get(n)?.length ?? 0;
      return carried / Math.max(1, o.terms.length);
    });
    conf = shares.reduce((a, b) => a + b, 0) / Math.max(1, shares.length);
    if (ev.history.some((h) => h.agrees_with_terms === true)) conf = Math.max(conf, 0.95);
  }
  if (ev.history_disagrees.length) conf *= 0.8;
  return conf;
}

export const groupsOf = (ctx: DiffContext, kind: StructuralGroup['kind']) => ctx.groups.filter((g) => g.kind === kind);
