/**
 * injectChanges: make a new release from a base release by injecting every change kind at
 * known places, and say what a correct detector reports (the truth).
 *
 * Works on any BaseRelease (the synthetic vocabulary, or an imported release through
 * genericTerms.ts). Each injected change touches its own concepts: no concept is touched by
 * two changes, and the parents and children of touched concepts are left alone too, so each
 * change has one reading; so are concepts that share a lexical key with another concept
 * (duplicates and homonyms of an imported release), since the aligner could pair their terms.
 * Concepts whose identifier ends (retired, replaced, merged away, split into new identifiers,
 * reorganized, reused) are leaves, so no child is left under an inactive parent. Each kind
 * picks its concepts from its own random point of one shuffled order.
 *
 * The truth follows the definitions the detectors implement (classify/context.ts):
 * - a new concept carries an ending one when it receives its preferred term, or at least
 *   `carryShare` (0.3) of its active terms and at least two terms (docs/THRESHOLDS.md); every
 *   part of a split, and every cell of a reorganization, that does not get the preferred term
 *   is given at least that share and two terms;
 * - a moved synonym leaves a concept of at least 4 terms, so its share stays below 0.3, and
 *   goes to a continuing concept;
 * - a merge into a survivor that keeps its id gives the survivor the absorbed terms;
 * - a retirement leaves no term of the concept anywhere else;
 * - a rename (preferred_term_change) changes no other synonym, and a dropped old preferred
 *   term is not a removed synonym;
 * - id_reuse replaces every term by terms of an unrelated name (token Jaccard of lexical
 *   keys below 0.2 for every pair, so also below `reuseSimilarity` 0.3 as a mean); when the
 *   old terms go on under a new identifier, the change's `to` is [the identifier, the new one];
 * - replacements and merges whose terms do not flow (a reworded successor) are only given
 *   when the history table names the successor, since nothing else could tell.
 * Terms keep their term_id when they move (they exist once); a copy left behind on an
 * inactive concept keeps the old id and the carried copy gets a new one.
 *
 * Also injected, and not in the truth: cosmetic edits (case or punctuation of one term),
 * which a correct detector does not report.
 */
import { CHANGE_KINDS, type ChangeKind } from '../classify/types.js';
import { DEFAULT_THRESHOLDS } from '../classify/thresholds.js';
import { foldTerm, lexicalKey } from '../text/normalize.js';
import { tokenJaccard } from '../text/similarity.js';
import { buildKeyOwners, KeyOwnership, termKeyOfFolded, type KeyTable } from './keyOwnership.js';
import { genericTermSource } from './genericTerms.js';
import { OverlayMap } from './overlayMap.js';
import { Rng } from './random.js';
import type { BaseConcept, BaseRelease, BaseTerm, ConceptOutcome, GenHistoryRow, IndexedParents, InjectedChange, TermSource, TruthChange } from './types.js';

/** Relative weight of each kind among the injected changes (each ≥ 1% of them). */
export const DEFAULT_MIX: Readonly<Record<ChangeKind, number>> = {
  addition: 12,
  retirement: 10,
  replacement: 8,
  merge: 7,
  split: 6,
  moved_synonym: 8,
  preferred_term_change: 10,
  synonym_added: 10,
  synonym_removed: 8,
  id_reuse: 4,
  category_change: 5,
  hierarchy_change: 8,
  reorganization: 4,
};

export interface InjectOptions {
  seed: number | string;
  /** Injected changes per active base concept (default 0.04). */
  rate?: number;
  /** Weights per kind, merged over DEFAULT_MIX (give 0 to leave a kind out). */
  mix?: Partial<Record<ChangeKind, number>>;
  /** Cosmetic edits per active base concept (default 0.01). */
  cosmeticRate?: number;
  /** Share of retirements, replacements and merges given history rows (default 0.6). */
  historyShare?: number;
  /** Of the replacements and merges with history rows, the share whose terms do not flow (default 0.3). */
  historyOnlyShare?: number;
  /** Where fresh terms come from (default: genericTermSource of the base). */
  termSource?: TermSource;
  /**
   * Lexical key owners of the base (default: built from the base): every term's key, owned by
   * its concept or SHARED, as buildKeyOwners and the vocabulary make them. Concepts are only
   * checked for shared keys when the table has some.
   */
  keyOwners?: KeyTable;
  /** The k-th new concept identifier (default `X` + 7 digits, skipping ids of the base). */
  conceptIdFor?: (k: number) => string;
  /** The k-th new term identifier (default: '' when the base has none, else `TX` + number). */
  termIdFor?: (k: number) => string;
  /**
   * Index of a concept id in base.concepts, or -1 (default: a Map built from the base). A base
   * whose identifiers encode their position can answer without a Map of a million strings.
   */
  indexOf?: (id: string) => number;
}

export interface InjectResult {
  newRelease: BaseRelease;
  /** The same map as newRelease.parents: the base hierarchy with the injected edits laid over it. */
  newHierarchy: ReadonlyMap<string, readonly string[]>;
  history: GenHistoryRow[];
  /** Sorted by kind (CHANGE_KINDS order), then from, then to. */
  truth: TruthChange[];
  changes: InjectedChange[];
  /** Old concept id → what happened to it (every touched old concept). */
  outcomes: Map<string, ConceptOutcome>;
  /** Concepts given a cosmetic edit only. */
  cosmetic: string[];
  /** Index of a base concept id in base.concepts, or -1. */
  oldIndexOf: (id: string) => number;
  /** Identifiers of the concepts the injection created. */
  createdIds: ReadonlySet<string>;
  /** Changes asked for and made, per kind. */
  planned: Record<ChangeKind, number>;
  injected: Record<ChangeKind, number>;
}

const FREE = 0;
const TOUCHED = 1;
const RESERVED = 2;

