/**
 * Types at the align boundary: how the terms of two releases correspond.
 *
 * Only the changed frontier is aligned term by term: a concept whose id, status, category and
 * active term list are identical in both releases is "unchanged" and needs no term matching.
 * Everything downstream (flows, classification) works on frontier concepts only.
 */
import type { MatchLevel } from '../text/normalize.js';

/** A term of the old release identified with a term of the new release. */
export interface TermLink {
  oldTerm: number;
  newTerm: number;
  level: MatchLevel;
}

export interface Alignment {
  /** Old concept index → new concept index with the same identifier, or -1. */
  sameId: Int32Array;
  /** Old concepts that changed or disappeared (indices into the old release). */
  oldFrontier: number[];
  /** New concepts that changed or appeared (indices into the new release). */
  newFrontier: number[];
  /** Term correspondences among frontier concepts. */
  links: TermLink[];
  /** Old frontier terms (active) with no counterpart: removed. */
  removedTerms: number[];
  /** New frontier terms (active) with no counterpart: added. */
  addedTerms: number[];
  /** Old term → index into links, or -1. */
  linkOfOld: Int32Array;
  /** New term → index into links, or -1. */
  linkOfNew: Int32Array;
  /** Counts of links by level (for the report's parameters section). */
  levelCounts: Record<MatchLevel, number>;
  /** Concepts present in both releases and unchanged. */
  unchangedConcepts: number;
}
