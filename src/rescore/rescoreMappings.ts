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
 * search. Label forms, per-concept term forms and searches (by label text) are cached. On a
 * large set the lexical features go to a worker thread (./lexicalThread.ts) while this thread
 * trains the scorer; the results do not depend on it (tests/rescore/lexicalThread.test.ts).
 * When the index thread has built the new release's index in shared memory, the stems of the new
 * release's active terms are read from its forward lists (termStems) on both threads, instead of
 * tokenising and stemming each term again; jobs are sent with the new concept's terms for that.
 */
import { conceptIndexOf, termTextAt } from '../load/releaseBytes.js';
import { graphOf, sameParentNodes } from '../load/hierarchyGraph.js';

import type { DiffContext } from '../classify/context.js';
import { categoryName, isActive, resolveHistory } from '../classify/context.js';
import { conceptLabel } from '../classify/detector.js';
import { foldTerm, lexicalKeyOfFolded } from '../text/normalize.js';
import { trigramDice } from '../text/similarity.js';
import type { Change, ChangeOf } from '../classify/types.js';
import { termStems, type IndexHit } from './conceptIndex.js';
import type { Mapping, MappingSet, Release } from '../load/types.js';
import { ACTIVE } from '../load/types.js';
import { impactOf } from '../rank/rankByImpact.js';
import {
  AncestorIndex, FEATURE_COUNT, LEXICAL_COUNT, activeTermsOf, ancestorSetSimilarity, conceptContext, contextFeatures, releaseDocumentFrequencies, textForms,
  type ConceptContext, type TextForms,
} from './features.js';
import { Scorer, trainScorer, type TrainOptions } from './trainScorer.js';
import { startLexicalThread, type LexicalBatch, type LexicalResult } from './lexicalThread.js';
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
  /**
   * Compute the lexical features of mappings whose target is unchanged in a worker thread
   * (lexicalThread.ts): true whenever a worker can start, false never; default when there are
   * at least THREAD_FROM_JOBS such mappings.
   */
  thread?: boolean;
}

/** Jobs per batch sent to the lexical worker. */
const LEXICAL_BATCH = 4096;

export interface RescoreResult {
  /** One result per mapping, in the order of the mapping set (rank them with rankByImpact). */
  mappings: MappingResult[];
  scorer: ScorerInfo;
}

type Reason = MappingSuggestion['reason'];

/** A mapping's target as read in both releases (rescoreMappings, targetOf). */
interface Target {
  oldId: string | undefined;
  id: string;
  cOld: number | undefined;
  cNew: number | undefined;
  labelText: string;
}

interface Candidate {
  n: number;
  reason: Reason;
  score: number;
  /** The ranking key (score, plus TIE_MARGIN when the concept holds the label's folded form), set by ranked() once. */
  key?: number;
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
  /** The id as the release has it (the id as given, else for a CURIE its local part) and its concept, or undefined. */
  const resolve = (r: Release, id: string, curies: (id: string) => boolean): [string, number] | undefined => {
    const c = conceptIndexOf(r, id);
    if (c >= 0) return [id, c];
    const colon = id.indexOf(':');
    if (colon > 0 && curies(id)) {
      const local = id.slice(colon + 1);
      const k = conceptIndexOf(r, local);
      if (k >= 0) return [local, k];
    }
    return undefined;
  };
  const notUrl = (id: string) => !/^https?:/i.test(id);
  const anyId = () => true;

  const targetOf = (m: Mapping): Target => {
    const inOld = resolve(oldR, m.targetId, notUrl);
    const oldId = inOld?.[0];
    const cOld = inOld?.[1];
    const inNew = oldId !== undefined ? undefined : resolve(newR, m.targetId, anyId);
    const id = oldId ?? inNew?.[0] ?? m.targetId;
    // The same id in the new release: the alignment's match of the old concept (no lookup).
    const same = cOld !== undefined ? ctx.align.sameId[cOld] : -1;
    const cNew = inNew ? inNew[1] : same >= 0 ? same : undefined;
    const labelText = m.localLabel.trim() !== '' ? m.localLabel : cOld !== undefined ? conceptLabel(oldR, cOld) : '';
    return { oldId, id, cOld, cNew, labelText };
  };