/** Order in which kinds pick their concepts: the pickiest (several concepts) first. */
const PICK_ORDER: readonly ChangeKind[] = [
  'reorganization', 'merge', 'split', 'moved_synonym', 'id_reuse', 'replacement', 'retirement',
  'preferred_term_change', 'synonym_removed', 'synonym_added', 'category_change', 'hierarchy_change', 'addition',
];

/** Below this token Jaccard an injected reuse counts as unrelated (the detector's limit is reuseSimilarity). */
const REUSE_MAX_SIMILARITY = 0.2;

const sortIds = (ids: string[]) => [...ids].sort();
const cmp = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);

/** A carried share without the preferred term needs at least this many terms (docs/THRESHOLDS.md). */
export const MIN_CARRIED_TERMS = 2;

/** Fewest terms (without the preferred one) that carry a concept of n terms: m / n ≥ share and m ≥ 2, compared as the detector does. */
export function carryCount(n: number, share: number): number {
  let m = MIN_CARRIED_TERMS;
  while (m / n < share) m++;
  return m;
}

/** Best token Jaccard of lexical keys over all pairs (as classify/context.ts termSetSimilarity). */
export function bestPairSimilarity(a: readonly string[], b: readonly string[]): number {
  let best = 0;
  const kb = b.map((t) => lexicalKey(t).split(' '));
  for (const ta of a) {
    const ka = lexicalKey(ta).split(' ');
    for (const k of kb) best = Math.max(best, tokenJaccard(ka, k));
  }
  return best;
}

/** Case and punctuation edits of a term that fold to the same text (foldTerm). */
export function cosmeticEdits(text: string): string[] {
  const out: string[] = [];
  const first = text.charAt(0);
  out.push((first === first.toUpperCase() ? first.toLowerCase() : first.toUpperCase()) + text.slice(1));
  out.push(text.replace(/\b([a-z])/g, (m) => m.toUpperCase()));
  if (text.includes(', ')) out.push(text.replace(', ', ' '), text.replace(', ', ' - '));
  const sp = text.indexOf(' ');
  if (sp > 0) out.push(`${text.slice(0, sp)}-${text.slice(sp + 1)}`);
  out.push(`${text}.`);
  const folded = foldTerm(text);
  return out.filter((e) => e !== text && foldTerm(e) === folded);
}

class Injector {
  readonly rng: Rng;
  readonly n: number;
  readonly concepts: readonly BaseConcept[];
  /** Index of a base concept id, or -1. */
  readonly indexOf: (id: string) => number;
  readonly state: Uint8Array;
  /** Per concept: 0 not yet known, 1 owns every key of its terms, 2 shares one. */
  private readonly ownsKeys: Uint8Array;
  /** Whether some key of the base is shared, so candidates must be checked. */
  private readonly checkKeys: boolean;
  readonly childCount: Int32Array;
  /** Children of concept c: childList[childStart[c] .. childStart[c + 1]). */
  readonly childStart: Int32Array;
  readonly childList: Int32Array;
  readonly byCategory = new Map<string, number[]>();
  readonly categories: string[];
  readonly keys: KeyOwnership;
  readonly source: TermSource;
  readonly share = DEFAULT_THRESHOLDS.carryShare;

  /** Changed base concepts (null: removed from the file). */
  readonly replaced = new Map<number, BaseConcept | null>();
  readonly appended: BaseConcept[] = [];
  readonly parents: OverlayMap<string, readonly string[]>;
  readonly history: GenHistoryRow[] = [];
  readonly changes: InjectedChange[] = [];
  readonly outcomes = new Map<string, ConceptOutcome>();
  readonly cosmetic: string[] = [];

  private conceptSerial = 0;
  private termSerial = 0;
  private readonly conceptIdFor: (k: number) => string;
  private readonly termIdFor: (k: number) => string;
  private readonly hasTermIds: boolean;
  private baseTermIds: Set<string> | null = null;
  private readonly usedIds = new Set<string>();

  constructor(readonly base: BaseRelease, readonly options: InjectOptions) {
    this.rng = new Rng(options.seed, 'inject');
    this.concepts = base.concepts;
    this.n = base.concepts.length;
    this.state = new Uint8Array(this.n);
    this.ownsKeys = new Uint8Array(this.n);
    this.childCount = new Int32Array(this.n);
    if (options.indexOf) this.indexOf = options.indexOf;
    else {
      const index = new Map<string, number>();
      for (let i = 0; i < this.n; i++) index.set(this.concepts[i].id, i);
      this.indexOf = (id) => index.get(id) ?? -1;
    }
    // Child → parent edges as index pairs, then compressed rows parent → children.
    const edges: number[] = [];
    const edge = (ci: number, pi: number) => {
      this.childCount[pi]++;
      edges.push(pi, ci);
    };
    const indexed = base.parents as Partial<IndexedParents>;
    if (typeof indexed.forEachParentIndex === 'function') indexed.forEachParentIndex(edge);
    else {
      for (const [child, ps] of base.parents) {
        const ci = this.indexOf(child);
        if (ci < 0) continue;
        for (const p of ps) {
          const pi = this.indexOf(p);
          if (pi >= 0) edge(ci, pi);
        }
      }
    }
    this.childStart = new Int32Array(this.n + 1);
    for (let i = 0; i < this.n; i++) this.childStart[i + 1] = this.childStart[i] + this.childCount[i];
    this.childList = new Int32Array(edges.length / 2);
    const fill = this.childStart.slice(0, this.n);
    for (let e = 0; e < edges.length; e += 2) this.childList[fill[edges[e]]++] = edges[e + 1];
    this.concepts.forEach((c, i) => {
      if (!this.isActive(i)) return;
      const list = this.byCategory.get(c.category);
      if (list) list.push(i);
      else this.byCategory.set(c.category, [i]);
    });
    this.categories = [...this.byCategory.keys()].sort();
    for (const cat of this.categories) this.rng.shuffle(this.byCategory.get(cat)!);
    const owners = options.keyOwners ?? buildKeyOwners(base);
    this.keys = new KeyOwnership(owners);
    this.checkKeys = owners.sharedKeys > 0;
    this.source = options.termSource ?? genericTermSource(base);
    this.parents = new OverlayMap(base.parents);
    this.hasTermIds = base.concepts.some((c) => c.terms.some((t) => t.termId !== ''));
    this.conceptIdFor = options.conceptIdFor ?? ((k) => `X${String(k + 1).padStart(7, '0')}`);
    this.termIdFor = options.termIdFor ?? ((k) => `TX${k + 1}`);
  }

