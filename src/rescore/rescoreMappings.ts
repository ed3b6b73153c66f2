/**
 * rescoreMappings: re-score every mapping of a set against the new release, propose successors
 * and give each mapping a verdict (see VERDICTS in ./types.ts and docs/THRESHOLDS.md, "Verdicts").
 *
 * For each mapping:
 * 1. resolve its target in the old release (the id as given; for a CURIE `PFX:123` also the
 *    local part `123` when the release has no such id);
 * 2. score_old = P(label names target) in the old release, score_new the same in the new
 *    release, both with the scorer of ./trainScorer.ts (context features relative to the old
 *    target, i.e. the target's old category and ancestors);
 * 3. gather candidates: the target itself, the structural change first (merge survivor,
 *    replacement, split parts, reorganization concepts, history rows including `consider`,
 *    where the target's terms went), concepts of the changed frontier that hold the label's text,
 *    and, for mappings that need successors, a nearest-concept search over the whole new
 *    release with the label's text (ConceptIndex);
 * 4. score the candidates, keep up to `maxSuggestions`, and decide the verdict.
 *
 * Speed: a target whose concept is outside the changed frontier has the same terms in both
 * releases, so its lexical features are computed once and shared; such a mapping runs no
 * search. Label forms, per-concept term forms and searches (by label text) are cached.
 */
import { conceptIndexOf, termTextAt } from '../load/releaseBytes.js';

import type { DiffContext } from '../classify/context.js';
import { categoryName, isActive, resolveHistory } from '../classify/context.js';
import { conceptLabel } from '../classify/detector.js';
import { foldTerm } from '../text/normalize.js';
import { trigramDice } from '../text/similarity.js';
import type { Change } from '../classify/types.js';
import type { Mapping, MappingSet, Release } from '../load/types.js';
import { impactOf } from '../rank/rankByImpact.js';
import {
  AncestorIndex, FEATURE_COUNT, LEXICAL_COUNT, conceptContext, contextFeatures, textForms,
  type ConceptContext, type TextForms,
} from './features.js';
import { Scorer, trainScorer, type TrainOptions } from './trainScorer.js';
import type { MappingResult, MappingSuggestion, ScorerInfo, Verdict } from './types.js';

/** The concept with this id, or undefined. */
function indexOf(r: Release, id: string): number | undefined {
  const c = conceptIndexOf(r, id);
  return c < 0 ? undefined : c;
}

/** Thresholds and margins of the verdicts; defaults and reasoning in docs/THRESHOLDS.md. */
export interface VerdictThresholds {
  /** A redirect needs the label to score at least this against the merge survivor or replacement (or, when credible, no more than driftDrop below score_old). */
  redirectMin: number;
  /** A candidate below this score is not credible: not counted for ambiguity, drift or a stray-term successor. */
  credibleMin: number;
  /** Drifted when the lexical score against the target fell by more than this (and to below weakMatch). */
  driftDrop: number;
  /** Drifted when another concept scores more than this above the target. */
  betterMargin: number;
  /** Ambiguous when another credible candidate scores within this of the chosen one. */
  ambiguityMargin: number;
  /** A score below this is a weak match: noted as a reason for the old score; a fallen new score must end below it to be drift. */
  weakMatch: number;
  /** Suggestions kept per mapping. */
  maxSuggestions: number;
  /** Concepts asked of the nearest-concept search. */
  searchHits: number;
}

export const DEFAULT_VERDICT_THRESHOLDS: VerdictThresholds = {
  redirectMin: 0.5,
  credibleMin: 0.3,
  driftDrop: 0.3,
  betterMargin: 0.2,
  ambiguityMargin: 0.1,
  weakMatch: 0.5,
  maxSuggestions: 5,
  searchHits: 10,
};

