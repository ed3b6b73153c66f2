/**
 * The thresholds that decide change kinds. Every number is explained in docs/THRESHOLDS.md;
 * they are reported in the JSON output (`parameters`) so a reviewer sees what was used.
 */
export interface Thresholds {
  /** A new concept carries an old one when it receives at least this share of its active terms (or its preferred term). */
  carryShare: number;
  /** Below this lexical similarity between old and new terms, a kept identifier counts as reused. */
  reuseSimilarity: number;
  /** Lowest similarity at which a lexical neighbour is proposed as a successor. */
  neighbourMin: number;
  /** How many successors are proposed at most. */
  maxSuggestions: number;
}

export const DEFAULT_THRESHOLDS: Thresholds = {
  carryShare: 0.3,
  reuseSimilarity: 0.3,
  neighbourMin: 0.35,
  maxSuggestions: 5,
};