  isActive(c: number): boolean {
    const x = this.concepts[c];
    return x.status === 'active' && x.terms.length > 0;
  }

  isLeaf(c: number): boolean {
    return this.childCount[c] === 0;
  }

  /**
   * Free for a change: untouched, not a neighbour, active, and the only owner of its terms'
   * lexical keys. A concept sharing a key with another (a duplicate or homonym of an imported
   * release) is a neighbour of that concept in the aligner's eyes and is left alone.
   */
  free(c: number): boolean {
    if (this.state[c] !== FREE || !this.isActive(c)) return false;
    if (!this.checkKeys) return true;
    let own = this.ownsKeys[c];
    if (own === 0) {
      own = this.concepts[c].terms.every((t) => this.keys.owner(termKeyOfFolded(foldTerm(t.text))) === c) ? 1 : 2;
      this.ownsKeys[c] = own;
    }
    return own === 1;
  }

  /** Mark c touched and its parents and children reserved. */
  touch(c: number): void {
    this.state[c] = TOUCHED;
    for (const p of this.base.parents.get(this.concepts[c].id) ?? []) {
      const pi = this.indexOf(p);
      if (pi >= 0 && this.state[pi] === FREE) this.state[pi] = RESERVED;
    }
    for (const ch of this.childrenOf(c)) if (this.state[ch] === FREE) this.state[ch] = RESERVED;
  }

  childrenOf(c: number): Int32Array {
    return this.childList.subarray(this.childStart[c], this.childStart[c + 1]);
  }

  reserve(c: number): void {
    if (this.state[c] === FREE) this.state[c] = RESERVED;
  }

  mintConceptId(): string {
    for (;;) {
      const id = this.conceptIdFor(this.conceptSerial++);
      if (this.indexOf(id) < 0 && !this.usedIds.has(id)) {
        this.usedIds.add(id);
        return id;
      }
    }
  }

  mintTermId(): string {
    if (!this.hasTermIds) return '';
    if (this.options.termIdFor) return this.termIdFor(this.termSerial++);
    this.baseTermIds ??= new Set(this.concepts.flatMap((c) => c.terms.map((t) => t.termId)));
    for (;;) {
      const id = this.termIdFor(this.termSerial++);
      if (!this.baseTermIds.has(id)) return id;
    }
  }

  /** Index a new concept will have in the ownership table. */
  nextNewIndex(): number {
    return this.n + this.appended.length;
  }

  /**
   * Keep the candidates that concept `owner` may take: a fold not among `folds`, a key free or
   * already `owner`'s. Claims the keys; returns at most `limit` texts.
   */
  claim(candidates: readonly string[], owner: number, folds: Set<string>, limit: number): string[] {
    const out: string[] = [];
    for (const text of candidates) {
      if (out.length >= limit) break;
      const f = foldTerm(text);
      if (f === '' || folds.has(f)) continue;
      const key = termKeyOfFolded(f);
      if (!this.keys.usableBy(key, owner)) continue;
      this.keys.claim(key, owner);
      folds.add(f);
      out.push(text);
    }
    return out;
  }

  /** Terms of a fresh concept (preferred first) with a free key for its name, or null. */
  freshConcept(category: string, owner: number, size: number, unlike: readonly string[] = []): string[] | null {
    for (let attempt = 0; attempt < 30; attempt++) {
      const cands = this.source.newConcept(category, this.rng);
      if (cands.length === 0) continue;
      const f = foldTerm(cands[0]);
      if (!this.keys.free(termKeyOfFolded(f))) continue;
      if (unlike.length && bestPairSimilarity(cands, unlike) >= REUSE_MAX_SIMILARITY) continue;
      return this.claim(cands, owner, new Set(), size);
    }
    return null;
  }

  /** Fresh names of base concept c that `owner` may take (not among c's terms). */
  freshVariants(c: number, owner: number, limit: number, extraFolds: readonly string[] = []): string[] {
    const folds = new Set(this.concepts[c].terms.map((t) => foldTerm(t.text)));
    for (const f of extraFolds) folds.add(f);
    return this.claim(this.source.variants(c, this.concepts[c], this.rng), owner, folds, limit);
  }

  /** Give the terms' keys to a new owner (they moved there). */
  transferKeys(terms: readonly BaseTerm[], owner: number): void {
    for (const t of terms) this.keys.claim(termKeyOfFolded(foldTerm(t.text)), owner);
  }

  newTerm(text: string, type: BaseTerm['type']): BaseTerm {
    return { text, type, termId: this.mintTermId() };
  }

  /** Terms carried to a new concept: moved (same ids) when the old concept leaves the file, else copies with new ids. */
  carried(terms: readonly BaseTerm[], absent: boolean): BaseTerm[] {
    return terms.map((t) => (absent ? { ...t, type: 'synonym' as const } : this.newTerm(t.text, 'synonym')));
  }

  /** End base concept c: inactive keeping its terms, or absent from the file. Drops its hierarchy rows. */
  end(c: number, absent: boolean): void {
    const old = this.concepts[c];
    this.replaced.set(c, absent ? null : { ...old, status: 'inactive' });
    this.parents.delete(old.id);
  }

  addConcept(concept: BaseConcept, parents: readonly string[]): void {
    this.appended.push(concept);
    if (parents.length) this.parents.set(concept.id, [...parents]);
  }