export interface RescoreOptions {
  /** Overrides of DEFAULT_VERDICT_THRESHOLDS. */
  thresholds?: Partial<VerdictThresholds>;
  /** A scorer already trained (e.g. shared by several mapping sets); otherwise one is trained on the new release. */
  scorer?: Scorer;
  /** Options of the training when no scorer is given. */
  training?: TrainOptions;
  /**
   * Run the nearest-concept search over the whole new release for mappings that need a
   * successor (default true). Without it, candidates come from the changes and the changed
   * frontier only; the first search builds the release's ConceptIndex if the diff did not.
   */
  nearestSearch?: boolean;
}

export interface RescoreResult {
  /** One result per mapping, in the order of the mapping set (rank them with rankByImpact). */
  mappings: MappingResult[];
  scorer: ScorerInfo;
}

type Reason = MappingSuggestion['reason'];

interface Candidate {
  n: number;
  reason: Reason;
  score: number;
}

const round3 = (x: number) => Math.round(x * 1000) / 1000;
/** Score margin within which a concept holding the label's own wording is ranked first. */
const TIE_MARGIN = 0.05;

/**
 * How often a successor in this diff has another category than the concept it succeeds: over
 * the (old, new) pairs of the structural groups where both have a category, (differing + 1) /
 * (pairs + 50), i.e. a prior of 2 % worth fifty pairs, moved by what the diff shows.
 */
export function categoryShiftShare(ctx: DiffContext): number {
  if (!ctx.old.hasColumn.category || !ctx.new.hasColumn.category) return 0.02;
  let pairs = 0;
  let differing = 0;
  for (const g of ctx.groups) {
    for (const o of g.olds) {
      const before = categoryName(ctx.old, o);
      const flows = ctx.olds.get(o)?.flows;
      for (const n of g.news) {
        const carried = (flows?.get(n)?.length ?? 0) > 0 || g.historyEdges.some((e) => e.o === o && e.n === n);
        if (!carried) continue;
        const after = categoryName(ctx.new, n);
        if (before === null || after === null) continue;
        pairs++;
        if (before !== after) differing++;
      }
    }
  }
  return (differing + 1) / (pairs + 50);
}
const quote = (s: string) => `'${s}'`;

/**
 * Re-score every mapping of `mappings` against the diff in `ctx`. `changes` are the changes
 * classifyChanges found for `ctx` (their ids go into `change_ids`; retirement suggestions are
 * reused as candidates). Returns the results in mapping order and the scorer's description.
 */