  // A mapping whose target is outside the changed frontier (the common case) needs the label's
  // forms and its lexical features against the target's terms first of all: those go to a
  // worker thread (lexicalThread.ts), in batches, while this thread trains the scorer and
  // assesses the other mappings. Both use the document frequencies counted here.
  const df = options.scorer?.df ?? options.training?.df ?? releaseDocumentFrequencies(newR, options.training?.dfTerms);
  const targets = mappings.mappings.map(targetOf);
  const jobOf = new Int32Array(mappings.mappings.length).fill(-1);
  let jobs = 0;
  targets.forEach((t, i) => {
    if (t.cOld !== undefined && t.cNew !== undefined && isActive(oldR, t.cOld) && !ctx.olds.has(t.cOld) && !ctx.news.has(t.cNew)) jobOf[i] = jobs++;
  });
  let oldOfNew: Int32Array | undefined;
  /** The old concept of new concept n when n is outside the changed frontier (same id, status and active terms; see lexicalSide), else -1. */
  const unchangedOld = (n: number): number => {
    if (ctx.news.has(n)) return -1;
    if (!oldOfNew) {
      oldOfNew = new Int32Array(newR.conceptCount).fill(-1);
      ctx.align.sameId.forEach((k, c) => {
        if (k >= 0) oldOfNew![k] = c;
      });
    }
    const c = oldOfNew[n];
    return c >= 0 && !ctx.olds.has(c) && oldR.conceptStatus[c] === newR.conceptStatus[n] ? c : -1;
  };
  // The new release's index word lists, when the index thread has built them: the worker reads
  // the stems of the new release's active terms there instead of stemming their texts again.
  const lists = ctx.newIndexWords();
  const thread = startLexicalThread(df, jobs, options.thread, lists);
  const newBatch = (): LexicalBatch => ({ labels: [], termStart: new Int32Array(LEXICAL_BATCH + 1), terms: [] });
  let batch = newBatch();
  /** Index numbers of batch.terms (-1: not in the index), when there are word lists. */
  let termIds: number[] = [];
  /** Per posted batch: for a batch of 2 or 3, its labels and their lexCache slots (see slotOf); undefined for a batch of jobs. */
  const posted: ({ labels: string[]; slots: number[] } | undefined)[] = [];
  let slots: number[] = [];
  const post = () => {
    if (batch.labels.length === 0) return;
    thread!.post({ ...batch, termStart: batch.termStart.slice(0, batch.labels.length + 1), termIds: lists ? Int32Array.from(termIds) : undefined });
    termIds = [];
    posted.push(slots.length ? { labels: batch.labels, slots } : undefined);
    batch = newBatch();
    slots = [];
  };
  const push = (text: string, r0: Release, c0: number) => {
    batch.labels.push(text);
    let r = r0;
    let c = c0;
    // With word lists, an old concept outside the changed frontier is sent with its new concept's
    // active terms (the same texts; lexicalSide has it the other way round), with their index numbers.
    if (lists && r === oldR) {
      const n = ctx.align.sameId[c];
      if (n >= 0 && unchangedOld(n) === c) {
        r = newR;
        c = n;
      }
    }
    const indexed = lists !== undefined && r === newR && isActive(newR, c);
    for (const term of activeTermsOf(r, c)) {
      batch.terms.push(termTextAt(r, term));
      if (lists) termIds.push(indexed ? term : -1);
    }
    batch.termStart[batch.labels.length] = batch.terms.length;
  };
  // The jobs go to the worker first, so that it starts on them while this thread prepares the rest.
  let jobBatches = 0;
  if (thread) {
    targets.forEach((t, i) => {
      if (jobOf[i] < 0) return;
      push(t.labelText, oldR, t.cOld!);
      if (batch.labels.length === LEXICAL_BATCH) post();
    });
    post();
    jobBatches = posted.length;
  }