  parentsOf(c: number): string[] {
    return [...(this.base.parents.get(this.concepts[c].id) ?? [])];
  }

  /** A free active concept of c's category other than c meeting `ok`: a sibling first, else any. */
  partner(c: number, ok: (x: number) => boolean): number {
    const cat = this.concepts[c].category;
    const good = (x: number) => x !== c && this.free(x) && this.concepts[x].category === cat && ok(x);
    for (const p of this.parentsOf(c)) {
      const pi = this.indexOf(p);
      if (pi < 0) continue;
      const sibs = this.childrenOf(pi);
      if (sibs.length === 0) continue;
      const start = this.rng.int(sibs.length);
      for (let k = 0; k < Math.min(sibs.length, 64); k++) {
        const x = sibs[(start + k) % sibs.length];
        if (good(x)) return x;
      }
    }
    return this.anyOf(cat, good);
  }

  /** A concept of `category` meeting `ok`, scanning the shuffled category list from a random point. */
  anyOf(category: string, ok: (x: number) => boolean, maxScan = 5000): number {
    const list = this.byCategory.get(category) ?? [];
    if (list.length === 0) return -1;
    const start = this.rng.int(list.length);
    for (let k = 0; k < Math.min(list.length, maxScan); k++) {
      const x = list[(start + k) % list.length];
      if (ok(x)) return x;
    }
    return -1;
  }

  /** A concept that stays active and untouched, usable as a parent or a history target. */
  bystander(category: string, not: readonly number[] = []): number {
    return this.anyOf(category, (x) => this.state[x] !== TOUCHED && this.isActive(x) && !not.includes(x));
  }

  set(c: number, concept: BaseConcept): void {
    this.replaced.set(c, concept);
  }

  record(kind: ChangeKind, note: string, olds: string[], created: string[], truth: TruthChange[]): void {
    for (const t of truth) {
      t.from = sortIds(t.from);
      // id_reuse lists the reused identifier first, then the sorted carriers.
      t.to = t.kind === 'id_reuse' ? [t.to[0], ...sortIds(t.to.slice(1))] : sortIds(t.to);
      t.note = note;
    }
    this.changes.push({ kind, note, olds, created, truth });
  }

  outcome(id: string, o: ConceptOutcome): void {
    this.outcomes.set(id, o);
  }

  termMap(c: number, to: (t: BaseTerm) => string | null): Map<string, string | null> {
    return new Map(this.concepts[c].terms.map((t) => [t.text, to(t)]));
  }

  styleAbsent(): boolean {
    return this.rng.chance(0.5);
  }

  withHistory(): boolean {
    return this.rng.chance(this.options.historyShare ?? 0.6);
  }

  historyOnly(withHistory: boolean): boolean {
    return withHistory && this.rng.chance(this.options.historyOnlyShare ?? 0.3);
  }
}

type Apply = (inj: Injector, c: number) => boolean;

const endNote = (absent: boolean) => (absent ? 'absent' : 'inactive');

/** Terms of concept c, preferred first, with the rest shuffled. */
function shuffledTerms(inj: Injector, c: number): BaseTerm[] {
  const [first, ...rest] = inj.concepts[c].terms;
  return [first, ...inj.rng.shuffle([...rest])];
}

/** Make the first term preferred and the others synonyms. */
function asConceptTerms(terms: readonly BaseTerm[]): BaseTerm[] {
  return terms.map((t, i) => ({ ...t, type: i === 0 ? 'preferred' : 'synonym' }));
}

const retirement: Apply = (inj, c) => {
  if (!inj.isLeaf(c)) return false;
  const old = inj.concepts[c];
  const absent = inj.styleAbsent();
  inj.touch(c);
  inj.end(c, absent);
  let note = endNote(absent);
  if (inj.withHistory()) {
    const target = inj.bystander(old.category, [c]);
    if (target >= 0) {
      inj.reserve(target);
      inj.history.push({ old_id: old.id, new_id: inj.concepts[target].id, relation: 'consider' });
      note += '; history consider';
    }
  }
  inj.record('retirement', note, [old.id], [], [{ kind: 'retirement', from: [old.id], to: [] }]);
  inj.outcome(old.id, { kind: 'retirement', role: 'changed', successor: null, termTo: inj.termMap(c, () => null) });
  return true;
};

const replacement: Apply = (inj, c) => {
  if (!inj.isLeaf(c)) return false;
  const old = inj.concepts[c];
  const absent = inj.styleAbsent();
  const withHistory = inj.withHistory();
  let historyOnly = inj.historyOnly(withHistory);
  const owner = inj.nextNewIndex();
  let terms: BaseTerm[] = [];
  let note = endNote(absent);
  if (historyOnly) {
    const fresh = inj.freshVariants(c, owner, Math.max(1, old.terms.length));
    if (fresh.length === 0) historyOnly = false;
    else {
      terms = asConceptTerms(fresh.map((t) => inj.newTerm(t, 'synonym')));
      note += '; reworded, history only';
    }
  }
  if (!historyOnly) {
    inj.transferKeys(old.terms, owner);
    terms = inj.carried(old.terms, absent);
    if (inj.rng.chance(0.3)) {
      if (old.terms.length > 1 && inj.rng.chance(0.5)) {
        const k = 1 + inj.rng.int(old.terms.length - 1);
        [terms[0], terms[k]] = [terms[k], terms[0]];
        note += '; a synonym became preferred';
      } else {
        const fresh = inj.freshVariants(c, owner, 1);
        if (fresh.length) {
          terms.unshift(inj.newTerm(fresh[0], 'preferred'));
          note += '; new preferred term';
        }
      }
    }
    terms = asConceptTerms(terms);
  }
  inj.touch(c);
  const id = inj.mintConceptId();
  inj.end(c, absent);
  inj.addConcept({ id, category: old.category, status: 'active', terms }, inj.parentsOf(c));
  if (withHistory) {
    inj.history.push({ old_id: old.id, new_id: id, relation: 'replaced_by' });
    note += '; history replaced_by';
  }
  inj.record('replacement', note, [old.id], [id], [{ kind: 'replacement', from: [old.id], to: [id] }]);
  inj.outcome(old.id, { kind: 'replacement', role: 'changed', successor: id, termTo: inj.termMap(c, () => (historyOnly ? null : id)) });
  return true;
};

