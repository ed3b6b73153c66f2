/**
 * Types of the ground-truth generator: a release as plain rows (the form the injector works
 * on, whatever produced it: the synthetic vocabulary or an importer), the injected changes
 * with the truth a correct detector should report, and the mapping truth.
 *
 * Truth uses exactly the conventions of classify/types.ts: merge from = every merged concept
 * (the survivor too when it existed before), to = [survivor]; split from = [old], to = the
 * parts; retirement to = []; moved_synonym from/to = the two concepts; addition from = [];
 * every per-concept kind from = to = [the concept]. Ids inside from/to are sorted.
 */
import type { ChangeKind } from '../classify/types.js';
import type { Verdict } from '../rescore/types.js';
import type { Rng } from './random.js';

export type TermType = 'preferred' | 'synonym';

/** One term row of a concept. `termId` is '' when the release has no term identifiers. */
export interface BaseTerm {
  text: string;
  type: TermType;
  termId: string;
}

export interface BaseConcept {
  id: string;
  /** '' when the release gives no category. */
  category: string;
  status: 'active' | 'inactive';
  /** Preferred term first. */
  terms: BaseTerm[];
}

/**
 * A release as rows. Concept objects are treated as immutable: the injector shares the
 * unchanged ones between the old and the new release and builds new objects for the rest.
 */
export interface BaseRelease {
  concepts: BaseConcept[];
  /** child id → parent ids (the subsumption hierarchy). */
  parents: ReadonlyMap<string, readonly string[]>;
}

/**
 * A hierarchy that can also list its edges as indices into its release's concepts (the
 * vocabulary's ParentTable can), which spares the injector a million id lookups.
 */
export interface IndexedParents {
  forEachParentIndex(fn: (child: number, parent: number) => void): void;
}

/** One change a correct detector reports, in the conventions of classify/types.ts. */
export interface TruthChange {
  kind: ChangeKind;
  from: string[];
  to: string[];
  /** How the change was made (style, history), for debugging. */
  note?: string;
}

/** A history row (the same shape the importers write). */
export interface GenHistoryRow {
  old_id: string;
  new_id: string;
  relation: 'replaced_by' | 'same_as' | 'consider';
}

/**
 * Where fresh terms come from. The injector asks for candidates and keeps those whose
 * lexical key is free (see KeyOwnership), so a source may propose clashing strings.
 */
export interface TermSource {
  /** Candidate terms for a brand-new concept of `category`, preferred first (at least one). */
  newConcept(category: string, rng: Rng): string[];
  /**
   * Candidate new names of base concept `index` that mean the same thing (word order,
   * "of" phrases, abbreviations, adjective forms). May be empty.
   */
  variants(index: number, concept: BaseConcept, rng: Rng): string[];
}

/** What happened to an old concept, for building mapping truth. */
export interface ConceptOutcome {
  /** The injected change that touched it ('cosmetic' for a case or punctuation edit only). */
  kind: ChangeKind | 'cosmetic';
  /**
   * changed: the concept the change is about; absorbed: merged away into `successor`;
   * survivor: the concept a merge went into (keeps its id and meaning); source/receiver: the
   * two ends of a moved synonym.
   */
  role: 'changed' | 'absorbed' | 'survivor' | 'source' | 'receiver';
  /** The concept that carries the old meaning now (merge, replacement, relocated reuse), or null. */
  successor: string | null;
  /** Old term text → the active new concept that holds it, or null (gone, or left on an inactive concept). */
  termTo: Map<string, string | null>;
}

/** One injected change, as made. */
export interface InjectedChange {
  kind: ChangeKind;
  /** Style of the change, e.g. "absent; history replaced_by". */
  note: string;
  /** Old concepts touched. */
  olds: string[];
  /** New concepts created. */
  created: string[];
  /** The truth records this change produces (one per change today; a list so a change may produce several). */
  truth: TruthChange[];
}

/** One row of mappings.tsv. */
export interface GenMapping {
  local_code: string;
  local_label: string;
  target_id: string;
  relation: 'exact';
  usage: number;
  owner: string;
}

/** One row of truth-mappings.tsv. `successor` is '' when there is none. */
export interface MappingTruth {
  local_code: string;
  verdict: Verdict;
  successor: string;
}
