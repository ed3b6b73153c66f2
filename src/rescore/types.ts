/**
 * Types at the rescore boundary: each mapping re-scored against the new release, its verdict,
 * successors and impact. The `verdict` values and the JSON field names are a contract.
 */

/** Verdicts, most severe first (the order used by --fail-on; see docs/THRESHOLDS.md). */
export const VERDICTS = ['broken', 'drifted', 'ambiguous', 'redirect', 'context_changed', 'ok', 'unknown_target'] as const;
export type Verdict = (typeof VERDICTS)[number];

export interface MappingSuggestion {
  concept_id: string;
  label: string;
  /** Calibrated probability that the local label names this concept. */
  score: number;
  /** Where the candidate came from. */
  reason: 'history' | 'history_consider' | 'term_flow' | 'lexical_neighbour' | 'current_target';
}

export interface MappingResult {
  local_code: string;
  local_label: string;
  target_id: string;
  /** Preferred term of the target in the old release ('' when unknown). */
  target_label: string;
  relation: string;
  usage: number;
  owner: string;
  verdict: Verdict;
  /** Probability that the label names the target, in the old release (null: target unknown). */
  score_old: number | null;
  /** The same against the new release (null: target absent from the new release). */
  score_new: number | null;
  /** Up to 5 candidates, best first. */
  suggestions: MappingSuggestion[];
  /** Severity weight of the verdict × usage. */
  impact: number;
  /** Changes that touch the target. */
  change_ids: string[];
  /** Plain-language reasons for the verdict, for reviewers. */
  reasons: string[];
  /** Source line of the mapping. */
  line: number;
  /**
   * Set when a reviewer's earlier decision (recorded by `apply` in the state) covers this mapping
   * and its target has not changed since: the mapping is left out of the lists of mappings needing
   * action and of --fail-on. Independent of the verdict, which is reported as computed.
   */
  settled?: Settlement;
}

/** The decision that settles a mapping (see MappingResult.settled and docs/STATE.md). */
export interface Settlement {
  decision: 'accept' | 'keep' | 'remap';
  reviewer: string;
  note: string;
  /** Label of the release the decision was made for. */
  release: string;
  /** ISO time of the decision ('' when none was recorded). */
  time: string;
}

export interface ScorerInfo {
  /** Area under the ROC curve on held-out pairs. */
  auc: number;
  /** Expected calibration error on held-out pairs (10 equal-width bins). */
  ece: number;
  pairs_trained: number;
  pairs_held_out: number;
  features: string[];
  weights: Record<string, number>;
  seed: number;
}