const merge: Apply = (inj, a1) => {
  if (!inj.isLeaf(a1)) return false;
  const old1 = inj.concepts[a1];
  const intoSurvivor = inj.rng.chance(0.6);
  const size = inj.rng.chance(0.3) ? 3 : 2;
  const withHistory = inj.withHistory();
  let historyOnly = inj.historyOnly(withHistory);
  const absorbed = [a1];
  const leaf = (x: number) => inj.isLeaf(x);
  let survivor = -1;
  if (intoSurvivor) {
    survivor = inj.partner(a1, () => true);
    if (survivor < 0) return false;
  }
  const wantAbsorbed = intoSurvivor ? size - 1 : size;
  while (absorbed.length < wantAbsorbed) {
    const x = inj.partner(a1, (y) => leaf(y) && y !== survivor && !absorbed.includes(y));
    if (x < 0) break;
    absorbed.push(x);
  }
  if (absorbed.length < (intoSurvivor ? 1 : 2)) return false;
  const target = intoSurvivor ? survivor : inj.nextNewIndex();
  const notes: string[] = [intoSurvivor ? 'into a survivor' : 'into a new concept', `${absorbed.length + (intoSurvivor ? 1 : 0)} concepts`];
  const absentOf = absorbed.map(() => inj.styleAbsent());
  notes.push(absentOf.map(endNote).join('+'));
  const gained: BaseTerm[] = [];
  const freshTerms: string[] = [];
  if (historyOnly) {
    if (!intoSurvivor) {
      // The new concept is named afresh from each merged concept (keys none of them owns).
      const folds: string[] = [];
      for (const a of absorbed) {
        for (const t of inj.freshVariants(a, target, 1, folds)) {
          freshTerms.push(t);
          folds.push(foldTerm(t));
        }
      }
      if (freshTerms.length === 0) historyOnly = false;
    }
    if (historyOnly) notes.push('no term flow, history only');
  }
  if (!historyOnly) {
    absorbed.forEach((a, i) => {
      inj.transferKeys(inj.concepts[a].terms, target);
      gained.push(...inj.carried(inj.concepts[a].terms, absentOf[i]));
    });
  }
  for (const a of absorbed) inj.touch(a);
  let targetId: string;
  if (intoSurvivor) {
    inj.touch(survivor);
    const s = inj.concepts[survivor];
    targetId = s.id;
    if (gained.length) inj.set(survivor, { ...s, terms: [...s.terms, ...gained] });
  } else {
    targetId = inj.mintConceptId();
    let terms: BaseTerm[];
    if (historyOnly) terms = freshTerms.map((t) => inj.newTerm(t, 'synonym'));
    else {
      terms = gained;
      if (inj.rng.chance(0.5)) {
        const fresh = inj.freshVariants(a1, target, 1, gained.map((t) => foldTerm(t.text)));
        if (fresh.length) {
          terms = [inj.newTerm(fresh[0], 'preferred'), ...gained];
          notes.push('new preferred term');
        }
      }
    }
    inj.addConcept({ id: targetId, category: old1.category, status: 'active', terms: asConceptTerms(terms) }, inj.parentsOf(a1));
  }
  absorbed.forEach((a, i) => inj.end(a, absentOf[i]));
  if (withHistory) {
    const relation = inj.rng.chance(0.75) ? 'replaced_by' : 'same_as';
    for (const a of absorbed) inj.history.push({ old_id: inj.concepts[a].id, new_id: targetId, relation });
    notes.push(`history ${relation}`);
  }
  const absorbedIds = absorbed.map((a) => inj.concepts[a].id);
  const from = intoSurvivor ? [...absorbedIds, targetId] : absorbedIds;
  inj.record('merge', notes.join('; '), from, intoSurvivor ? [] : [targetId], [{ kind: 'merge', from, to: [targetId] }]);
  for (const a of absorbed) {
    inj.outcome(inj.concepts[a].id, { kind: 'merge', role: 'absorbed', successor: targetId, termTo: inj.termMap(a, () => (historyOnly ? null : targetId)) });
  }
  if (intoSurvivor) inj.outcome(targetId, { kind: 'merge', role: 'survivor', successor: targetId, termTo: inj.termMap(survivor, () => targetId) });
  return true;
};

const split: Apply = (inj, c) => {
  const old = inj.concepts[c];
  const n = old.terms.length;
  const keepId = inj.rng.chance(0.5);
  if (!keepId && !inj.isLeaf(c)) return false;
  const need = carryCount(n, inj.share);
  let k = inj.rng.chance(0.35) ? 3 : 2;
  if (1 + (k - 1) * need > n) k = 2;
  if (1 + need > n) return false;
  // Group 0 holds the preferred term; every other group gets `need` terms, the rest round-robin.
  const [pref, ...rest] = shuffledTerms(inj, c);
  const groups: BaseTerm[][] = [[pref]];
  let next = 0;
  for (let g = 1; g < k; g++) groups.push(rest.slice(next, (next += need)));
  for (let i = next, g = 0; i < rest.length; i++, g = (g + 1) % k) groups[g].push(rest[i]);
  const absent = !keepId && inj.styleAbsent();
  inj.touch(c);
  const partIds: string[] = [];
  const termTo = new Map<string, string | null>();
  groups.forEach((group, g) => {
    if (g === 0 && keepId) {
      inj.set(c, { ...old, terms: group });
      partIds.push(old.id);
      for (const t of group) termTo.set(t.text, old.id);
      return;
    }
    const owner = inj.nextNewIndex();
    inj.transferKeys(group, owner);
    const moved = keepId || absent;
    const id = inj.mintConceptId();
    inj.addConcept({ id, category: old.category, status: 'active', terms: asConceptTerms(inj.carried(group, moved)) }, inj.parentsOf(c));
    partIds.push(id);
    for (const t of group) termTo.set(t.text, id);
  });
  if (!keepId) inj.end(c, absent);
  const note = `${k} parts; ${keepId ? 'one part keeps the identifier' : `new identifiers; ${endNote(absent)}`}`;
  inj.record('split', note, [old.id], partIds.filter((p) => p !== old.id), [{ kind: 'split', from: [old.id], to: partIds }]);
  inj.outcome(old.id, { kind: 'split', role: 'changed', successor: null, termTo });
  return true;
};