export function rescoreMappings(ctx: DiffContext, changes: readonly Change[], mappings: MappingSet, options: RescoreOptions = {}): RescoreResult {
  const th: VerdictThresholds = { ...DEFAULT_VERDICT_THRESHOLDS, ...options.thresholds };
  const oldR = ctx.old;
  const newR = ctx.new;
  const oldH = ctx.input.oldHierarchy ?? ctx.input.newHierarchy;
  const newH = ctx.input.newHierarchy ?? ctx.input.oldHierarchy;
  const scorer = options.scorer ?? trainScorer(newR, { hierarchy: newH, index: ctx.newIndex, categoryShiftShare: categoryShiftShare(ctx), ...options.training });
  const oldAnc = oldH ? new AncestorIndex(oldH) : undefined;
  const newAnc = newH ? (newH === oldH ? oldAnc : new AncestorIndex(newH)) : undefined;
  const bothHierarchies = ctx.input.oldHierarchy !== undefined && ctx.input.newHierarchy !== undefined;
  const oldFeatures = scorer.features(oldR);
  const newFeatures = scorer.features(newR);

  // Changes by concept id.
  const changesOf = new Map<string, Change[]>();
  for (const c of changes) {
    for (const id of new Set([...c.from, ...c.to])) {
      const list = changesOf.get(id);
      if (list) list.push(c);
      else changesOf.set(id, [c]);
    }
  }

  // Active terms of the new frontier by folded form and lexical key: concepts that now hold a label's text.
  const frontierText = new Map<string, number[]>();
  for (const node of ctx.news.values()) {
    if (!node.active) continue;
    for (const t of node.terms) {
      const f = textForms(termTextAt(newR, t));
      for (const key of [`f${f.folded}`, `l${f.lexical}`]) {
        const list = frontierText.get(key);
        if (!list) frontierText.set(key, [node.n]);
        else if (!list.includes(node.n)) list.push(node.n);
      }
    }
  }

  // Caches.
  const labelCache = new Map<string, TextForms>();
  const formsOf = (text: string) => {
    let f = labelCache.get(text);
    if (!f) {
      f = textForms(text);
      labelCache.set(text, f);
    }
    return f;
  };
  const lexCache = new Map<string, Float64Array>();
  // A concept outside the changed frontier has the same active terms (text, type, language; as a
  // multiset, which the features, maxima over the terms, do not see the order of) in both releases (align/types.ts), and both releases' features share one set of
  // document frequencies, so its lexical features are the same in both: computed once, on the
  // old concept. (Most mappings point at such concepts.)
  const unchangedOld = (n: number): number => {
    if (ctx.news.has(n)) return -1;
    const c = conceptIndexOf(oldR, newR.conceptIds[n]);
    return c >= 0 && !ctx.olds.has(c) && oldR.conceptStatus[c] === newR.conceptStatus[n] ? c : -1;
  };
  const lexical = (r: Release, label: TextForms, c: number): Float64Array => {
    if (r === newR && oldFeatures.df === newFeatures.df) {
      const same = unchangedOld(c);
      if (same >= 0) return lexical(oldR, label, same);
    }
    const key = `${r === oldR ? 'o' : 'n'}${c}\u0001${label.text}`;
    let v = lexCache.get(key);
    if (!v) {
      v = new Float64Array(LEXICAL_COUNT);
      (r === oldR ? oldFeatures : newFeatures).lexical(label, c, v);
      lexCache.set(key, v);
    }
    return v;
  };
  const x = new Float64Array(FEATURE_COUNT);
  const probability = (lex: Float64Array, target: ConceptContext | null, candidate: ConceptContext) => {
    x.set(lex);
    contextFeatures(target, candidate, x, LEXICAL_COUNT);
    return scorer.probability(x);
  };
  const newContext = (n: number) => conceptContext(newR, n, newAnc);
  const scoreNew = (label: TextForms, n: number, target: ConceptContext | null, lex?: Float64Array) => probability(lex ?? lexical(newR, label, n), target, newContext(n));
  const searchCache = new Map<string, number[]>();
  const search = (text: string): number[] => {
    let hits = searchCache.get(text);
    if (!hits) {
      hits = text.trim() === '' || options.nearestSearch === false ? [] : ctx.newIndex().search([text], th.searchHits).map((h) => h.concept);
      searchCache.set(text, hits);
    }
    return hits;
  };

  const resolveOld = (id: string): string | undefined => {
    if (conceptIndexOf(oldR, id) >= 0) return id;
    const colon = id.indexOf(':');
    if (colon > 0 && !/^https?:/i.test(id)) {
      const local = id.slice(colon + 1);
      if (conceptIndexOf(oldR, local) >= 0) return local;
    }
    return undefined;
  };
  const resolveNew = (id: string): string | undefined => {
    if (conceptIndexOf(newR, id) >= 0) return id;
    const colon = id.indexOf(':');
    if (colon > 0) {
      const local = id.slice(colon + 1);
      if (conceptIndexOf(newR, local) >= 0) return local;
    }
    return undefined;
  };
  const newLabel = (n: number) => conceptLabel(newR, n);
  /** Folded forms of every term of new concept n (any status), once per concept. */
  const foldedTerms = new Map<number, string[]>();
  const foldedTermsOf = (n: number): string[] => {
    let list = foldedTerms.get(n);
    if (!list) {
      list = [];
      for (let k = newR.conceptTermStart[n]; k < newR.conceptTermStart[n + 1]; k++) list.push(foldTerm(termTextAt(newR, newR.conceptTerms[k])));
      foldedTerms.set(n, list);
    }
    return list;
  };

  function assess(m: Mapping): MappingResult {
    const reasons: string[] = [];
    const candidates = new Map<number, Candidate>();
    const oldId = resolveOld(m.targetId);
    const id = oldId ?? resolveNew(m.targetId) ?? m.targetId;
    const cOld = oldId !== undefined ? indexOf(oldR, oldId) : undefined;
    const cNewAny = indexOf(newR, id);
    const labelText = m.localLabel.trim() !== '' ? m.localLabel : cOld !== undefined ? conceptLabel(oldR, cOld) : '';
    if (m.localLabel.trim() === '' && cOld !== undefined) reasons.push("The mapping has no label; the target's old preferred term stands in for it.");
    const label = formsOf(labelText);
    const targetCtx = cOld !== undefined ? conceptContext(oldR, cOld, oldAnc) : null;
    const change_ids = (changesOf.get(id) ?? []).map((c) => c.id);
    if (oldId !== undefined && oldId !== m.targetId) reasons.push(`The target ${m.targetId} was read as ${oldId}, its local part.`);

    const add = (n: number | undefined, reason: Reason) => {
      if (n === undefined || n < 0 || !isActive(newR, n) || candidates.has(n)) return;
      candidates.set(n, { n, reason, score: -1 });
    };
    const addHistory = () => {
      const h = ctx.input.history;
      if (!h) return;
      for (const t of resolveHistory(h, newR, id, true).targets) add(indexOf(newR, t), 'history');
      for (const t of resolveHistory(h, newR, id, false).targets) add(indexOf(newR, t), 'history_consider');
    };
    const addFrontier = (flows?: Map<number, number[]>) => {
      for (const key of [`f${label.folded}`, `l${label.lexical}`]) {
        for (const n of frontierText.get(key) ?? []) add(n, flows?.has(n) ? 'term_flow' : 'lexical_neighbour');
      }
    };
    const addSearch = () => {
      for (const n of search(labelText)) add(n, 'lexical_neighbour');
    };
    /**
     * Candidates best first. Near ties (within TIE_MARGIN) go to a concept holding a term that
     * folds to the label itself: the scorer's probability saturates near 1 for close variants,
     * where the exact wording is the better evidence.
     */
    const ranked = (): Candidate[] => {
      for (const cand of candidates.values()) if (cand.score < 0) cand.score = scoreNew(label, cand.n, targetCtx);
      const key = (c: Candidate) => c.score + (holdsLabel(c.n) ? TIE_MARGIN : 0);
      return [...candidates.values()].sort((a, b) => key(b) - key(a) || b.score - a.score || (newR.conceptIds[a.n] < newR.conceptIds[b.n] ? -1 : 1));
    };
    const holdsLabel = (n: number) => foldedTermsOf(n).includes(label.folded);
    const describe = (c: Candidate) => `${newR.conceptIds[c.n]} ${quote(newLabel(c.n))} (${round3(c.score)})`;
    const finish = (verdict: Verdict, scoreOld: number | null, scoreNew: number | null, keep: 'all' | 'target' | 'none' = 'all', lead = -1): MappingResult => {
      let list = keep === 'none' ? [] : ranked();
      if (keep === 'target') list = list.filter((c) => c.reason === 'current_target');
      if (lead >= 0) list = [...list.filter((c) => c.n === lead), ...list.filter((c) => c.n !== lead)];
      const suggestions: MappingSuggestion[] = list.slice(0, th.maxSuggestions).map((c) => ({
        concept_id: newR.conceptIds[c.n], label: newLabel(c.n), score: round3(c.score), reason: c.reason,
      }));
      return {
        local_code: m.localCode, local_label: m.localLabel, target_id: m.targetId,
        target_label: cOld !== undefined ? conceptLabel(oldR, cOld) : '',
        relation: m.relation, usage: m.usage, owner: m.owner, verdict,
        score_old: scoreOld === null ? null : round3(scoreOld), score_new: scoreNew === null ? null : round3(scoreNew),
        suggestions, impact: impactOf(verdict, m.usage), change_ids, reasons, line: m.line,
      };
    };
    /** The best credible candidate other than `except`, when it is within `margin` of `score` or above it. */
    const rival = (list: Candidate[], except: number, score: number, margin: number) =>
      list.find((c) => c.n !== except && c.score >= th.credibleMin && c.score >= score - margin);

    // Unknown target.
    if (cOld === undefined) {
      const inNew = cNewAny !== undefined;
      reasons.push(inNew ? `${m.targetId} is not in the old release; it first appears in the new one.` : `${m.targetId} is in neither release.`);
      add(cNewAny, 'current_target');
      addSearch();
      return finish('unknown_target', null, inNew ? scoreNew(label, cNewAny, null) : null);
    }

    const lexOld = lexical(oldR, label, cOld);
    const scoreOld = probability(lexOld, targetCtx, targetCtx!);
    if (scoreOld < th.weakMatch) reasons.push(`The label matched the target weakly already in the old release (${round3(scoreOld)}).`);

    // Already inactive in the old release.
    if (!isActive(oldR, cOld)) {
      reasons.unshift(`${id} was already inactive in the old release.`);
      addHistory();
      addSearch();
      return finish('broken', scoreOld, cNewAny !== undefined ? scoreNew(label, cNewAny, targetCtx) : null);
    }

    const node = ctx.olds.get(cOld);
    const cNew = cNewAny;

    // Outside the changed frontier: same id, status, category and terms in both releases.
    if (!node && cNew !== undefined && !ctx.news.has(cNew)) {
      const sNew = scoreNew(label, cNew, targetCtx, lexOld);
      candidates.set(cNew, { n: cNew, reason: 'current_target', score: sNew });
      addFrontier();
      const list = candidates.size > 1 ? ranked() : [];
      const better = list.find((c) => c.n !== cNew && c.score >= th.credibleMin && c.score > sNew + th.betterMargin);
      if (better) {
        reasons.unshift(`The label now matches ${describe(better)} better than the target (${round3(sNew)}).`);
        return finish('drifted', scoreOld, sNew);
      }
      const moved = parentsChanged(id);
      if (moved) {
        reasons.unshift(moved, `The target's terms are unchanged and the label still matches it (${round3(probability(lexOld, targetCtx, targetCtx!))}).`);
        return finish('context_changed', scoreOld, sNew, 'target');
      }
      reasons.unshift('The target is unchanged.');
      return finish('ok', scoreOld, sNew, 'none');
    }

    const nodeFlows = node?.flows;
    const flowTargets = () => {
      if (!nodeFlows) return;
      for (const n of [...nodeFlows.keys()].sort((a, b) => (nodeFlows.get(b)!.length - nodeFlows.get(a)!.length) || a - b)) add(n, 'term_flow');
    };
    const fate = node?.fate ?? 'continues';
    const group = node && node.group >= 0 ? ctx.groups[node.group] : undefined;
    const sNewTarget = cNew !== undefined ? scoreNew(label, cNew, targetCtx) : null;

    // Identifier reused for another meaning.
    if (fate === 'reused') {
      reasons.unshift(`The identifier ${id} was reused for a different meaning: ${quote(newLabel(cNew!))}.`);
      if (group) for (const n of group.news) add(n, 'term_flow');
      flowTargets();
      addHistory();
      addFrontier(nodeFlows);
      addSearch();
      const best = ranked()[0];
      if (best && best.score >= th.credibleMin) reasons.push(`The label's meaning is closest to ${describe(best)}.`);
      else reasons.push('No concept of the new release holds the old meaning.');
      return finish('drifted', scoreOld, sNewTarget);
    }

    // The target ended: retired (inactive) or absent.
    if (fate === 'retired' || fate === 'absent') {
      const status = fate === 'retired' ? 'was retired (it is inactive in the new release)' : 'is absent from the new release';
      const kind = group?.kind ?? 'retirement';
      if (kind === 'retirement') {
        reasons.push(`${id} ${status} and no concept carries its terms.`);
        addHistory();
        flowTargets();
        const retirement = changes.find((c) => c.kind === 'retirement' && c.from[0] === id);
        if (retirement && retirement.kind === 'retirement') for (const s of retirement.evidence.suggestions) add(indexOf(newR, s.concept_id), s.reason);
        addFrontier(nodeFlows);
        addSearch();
        const list = ranked();
        const strayHome = list.find((c) => c.reason === 'term_flow' && c.score >= th.redirectMin);
        if (strayHome && list[0] === strayHome) {
          reasons.unshift(`The label matches a term that moved to ${describe(strayHome)}.`);
          return finish('drifted', scoreOld, sNewTarget);
        }
        const best = list[0];
        if (best && best.score >= th.credibleMin) reasons.push(`Closest candidate, to review: ${describe(best)}.`);
        return finish('broken', scoreOld, sNewTarget);
      }
      const news = group!.news;
      if ((kind === 'merge' || kind === 'replacement') && news.length === 1) {
        const survivor = news[0];
        add(survivor, group!.basis === 'history' ? 'history' : 'term_flow');
        flowTargets();
        addHistory();
        addFrontier(nodeFlows);
        let list = ranked();
        let surv = candidates.get(survivor)!;
        if (surv.score < th.redirectMin) {
          // A weak survivor: look for a better home over the whole release.
          addSearch();
          list = ranked();
          surv = candidates.get(survivor)!;
        }
        const what = kind === 'merge' ? 'was merged into' : 'was replaced by';
        reasons.unshift(`${id} ${status}; it ${what} ${describe(surv)}.`);
        const other = rival(list, survivor, surv.score, th.ambiguityMargin);
        // The label scores well against the survivor: above redirectMin, or credible and no
        // more than driftDrop below its score against the old target.
        const fits = surv.score >= th.redirectMin || (surv.score >= th.credibleMin && surv.score >= scoreOld - th.driftDrop);
        if (fits && !other) {
          reasons.push(`The label matches ${newR.conceptIds[survivor]} well: rewrite the mapping to it.`);
          return finish('redirect', scoreOld, sNewTarget, 'all', survivor);
        }
        if (other) reasons.push(`Another candidate scores close: ${describe(other)}.`);
        if (!fits) reasons.push(`The label scores low against ${newR.conceptIds[survivor]}.`);
        // The concept the release itself names as successor is listed first, even when it scores low.
        return finish('ambiguous', scoreOld, sNewTarget, 'all', survivor);
      }
      for (const n of news) add(n, group!.basis === 'history' ? 'history' : 'term_flow');
      flowTargets();
      addHistory();
      addFrontier(nodeFlows);
      const parts = news.map((n) => newR.conceptIds[n]).join(', ');
      reasons.unshift(`${id} ${status}; it was ${kind === 'split' ? 'split into' : 'reorganized into'} ${parts}.`);
      const best = ranked()[0];
      if (best) reasons.push(`Best candidate: ${describe(best)}; choose among the parts.`);
      return finish('ambiguous', scoreOld, sNewTarget);
    }

    // The target continues with changed terms, status or category.
    const n = cNew!;
    add(n, 'current_target');
    flowTargets();
    addFrontier(nodeFlows);
    const lexNew = lexical(newR, label, n);
    const sNew = scoreNew(label, n, targetCtx, lexNew);
    /** The new score as if the context had not changed: lexical change only. */
    const sLexNew = probability(lexNew, targetCtx, targetCtx!);
    if (group && group.olds.includes(cOld) && (group.kind === 'split' || group.kind === 'reorganization')) {
      for (const p of group.news) add(p, group.basis === 'history' ? 'history' : 'term_flow');
      const parts = group.news.filter((p) => p !== n).map((p) => newR.conceptIds[p]).join(', ');
      reasons.unshift(`${id} keeps its identifier but ${group.kind === 'split' ? 'was split' : 'was reorganized'}: some of its terms went to ${parts}.`);
      const best = ranked()[0];
      if (best) reasons.push(`Best candidate: ${describe(best)}.`);
      return finish('ambiguous', scoreOld, sNew);
    }
    // The label matched best a term that moved to another concept: it named what that concept means.
    const home = movedHome(cOld, n, label.folded);
    if (home >= 0) {
      add(home, 'term_flow');
      const moved = candidates.get(home)!;
      reasons.unshift(`The label matches best the term ${quote(movedTermText)}, which moved from ${id} to ${describe({ ...moved, score: moved.score < 0 ? scoreNew(label, home, targetCtx) : moved.score })}.`);
      return finish('drifted', scoreOld, sNew, 'all', home);
    }
    let list = ranked();
    // Fell: by more than driftDrop, and to below weakMatch (no longer more likely than not).
    const fell = scoreOld - sLexNew > th.driftDrop && sLexNew < th.weakMatch;
    if (fell) {
      addHistory();
      addSearch();
      list = ranked();
    }
    const better = list.find((c) => c.n !== n && c.score >= th.credibleMin && c.score > sLexNew + th.betterMargin);
    if (better) {
      reasons.unshift(`The label now matches ${describe(better)} better than the target (${round3(sLexNew)}).`);
      return finish('drifted', scoreOld, sNew);
    }
    if (fell) {
      reasons.unshift(`The label's score against the target fell from ${round3(scoreOld)} to ${round3(sLexNew)}.`);
      return finish('drifted', scoreOld, sNew);
    }
    const why: string[] = [];
    const cb = categoryName(oldR, cOld);
    const ca = categoryName(newR, n);
    if (oldR.hasColumn.category && newR.hasColumn.category && cb !== ca) why.push(`The category of ${id} changed from ${cb ?? '(none)'} to ${ca ?? '(none)'}.`);
    const moved = parentsChanged(id);
    if (moved) why.push(moved);
    if (why.length) {
      reasons.unshift(...why, `The label still matches the target (${round3(sLexNew)}).`);
      return finish('context_changed', scoreOld, sNew, 'target');
    }
    reasons.unshift(`The target's terms changed, but the label still matches it (${round3(sLexNew)}).`);
    return finish('ok', scoreOld, sNew, 'none');
  }

  let movedTermText = '';
  /**
   * The active new concept (other than `n`) that received the old target's term the label matches
   * best (character 3-gram Dice of the folded forms, strictly better than every term that stayed),
   * or -1. Sets movedTermText.
   */
  function movedHome(cOld: number, n: number, foldedLabel: string): number {
    const o = ctx.olds.get(cOld);
    if (!o || o.terms.length < 2) return -1;
    let bestT = -1;
    let bestS = -1;
    let second = -1;
    for (const t of o.terms) {
      const sim = trigramDice(foldedLabel, foldTerm(termTextAt(oldR, t)));
      if (sim > bestS) { second = bestS; bestS = sim; bestT = t; }
      else if (sim > second) second = sim;
    }
    if (bestT < 0 || bestS <= second) return -1;
    const li = ctx.align.linkOfOld[bestT];
    if (li < 0) return -1;
    const home = newR.termConcept[ctx.align.links[li].newTerm];
    if (home === n || !isActive(newR, home)) return -1;
    movedTermText = termTextAt(oldR, bestT);
    return home;
  }

  /** A sentence when the parents of `id` differ between the two hierarchies, else ''. */
  function parentsChanged(id: string): string {
    if (!bothHierarchies || !oldAnc || !newAnc) return '';
    const before = oldAnc.parents(id);
    const after = newAnc.parents(id);
    if (before.join('\u0001') === after.join('\u0001')) return '';
    const added = after.filter((p) => !before.includes(p));
    const removed = before.filter((p) => !after.includes(p));
    const parts = [added.length ? `added ${added.join(', ')}` : '', removed.length ? `removed ${removed.join(', ')}` : ''].filter(Boolean);
    return `The parents of ${id} changed: ${parts.join('; ')}.`;
  }

  return { mappings: mappings.mappings.map(assess), scorer: scorer.info };
}