  // The old target's ancestors are compared with a new candidate's by the new hierarchy's nodes.
  const oldAnc = oldH ? new AncestorIndex(oldH, newH && newH !== oldH ? graphOf(newH) : undefined) : undefined;
  const newAnc = newH ? (newH === oldH ? oldAnc : new AncestorIndex(newH)) : undefined;
  const bothHierarchies = ctx.input.oldHierarchy !== undefined && ctx.input.newHierarchy !== undefined;

  // Changes by concept id; retirements by their concept (its suggestions are candidates).
  const changesOf = new Map<string, Change[]>();
  const retirementOf = new Map<string, ChangeOf<'retirement'>>();
  for (const c of changes) {
    if (c.kind === 'retirement' && !retirementOf.has(c.from[0])) retirementOf.set(c.from[0], c);
    for (const id of new Set([...c.from, ...c.to])) {
      const list = changesOf.get(id);
      if (list) list.push(c);
      else changesOf.set(id, [c]);
    }
  }

  // Active terms of the new frontier by folded form and lexical key: concepts that now hold a label's text.
  const frontierFolded = new Map<string, number[]>();
  const frontierLexical = new Map<string, number[]>();
  const holding = (map: Map<string, number[]>, key: string, n: number) => {
    const list = map.get(key);
    if (!list) map.set(key, [n]);
    else if (!list.includes(n)) list.push(n);
  };
  for (const node of ctx.news.values()) {
    if (!node.active) continue;
    for (const t of node.terms) {
      const folded = foldTerm(termTextAt(newR, t));
      holding(frontierFolded, folded, node.n);
      // The lexical key of an indexed term (active, of an active concept) from the index's lists.
      holding(frontierLexical, lists && newR.termStatus[t] === ACTIVE ? termStems(lists, t).join(' ') : lexicalKeyOfFolded(folded), node.n);
    }
  }
  /** Frontier concepts holding the label's folded form, then those holding its lexical key. */
  const frontierHolding = (label: TextForms) => [frontierFolded.get(label.folded), frontierLexical.get(label.lexical)];

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
  /**
   * Lexical features by label text, then by concept and release (slotOf); null: asked of the
   * worker, not answered yet. (Keyed in two steps, not by one string made of both: the label's
   * string keeps its hash, where a new key string had to be built and hashed at each lookup.)
   */
  const lexCache = new Map<string, Map<number, Float64Array | null>>();
  /** The lexCache slot of concept c of release r: c in the old release, -1 - c in the new one. */
  const slotOf = (r: Release, c: number) => (r === oldR ? c : -1 - c);
  const cached = (text: string, slot: number) => lexCache.get(text)?.get(slot);
  const cache = (text: string, slot: number, v: Float64Array | null) => {
    const byConcept = lexCache.get(text);
    if (byConcept) byConcept.set(slot, v);
    else lexCache.set(text, new Map([[slot, v]]));
  };
  // A concept outside the changed frontier has the same active terms (text, type, language; as a
  // multiset, which the features, maxima over the terms, do not see the order of) in both releases (align/types.ts), and both releases' features share one set of
  // document frequencies, so its lexical features are the same in both: computed once, on the
  // old concept. (Most mappings point at such concepts.)
  /** Where lexical(r, label, c) is computed: on the old concept when c is a new concept outside the frontier (both releases' features share the scorer's document frequencies). */
  const lexicalSide = (r: Release, c: number): [Release, number] => {
    if (r === newR) {
      const same = unchangedOld(c);
      if (same >= 0) return [oldR, same];
    }
    return [r, c];
  };
  const lexical = (r0: Release, label: TextForms, c0: number): Float64Array => {
    const [r, c] = lexicalSide(r0, c0);
    const slot = slotOf(r, c);
    let v = cached(label.text, slot);
    if (!v) {
      v = new Float64Array(LEXICAL_COUNT);
      (r === oldR ? oldFeatures : newFeatures).lexical(label, c, v);
      cache(label.text, slot, v);
    }
    return v;
  };
  const x = new Float64Array(FEATURE_COUNT);
  const probability = (lex: Float64Array, target: ConceptContext | null, candidate: ConceptContext) => {
    x.set(lex);
    contextFeatures(target, candidate, x, LEXICAL_COUNT);
    return scorer.probability(x);
  };
  /**
   * probability(lex, context of the old target, context of the candidate) where the candidate is
   * the target itself: in the old release (cNew undefined), or in the new release when it is
   * outside the changed frontier (same id). The same features without building ancestor maps
   * when the target's ancestry is the same in both hierarchies (then the weighted Jaccard is 1,
   * or both sets are empty), which holds for most mappings.
   */
  // A mapping asks for its target twice in a row (old release, then new): the last answer is kept.
  let hasNode = -2;
  let has = false;
  const hasAncestors = (n: number) => (n === hasNode ? has : ((hasNode = n), (has = oldAnc!.hasAncestorsNode(n))));
  const selfScore = (lex: Float64Array, cOld: number, cNew?: number): number => {
    x.set(lex);
    const category = conceptContext(oldR, cOld).category;
    contextFeatures({ category, ancestors: null }, { category: cNew === undefined ? category : conceptContext(newR, cNew).category, ancestors: null }, x, LEXICAL_COUNT);
    const anc = cNew === undefined ? oldAnc : newAnc;
    if (oldAnc && anc) {
      // The target's node in each hierarchy (the same id: cNew is the old concept's id match).
      const na = oldAnc.nodeOfConcept(oldR, cOld);
      const nb = anc === oldAnc ? na : anc.nodeOfConcept(newR, cNew!);
      let s = -1;
      if (anc === oldAnc || oldAnc.sameAncestorsNodes(anc, na, nb)) s = hasAncestors(na) ? 1 : -1;
      else {
        const sa = oldAnc.ofNode(na);
        const sb = anc.ofNode(nb);
        if (sa.keys.length > 0 && sb.keys.length > 0) s = ancestorSetSimilarity(sa, sb);
      }
      if (s >= 0) {
        x[LEXICAL_COUNT + 2] = s;
        if (s === 0) x[LEXICAL_COUNT + 3] = 1;
      }
    }
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

  // With a worker (lexicalThread.ts) the lexical work goes there, in batches answered in order
  // (a batch the worker has not started when this thread needs an answer may be computed here),
  // while this thread trains the scorer and assesses:
  // 1. for each mapping whose target is outside the changed frontier (most of them), the
  //    label's forms and its features against the target (the "jobs");
  // 2. for the other mappings, the features against the concepts their assessment will likely
  //    score: the target and what the structure offers (groups, term flow, history, retirement
  //    suggestions, frontier text);
  // 3. once the nearest-concept searches those assessments surely run are answered (they
  //    start now, on the index's worker), the features against the hits;
  // 4. and, after training, the same for the searches they run only when a score falls short
  //    (searchesIfWeak, guessed from the trained scorer).
  // Answers to 2 to 4 go into lexCache; what was not asked is computed here, as without a worker.
  /** Ask the worker for lexical(r, label, c), unless known or asked already. */
  const ask = (text: string, r0: Release, c0: number) => {
    const [r, c] = lexicalSide(r0, c0);
    const slot = slotOf(r, c);
    if (cached(text, slot) !== undefined) return;
    cache(text, slot, null);
    slots.push(slot);
    push(text, r, c);
    if (batch.labels.length === LEXICAL_BATCH) post();
  };
  /** Take the answer to batch b and put its features into lexCache. */
  const fill = (b: number) => {
    const result = thread!.take(b);
    if (!result) return;
    const { labels, slots: asked } = posted[b]!;
    asked.forEach((slot, k) => cache(labels[k], slot, result.features.subarray(k * LEXICAL_COUNT, (k + 1) * LEXICAL_COUNT)));
  };
  /** Does assess search the whole release for this mapping whatever the scores (unknown, inactive, reused or retired without carrier)? */
  const searchesSurely = (t: Target): boolean => {
    if (options.nearestSearch === false || t.labelText.trim() === '') return false;
    if (t.cOld === undefined || !isActive(oldR, t.cOld)) return true;
    const node = ctx.olds.get(t.cOld);
    if (!node) return false;
    if (node.fate === 'reused') return true;
    return (node.fate === 'retired' || node.fate === 'absent') && (node.group >= 0 ? ctx.groups[node.group].kind : 'retirement') === 'retirement';
  };
  /** Active new concepts the assessment of a mapping outside the jobs will likely score, search hits aside. */
  const likely = (t: Target): number[] => {
    const out: number[] = [];
    if (t.cNew !== undefined) out.push(t.cNew);
    const node = t.cOld !== undefined ? ctx.olds.get(t.cOld) : undefined;
    if (node) {
      if (node.group >= 0) out.push(...ctx.groups[node.group].news);
      if (node.flows) out.push(...node.flows.keys());
    }
    const h = ctx.input.history;
    if (h) for (const strong of [true, false]) for (const id of resolveHistory(h, newR, t.id, strong).targets) out.push(indexOf(newR, id) ?? -1);
    for (const s of retirementOf.get(t.id)?.evidence.suggestions ?? []) out.push(indexOf(newR, s.concept_id) ?? -1);
    const label = formsOf(t.labelText);
    for (const list of frontierHolding(label)) if (list) out.push(...list);
    return out.filter((n) => n >= 0 && isActive(newR, n));
  };
  /** Start the searches of `texts` (as search() runs them) on the index's worker; the returned function waits for their hits. */
  const searchAhead = (texts: string[]) => ctx.searchAhead(texts.map((text) => ({ texts: [text], limit: th.searchHits, skipConcept: -1 })));
  /** Put the hits of `texts` into searchCache and ask the worker for their features against the labels of the mappings `which` picks. */
  const receiveHits = (texts: string[], take: () => IndexHit[][], which: (t: Target, i: number) => boolean) => {
    const hits = take();
    texts.forEach((text, k) => searchCache.set(text, hits[k].map((h) => h.concept)));
    targets.forEach((t, i) => {
      if (which(t, i)) for (const n of searchCache.get(t.labelText)!) if (isActive(newR, n)) ask(t.labelText, newR, n);
    });
    post();
  };
  let structureBatches = 0;
  const searchTexts: string[] = [];
  let takeHits: (() => IndexHit[][]) | undefined;
  if (thread) {
    targets.forEach((t, i) => {
      if (jobOf[i] >= 0) return;
      if (t.cOld !== undefined) ask(t.labelText, oldR, t.cOld);
      for (const n of likely(t)) ask(t.labelText, newR, n);
    });
    post();
    structureBatches = posted.length - jobBatches;
    const seen = new Set<string>();
    targets.forEach((t, i) => {
      if (jobOf[i] < 0 && searchesSurely(t) && !seen.has(t.labelText)) {
        seen.add(t.labelText);
        searchTexts.push(t.labelText);
      }
    });
    if (searchTexts.length) takeHits = searchAhead(searchTexts);
  }

  const scorer = options.scorer ?? trainScorer(newR, { hierarchy: newH, index: ctx.newIndex, categoryShiftShare: categoryShiftShare(ctx), df, lists, ...options.training });
  const oldFeatures = scorer.features(oldR);
  const newFeatures = scorer.features(newR, lists);

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

  /** `pre`: the label's forms and its features against the old target, from the worker. */
  function assess(i: number, pre?: { result: LexicalResult; job: number }): MappingResult {
    const m = mappings.mappings[i];
    const reasons: string[] = [];
    const candidates = new Map<number, Candidate>();
    const { oldId, id, cOld, cNew: cNewAny, labelText } = targets[i];
    if (m.localLabel.trim() === '' && cOld !== undefined) reasons.push("The mapping has no label; the target's old preferred term stands in for it.");
    let label: TextForms;
    if (pre) {
      const f = pre.result.forms;
      const k = 3 * pre.job;
      label = { text: labelText, nfc: f[k], folded: f[k + 1], lexical: f[k + 2], stems: f[k + 2] === '' ? [] : f[k + 2].split(' ') };
    } else label = formsOf(labelText);
    let targetContext: ConceptContext | null | undefined;
    /** The old target's context, built on first need (a mapping outside the frontier seldom needs it). */
    const targetCtx = () => (targetContext === undefined ? (targetContext = cOld !== undefined ? conceptContext(oldR, cOld, oldAnc) : null) : targetContext);
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
      for (const list of frontierHolding(label)) {
        if (list) for (const n of list) add(n, flows?.has(n) ? 'term_flow' : 'lexical_neighbour');
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
      for (const cand of candidates.values()) {
        if (cand.score < 0) cand.score = scoreNew(label, cand.n, targetCtx());
        cand.key ??= cand.score + (holdsLabel(cand.n) ? TIE_MARGIN : 0);
      }
      return [...candidates.values()].sort((a, b) => b.key! - a.key! || b.score - a.score || (newR.conceptIds[a.n] < newR.conceptIds[b.n] ? -1 : 1));
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

    const lexOld = pre ? pre.result.features.subarray(pre.job * LEXICAL_COUNT, (pre.job + 1) * LEXICAL_COUNT) : lexical(oldR, label, cOld);
    const scoreOld = selfScore(lexOld, cOld);
    if (scoreOld < th.weakMatch) reasons.push(`The label matched the target weakly already in the old release (${round3(scoreOld)}).`);

    // Already inactive in the old release.
    if (!isActive(oldR, cOld)) {
      reasons.unshift(`${id} was already inactive in the old release.`);
      addHistory();
      addSearch();
      return finish('broken', scoreOld, cNewAny !== undefined ? scoreNew(label, cNewAny, targetCtx()) : null);
    }

    const node = ctx.olds.get(cOld);
    const cNew = cNewAny;

    // Outside the changed frontier: same id, status, category and terms in both releases.
    if (!node && cNew !== undefined && !ctx.news.has(cNew)) {
      const sNew = selfScore(lexOld, cOld, cNew);
      candidates.set(cNew, { n: cNew, reason: 'current_target', score: sNew });
      addFrontier();
      const list = candidates.size > 1 ? ranked() : [];
      const better = list.find((c) => c.n !== cNew && c.score >= th.credibleMin && c.score > sNew + th.betterMargin);
      if (better) {
        reasons.unshift(`The label now matches ${describe(better)} better than the target (${round3(sNew)}).`);
        return finish('drifted', scoreOld, sNew);
      }
      const moved = parentsChanged(id, cOld, cNew);
      if (moved) {
        reasons.unshift(moved, `The target's terms are unchanged and the label still matches it (${round3(scoreOld)}).`);
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
    const sNewTarget = cNew !== undefined ? scoreNew(label, cNew, targetCtx()) : null;

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
        const retirement = retirementOf.get(id);
        if (retirement) for (const s of retirement.evidence.suggestions) add(indexOf(newR, s.concept_id), s.reason);
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
    const sNew = scoreNew(label, n, targetCtx(), lexNew);
    /** The new score as if the context had not changed: lexical change only. */
    const sLexNew = selfScore(lexNew, cOld);
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
      reasons.unshift(`The label matches best the term ${quote(movedTermText)}, which moved from ${id} to ${describe({ ...moved, score: moved.score < 0 ? scoreNew(label, home, targetCtx()) : moved.score })}.`);
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
    const moved = parentsChanged(id, cOld, n);
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

  /** A sentence when the parents of `id` (old concept cOld, new concept cNew) differ between the two hierarchies, else ''. */
  function parentsChanged(id: string, cOld: number, cNew: number): string {
    if (!bothHierarchies || !oldAnc || !newAnc) return '';
    const na = oldAnc.nodeOfConcept(oldR, cOld);
    const nb = newAnc.nodeOfConcept(newR, cNew);
    if (sameParentNodes(oldAnc.graph, na, newAnc.graph, nb, oldAnc.graph.nodesIn(newAnc.graph))) return '';
    const before = na < 0 ? [] : oldAnc.graph.parentIds(na);
    const after = nb < 0 ? [] : newAnc.graph.parentIds(nb);
    if (before.join('\u0001') === after.join('\u0001')) return '';
    const added = after.filter((p) => !before.includes(p));
    const removed = before.filter((p) => !after.includes(p));
    const parts = [added.length ? `added ${added.join(', ')}` : '', removed.length ? `removed ${removed.join(', ')}` : ''].filter(Boolean);
    return `The parents of ${id} changed: ${parts.join('; ')}.`;
  }

  /**
   * Will assess search for this mapping if a score falls short? Mirrors assess: a target merged
   * into or replaced by one concept that the label scores below redirectMin against, or a target
   * that continues with changed terms whose lexical score fell by more than driftDrop to below
   * weakMatch. Only a guess for prefetching: assess decides.
   */
  function searchesIfWeak(t: Target): boolean {
    if (t.cOld === undefined || t.labelText.trim() === '') return false;
    const node = ctx.olds.get(t.cOld);
    if (!node || node.fate === 'reused') return false;
    const group = node.group >= 0 ? ctx.groups[node.group] : undefined;
    const label = formsOf(t.labelText);
    if (node.fate === 'retired' || node.fate === 'absent') {
      if (!group || (group.kind !== 'merge' && group.kind !== 'replacement') || group.news.length !== 1) return false;
      return scoreNew(label, group.news[0], conceptContext(oldR, t.cOld, oldAnc)) < th.redirectMin;
    }
    if (t.cNew === undefined || (group && group.olds.includes(t.cOld) && (group.kind === 'split' || group.kind === 'reorganization'))) return false;
    const scoreOld = selfScore(lexical(oldR, label, t.cOld), t.cOld);
    const sLexNew = selfScore(lexical(newR, label, t.cNew), t.cOld);
    return scoreOld - sLexNew > th.driftDrop && sLexNew < th.weakMatch;
  }

  if (!thread) return { mappings: mappings.mappings.map((_, i) => assess(i)), scorer: scorer.info };
  // With the worker, in the order its answers come. The order changes nothing but the caches'
  // filling: each result is a function of its mapping (tests/rescore/lexicalThread.test.ts).
  const results: MappingResult[] = new Array(mappings.mappings.length);
  const byJob = new Int32Array(jobs);
  jobOf.forEach((j, i) => {
    if (j >= 0) byJob[j] = i;
  });
  for (let b = 0; b < jobBatches; b++) {
    const result = thread.take(b);
    for (let j = b * LEXICAL_BATCH; j < Math.min(jobs, (b + 1) * LEXICAL_BATCH); j++) results[byJob[j]] = assess(byJob[j], result && { result, job: j - b * LEXICAL_BATCH });
  }
  for (let b = jobBatches; b < jobBatches + structureBatches; b++) fill(b);
  // Mappings whose assessment searches only when a score falls short (a weak merge survivor, a
  // target whose lexical score fell): found from the scores, now that the scorer is trained, and
  // their searches sent to the index's worker too. A wrong guess costs only time: search() does
  // what was not asked.
  const maybe = new Uint8Array(targets.length);
  const maybeTexts: string[] = [];
  if (options.nearestSearch !== false) {
    const pending = new Set(searchTexts);
    targets.forEach((t, i) => {
      if (jobOf[i] >= 0 || searchesSurely(t) || !searchesIfWeak(t)) return;
      maybe[i] = 1;
      if (!pending.has(t.labelText) && !searchCache.has(t.labelText)) {
        pending.add(t.labelText);
        maybeTexts.push(t.labelText);
      }
    });
  }
  const takeMaybe = maybeTexts.length ? searchAhead(maybeTexts) : undefined;
  if (takeHits) receiveHits(searchTexts, takeHits, (t, i) => jobOf[i] < 0 && searchesSurely(t));
  const hitBatches = posted.length;
  // Mappings that search last, so that the hits' features are on their way meanwhile.
  targets.forEach((t, i) => {
    if (jobOf[i] < 0 && !maybe[i] && !searchesSurely(t)) results[i] = assess(i);
  });
  if (takeMaybe) receiveHits(maybeTexts, takeMaybe, (_, i) => maybe[i] === 1);
  for (let b = jobBatches + structureBatches; b < hitBatches; b++) fill(b);
  targets.forEach((t, i) => {
    if (jobOf[i] < 0 && searchesSurely(t)) results[i] = assess(i);
  });
  for (let b = hitBatches; b < posted.length; b++) fill(b);
  targets.forEach((t, i) => {
    if (maybe[i]) results[i] = assess(i);
  });
  thread.close();
  return { mappings: results, scorer: scorer.info };
}