/** Size of the half without the preferred term, so that it carries (0 when n is too small). */
function secondHalf(n: number, share: number): number {
  const m = Math.max(carryCount(n, share), Math.floor(n / 2));
  return n - m >= 1 ? m : 0;
}

/** Split concept c's terms in two: the first holds the preferred term, the second carries on its own. */
function halves(inj: Injector, c: number): [BaseTerm[], BaseTerm[]] {
  const terms = shuffledTerms(inj, c);
  const cut = terms.length - secondHalf(terms.length, inj.share);
  return [terms.slice(0, cut), terms.slice(cut)];
}

const reorganization: Apply = (inj, a) => {
  const ok = (x: number) => inj.isLeaf(x) && secondHalf(inj.concepts[x].terms.length, inj.share) > 0;
  if (!ok(a)) return false;
  const b = inj.partner(a, ok);
  if (b < 0) return false;
  const [a1, a2] = halves(inj, a);
  const [b1, b2] = halves(inj, b);
  const three = inj.rng.chance(0.5);
  // Two new concepts: C = a1 + b2, D = b1 + a2. Three: C = a1, D = b1 + a2, E = b2.
  const layout: BaseTerm[][] = three ? [a1, [...b1, ...a2], b2] : [[...a1, ...b2], [...b1, ...a2]];
  const absentA = inj.styleAbsent();
  const absentB = inj.styleAbsent();
  const movedFromA = new Set(inj.concepts[a].terms.map((t) => t.text));
  inj.touch(a);
  inj.touch(b);
  const ids: string[] = [];
  const termTo = new Map<string, string | null>();
  for (const group of layout) {
    const owner = inj.nextNewIndex();
    inj.transferKeys(group, owner);
    const id = inj.mintConceptId();
    const terms = group.map((t) => inj.carried([t], movedFromA.has(t.text) ? absentA : absentB)[0]);
    inj.addConcept({ id, category: inj.concepts[a].category, status: 'active', terms: asConceptTerms(terms) }, inj.parentsOf(group === b2 ? b : a));
    ids.push(id);
    for (const t of group) termTo.set(t.text, id);
  }
  inj.end(a, absentA);
  inj.end(b, absentB);
  const olds = [inj.concepts[a].id, inj.concepts[b].id];
  inj.record('reorganization', `2 concepts into ${ids.length}; ${endNote(absentA)}+${endNote(absentB)}`, olds, ids, [{ kind: 'reorganization', from: olds, to: ids }]);
  for (const x of [a, b]) inj.outcome(inj.concepts[x].id, { kind: 'reorganization', role: 'changed', successor: null, termTo: inj.termMap(x, (t) => termTo.get(t.text) ?? null) });
  return true;
};

const movedSynonym: Apply = (inj, a) => {
  const old = inj.concepts[a];
  if (old.terms.length < 4) return false;
  const keys = old.terms.map((t) => termKeyOfFolded(foldTerm(t.text)));
  // A synonym whose lexical key no other term of the concept has, so the label built from it is unambiguous.
  const candidates = old.terms.map((_, i) => i).filter((i) => old.terms[i].type !== 'preferred' && keys.filter((k) => k === keys[i]).length === 1);
  if (candidates.length === 0) return false;
  const b = inj.partner(a, () => true);
  if (b < 0) return false;
  const moved = old.terms[inj.rng.pick(candidates)];
  const target = inj.concepts[b];
  inj.touch(a);
  inj.touch(b);
  inj.transferKeys([moved], b);
  inj.set(a, { ...old, terms: old.terms.filter((t) => t !== moved) });
  inj.set(b, { ...target, terms: [...target.terms, { ...moved, type: 'synonym' }] });
  inj.record('moved_synonym', `1 of ${old.terms.length} terms`, [old.id, target.id], [], [{ kind: 'moved_synonym', from: [old.id], to: [target.id] }]);
  inj.outcome(old.id, { kind: 'moved_synonym', role: 'source', successor: null, termTo: inj.termMap(a, (t) => (t === moved ? target.id : old.id)) });
  inj.outcome(target.id, { kind: 'moved_synonym', role: 'receiver', successor: null, termTo: inj.termMap(b, () => target.id) });
  return true;
};

const PREFERRED_STYLES = ['new name, old kept as synonym', 'new name, old dropped', 'synonym promoted, old kept as synonym', 'synonym promoted, old dropped'] as const;

const preferredTermChange: Apply = (inj, c) => {
  const old = inj.concepts[c];
  const [pref, ...syns] = old.terms;
  if (pref.type !== 'preferred') return false;
  let style = inj.rng.int(4);
  if (style >= 2 && syns.length === 0) style -= 2;
  const drop = style % 2 === 1;
  if (drop && old.terms.length < 2) return false;
  let name: BaseTerm;
  if (style < 2) {
    const fresh = inj.freshVariants(c, c, 1);
    if (fresh.length === 0) return false;
    name = inj.newTerm(fresh[0], 'preferred');
  } else {
    // A synonym that differs from the preferred term beyond case and punctuation.
    const prefFold = foldTerm(pref.text);
    const candidates = syns.filter((t) => foldTerm(t.text) !== prefFold);
    if (candidates.length === 0) return false;
    name = { ...inj.rng.pick(candidates), type: 'preferred' };
  }
  const others = syns.filter((t) => t.text !== name.text);
  const terms = [name, ...(drop ? [] : [{ ...pref, type: 'synonym' as const }]), ...others];
  inj.touch(c);
  inj.set(c, { ...old, terms });
  inj.record('preferred_term_change', PREFERRED_STYLES[style], [old.id], [], [{ kind: 'preferred_term_change', from: [old.id], to: [old.id] }]);
  inj.outcome(old.id, { kind: 'preferred_term_change', role: 'changed', successor: null, termTo: inj.termMap(c, (t) => (drop && t === pref ? null : old.id)) });
  return true;
};

