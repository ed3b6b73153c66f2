/**
 * Types at the classify boundary: the structural changes found between two releases.
 *
 * A change is a discriminated union on `kind`; its `evidence` has a shape per kind.
 * `from` holds old concept ids and `to` new concept ids, with these conventions:
 * merge: from = every merged concept (survivor included), to = [survivor];
 * id_reuse: from = [the identifier], to = [the identifier, then the concepts now carrying the old meaning];
 * split: from = [old concept], to = the parts; retirement: to = [] (successors go in evidence);
 * moved_synonym: from/to = the two concepts, terms = the moved terms;
 * addition: from = []; every per-concept kind: from = to = [the concept].
 */
import type { MatchLevel } from '../text/normalize.js';

export const CHANGE_KINDS = [
  'id_reuse',
  'retirement',
  'merge',
  'split',
  'replacement',
  'reorganization',
  'moved_synonym',
  'preferred_term_change',
  'category_change',
  'hierarchy_change',
  'synonym_removed',
  'synonym_added',
  'addition',
] as const;

export type ChangeKind = (typeof CHANGE_KINDS)[number];

/** One term as it moved (or appeared, or vanished) between the releases. */
export interface TermMove {
  term: string;
  /** Old concept id, null for a term that is new. */
  from: string | null;
  /** New concept id, null for a term that is gone. */
  to: string | null;
  /** How the old and new term were identified; null when the term is only on one side. */
  match: MatchLevel | null;
  /** The new text when it differs from the old one (folded or lexical match). */
  new_term?: string;
}

/** A successor proposed for a concept whose meaning moved or ended. */
export interface Successor {
  concept_id: string;
  label: string;
  /** 0..1: share of terms carried, history weight, or lexical similarity. */
  score: number;
  reason: 'term_flow' | 'history' | 'history_consider' | 'lexical_neighbour';
}

/** A row of the history table, as evidence. */
export interface HistoryEvidence {
  old_id: string;
  new_id: string;
  relation: string;
  line: number;
  /** Whether the term flow agrees with this row. */
  agrees_with_terms: boolean | null;
}

/** Flow matrix cell: how many active terms went from an old concept to a new one. */
export interface FlowCell {
  from: string;
  to: string;
  terms: number;
  /** Share of the old concept's active terms. */
  share: number;
  /** Whether the old concept's preferred term is among them. */
  preferred: boolean;
}

export interface StructuralEvidence {
  /** 'terms': decided by term flow; 'history': by the history table alone. */
  basis: 'terms' | 'history';
  flows: FlowCell[];
  history: HistoryEvidence[];
  /** History rows whose successor differs from where the terms went. */
  history_disagrees: HistoryEvidence[];
  status: Record<string, 'active' | 'inactive' | 'absent'>;
  preferred_before: Record<string, string>;
  preferred_after: Record<string, string>;
}

export interface EvidenceByKind {
  addition: { preferred: string; terms: number; category: string | null };
  retirement: { status: 'inactive' | 'absent'; preferred: string; history: HistoryEvidence[]; suggestions: Successor[]; stray_terms: FlowCell[] };
  replacement: StructuralEvidence;
  merge: StructuralEvidence & { survivor: string; absorbed: string[] };
  split: StructuralEvidence & { kept_identifier: boolean };
  reorganization: StructuralEvidence;
  moved_synonym: { source_status: 'active' | 'inactive' | 'absent'; target_existed: boolean };
  preferred_term_change: { before: string; after: string; old_preferred_kept_as_synonym: boolean };
  synonym_added: { count: number };
  synonym_removed: { count: number };
  id_reuse: { terms_before: string[]; terms_after: string[]; similarity: number; category_before: string | null; category_after: string | null; old_terms_went_to: string[] };
  category_change: { before: string | null; after: string | null };
  hierarchy_change: { parents_before: string[]; parents_after: string[]; added: string[]; removed: string[] };
}

interface ChangeBase<K extends ChangeKind> {
  /** Deterministic id: `kind:from>to`. */
  id: string;
  kind: K;
  from: string[];
  to: string[];
  terms: TermMove[];
  /** 0..1, how sure the classification is; see docs/THRESHOLDS.md. */
  confidence: number;
  evidence: EvidenceByKind[K];
}

export type Change = { [K in ChangeKind]: ChangeBase<K> }[ChangeKind];
export type ChangeOf<K extends ChangeKind> = Extract<Change, { kind: K }>;