const synonymAdded: Apply = (inj, c) => {
  const old = inj.concepts[c];
  const fresh = inj.freshVariants(c, c, inj.rng.chance(0.7) ? 1 : 2);
  if (fresh.length === 0) return false;
  inj.touch(c);
  inj.set(c, { ...old, terms: [...old.terms, ...fresh.map((t) => inj.newTerm(t, 'synonym'))] });
  inj.record('synonym_added', `${fresh.length} added`, [old.id], [], [{ kind: 'synonym_added', from: [old.id], to: [old.id] }]);
  inj.outcome(old.id, { kind: 'synonym_added', role: 'changed', successor: null, termTo: inj.termMap(c, () => old.id) });
  return true;
};

const synonymRemoved: Apply = (inj, c) => {
  const old = inj.concepts[c];
  const syns = old.terms.filter((t) => t.type !== 'preferred');
  if (syns.length === 0) return false;
  const count = Math.min(syns.length, inj.rng.chance(0.7) ? 1 : 2);
  const removed = new Set(inj.rng.shuffle([...syns]).slice(0, count));
  inj.touch(c);
  inj.set(c, { ...old, terms: old.terms.filter((t) => !removed.has(t)) });
  inj.record('synonym_removed', `${count} removed`, [old.id], [], [{ kind: 'synonym_removed', from: [old.id], to: [old.id] }]);
  inj.outcome(old.id, { kind: 'synonym_removed', role: 'changed', successor: null, termTo: inj.termMap(c, (t) => (removed.has(t) ? null : old.id)) });
  return true;
};

const idReuse: Apply = (inj, x) => {
  if (!inj.isLeaf(x)) return false;
  const old = inj.concepts[x];
  const otherCategories = inj.categories.filter((k) => k !== old.category);
  const changeCategory = otherCategories.length > 0 && inj.rng.chance(0.5);
  const category = changeCategory ? inj.rng.pick(otherCategories) : old.category;
  const relocate = inj.rng.chance(0.3);
  const fresh = inj.freshConcept(category, x, Math.max(1, Math.min(4, old.terms.length)), old.terms.map((t) => t.text));
  if (!fresh || fresh.length === 0) return false;
  inj.touch(x);
  let parents = inj.parentsOf(x);
  if (changeCategory) {
    const p = inj.bystander(category, [x]);
    parents = p >= 0 ? [inj.concepts[p].id] : [];
    if (p >= 0) inj.reserve(p);
  }
  inj.set(x, { id: old.id, category, status: 'active', terms: asConceptTerms(fresh.map((t) => inj.newTerm(t, 'synonym'))) });
  if (parents.length) inj.parents.set(old.id, parents);
  else inj.parents.delete(old.id);
  let successor: string | null = null;
  if (relocate) {
    const owner = inj.nextNewIndex();
    inj.transferKeys(old.terms, owner);
    successor = inj.mintConceptId();
    inj.addConcept({ id: successor, category: old.category, status: 'active', terms: asConceptTerms(old.terms) }, inj.parentsOf(x));
  }
  const note = `${changeCategory ? `category ${old.category} → ${category}` : 'same category'}${relocate ? '; old meaning moved to a new identifier' : ''}`;
  // id_reuse `to`: the identifier, then the concepts that now carry its old meaning (classify/types.ts).
  inj.record('id_reuse', note, [old.id], successor ? [successor] : [], [{ kind: 'id_reuse', from: [old.id], to: successor ? [old.id, successor] : [old.id] }]);
  inj.outcome(old.id, { kind: 'id_reuse', role: 'changed', successor, termTo: inj.termMap(x, () => successor) });
  return true;
};

const categoryChange: Apply = (inj, c) => {
  const old = inj.concepts[c];
  const others = inj.categories.filter((k) => k !== old.category);
  if (others.length === 0) return false;
  const category = inj.rng.pick(others);
  inj.touch(c);
  inj.set(c, { ...old, category });
  inj.record('category_change', `${old.category} → ${category}`, [old.id], [], [{ kind: 'category_change', from: [old.id], to: [old.id] }]);
  inj.outcome(old.id, { kind: 'category_change', role: 'changed', successor: null, termTo: inj.termMap(c, () => old.id) });
  return true;
};

const hierarchyChange: Apply = (inj, c) => {
  if (!inj.isLeaf(c)) return false;
  const old = inj.concepts[c];
  const before = inj.parentsOf(c);
  if (before.length === 0) return false;
  const beforeIdx = before.map((p) => inj.indexOf(p));
  const style = before.length >= 2 && inj.rng.chance(0.25) ? 'remove' : inj.rng.chance(0.35) ? 'add' : 'replace';
  let after: string[];
  if (style === 'remove') after = before.slice(0, -1);
  else {
    const q = inj.bystander(old.category, [c, ...beforeIdx]);
    if (q < 0) return false;
    inj.reserve(q);
    const qid = inj.concepts[q].id;
    after = style === 'add' ? [...before, qid] : [...before.slice(0, -1), qid];
  }
  inj.touch(c);
  inj.parents.set(old.id, after);
  inj.record('hierarchy_change', `${style} a parent`, [old.id], [], [{ kind: 'hierarchy_change', from: [old.id], to: [old.id] }]);
  inj.outcome(old.id, { kind: 'hierarchy_change', role: 'changed', successor: null, termTo: inj.termMap(c, () => old.id) });
  return true;
};

/** Term counts of an added concept: 1 + (0..4 synonyms). */
const ADDITION_SYNONYMS = [0.1, 0.2, 0.3, 0.25, 0.15];

const addition: Apply = (inj, c) => {
  const category = inj.concepts[c].category;
  const owner = inj.nextNewIndex();
  const terms = inj.freshConcept(category, owner, 1 + inj.rng.weighted(ADDITION_SYNONYMS));
  if (!terms || terms.length === 0) return false;
  const parents: string[] = [];
  const p1 = inj.bystander(category);
  if (p1 >= 0) {
    parents.push(inj.concepts[p1].id);
    inj.reserve(p1);
    if (inj.rng.chance(0.25)) {
      const p2 = inj.bystander(category, [p1]);
      if (p2 >= 0) {
        parents.push(inj.concepts[p2].id);
        inj.reserve(p2);
      }
    }
  }
  const id = inj.mintConceptId();
  inj.addConcept({ id, category, status: 'active', terms: asConceptTerms(terms.map((t) => inj.newTerm(t, 'synonym'))) }, parents);
  inj.record('addition', `${terms.length} terms`, [], [id], [{ kind: 'addition', from: [], to: [id] }]);
  return true;
};

function cosmeticEdit(inj: Injector, c: number): boolean {
  const old = inj.concepts[c];
  const k = inj.rng.int(old.terms.length);
  const texts = new Set(old.terms.map((t) => t.text));
  const edits = cosmeticEdits(old.terms[k].text).filter((e) => !texts.has(e));
  if (edits.length === 0) return false;
  const edited = inj.rng.pick(edits);
  inj.touch(c);
  inj.set(c, { ...old, terms: old.terms.map((t, i) => (i === k ? { ...t, text: edited } : t)) });
  inj.cosmetic.push(old.id);
  inj.outcome(old.id, { kind: 'cosmetic', role: 'changed', successor: null, termTo: inj.termMap(c, () => old.id) });
  return true;
}

const APPLY: Record<ChangeKind, Apply> = {
  addition,
  retirement,
  replacement,
  merge,
  split,
  moved_synonym: movedSynonym,
  preferred_term_change: preferredTermChange,
  synonym_added: synonymAdded,
  synonym_removed: synonymRemoved,
  id_reuse: idReuse,
  category_change: categoryChange,
  hierarchy_change: hierarchyChange,
  reorganization,
};

/** How many changes of each kind to make for `active` concepts. */
export function planCounts(active: number, options: Pick<InjectOptions, 'rate' | 'mix'>): Record<ChangeKind, number> {
  const mix = { ...DEFAULT_MIX, ...options.mix };
  const total = Math.round((options.rate ?? 0.04) * active);
  const sum = CHANGE_KINDS.reduce((a, k) => a + Math.max(0, mix[k]), 0);
  const out = {} as Record<ChangeKind, number>;
  for (const k of CHANGE_KINDS) {
    const w = Math.max(0, mix[k]);
    out[k] = w === 0 || total === 0 || sum === 0 ? 0 : Math.max(1, Math.round((total * w) / sum));
  }
  return out;
}

export function injectChanges(base: BaseRelease, options: InjectOptions): InjectResult {
  const inj = new Injector(base, options);
  const order: number[] = [];
  for (let c = 0; c < inj.n; c++) if (inj.isActive(c)) order.push(c);
  inj.rng.shuffle(order);
  const planned = planCounts(order.length, options);
  const injected = Object.fromEntries(CHANGE_KINDS.map((k) => [k, 0])) as Record<ChangeKind, number>;

  for (const kind of PICK_ORDER) {
    const apply = APPLY[kind];
    // Each kind scans the shuffled order from its own random point: scanning from the start
    // would hand a later kind what earlier kinds refused (non-leaves, short concepts).
    const start = order.length ? inj.rng.int(order.length) : 0;
    for (let i = 0; i < order.length && injected[kind] < planned[kind]; i++) {
      const c = order[(start + i) % order.length];
      // Additions draw the category from a concept but do not touch it.
      if (kind === 'addition' ? !inj.isActive(c) : !inj.free(c)) continue;
      if (apply(inj, c)) injected[kind]++;
    }
  }
  const cosmeticTarget = Math.round((options.cosmeticRate ?? 0.01) * order.length);
  const cosmeticStart = order.length ? inj.rng.int(order.length) : 0;
  for (let i = 0, made = 0; i < order.length && made < cosmeticTarget; i++) {
    const c = order[(cosmeticStart + i) % order.length];
    if (inj.free(c) && cosmeticEdit(inj, c)) made++;
  }

  const concepts: BaseConcept[] = [];
  const changed = new Uint8Array(inj.n);
  for (const c of inj.replaced.keys()) changed[c] = 1;
  for (let c = 0; c < inj.n; c++) {
    if (changed[c] === 0) concepts.push(base.concepts[c]);
    else {
      const r = inj.replaced.get(c);
      if (r) concepts.push(r);
    }
  }
  concepts.push(...inj.appended);
  const kindRank = new Map(CHANGE_KINDS.map((k, i) => [k, i]));
  const truth = inj.changes.flatMap((c) => c.truth).sort((a, b) => kindRank.get(a.kind)! - kindRank.get(b.kind)! || cmp(a.from.join('|'), b.from.join('|')) || cmp(a.to.join('|'), b.to.join('|')));
  return {
    newRelease: { concepts, parents: inj.parents },
    newHierarchy: inj.parents,
    history: inj.history,
    truth,
    changes: inj.changes,
    outcomes: inj.outcomes,
    cosmetic: inj.cosmetic,
    oldIndexOf: inj.indexOf,
    createdIds: new Set(inj.appended.map((c) => c.id)),
    planned,
    injected,
  };
}
