/**
 * Types at the load boundary: what the readers hand to the rest of the pipeline.
 *
 * A release is held in a compact columnar form (typed arrays indexed by concept and by term,
 * interned small vocabularies) rather than one object per row, because large terminologies
 * carry millions of term rows. Every input row is accounted for: `RowAccounting.read` equals
 * `used + rejected`, and every rejected row has a `Diagnostic`.
 */
import type { HierarchyGraph } from './hierarchyGraph.js';

/** Stable codes for row-level problems. */
export const ROW_PROBLEMS = [
  'field_count',
  'unbalanced_quote',
  'empty_required',
  'invalid_utf8',
  'nul_byte',
  'duplicate_row',
  'two_preferred',
  'conflicting_status',
  'conflicting_category',
  'bad_value',
  'field_too_long',
  'unknown_prefix',
] as const;
export type RowProblem = (typeof ROW_PROBLEMS)[number];

/** One row-level problem. `line` and `column` are 1-based; column is the field's position. */
export interface Diagnostic {
  file: string;
  line: number;
  column: number;
  severity: 'error' | 'warning';
  code: RowProblem;
  /** What is wrong, with the offending value where short enough. */
  message: string;
  /** How to fix it. */
  fix: string;
  /** True when the row was rejected (not used). Warnings keep the row. */
  rejected: boolean;
}

/** Rows read = rows used + rows rejected. Blank lines are not rows and are counted apart. */
export interface RowAccounting {
  file: string;
  read: number;
  used: number;
  rejected: number;
  blankLines: number;
}

/** The kinds of input table termdrift reads. */
export type TableKind = 'release' | 'mapping' | 'hierarchy' | 'history';

/** Result shared by every loader. */
export interface Loaded {
  path: string;
  /** SHA-256 of the file's bytes as stored (compressed bytes for .gz). */
  sha256: string;
  accounting: RowAccounting;
  diagnostics: Diagnostic[];
}

/** Concept status: 0 active, 1 inactive (also retired, deprecated, obsolete). */
export const ACTIVE = 0;
export const INACTIVE = 1;

/** Term types: 0 preferred, 1 synonym; other values are interned after these. */
export const PREFERRED = 0;
export const SYNONYM = 1;

/**
 * A release of a terminology in columnar form.
 * Concepts and terms are numbered 0..n-1 in first-seen order; terms of a concept are
 * found through `conceptTermStart`/`conceptTerms` (compressed sparse rows).
 */
export interface Release extends Loaded {
  /** Short label for reports (file name without extension unless given). */
  label: string;
  conceptCount: number;
  conceptIds: string[];
  conceptIndex: Map<string, number>;
  /** ACTIVE or INACTIVE per concept. */
  conceptStatus: Uint8Array;
  /** Index into `categories`, or -1 when the release gives none. */
  conceptCategory: Int32Array;
  /** Line of the first row of each concept (for messages). */
  conceptLine: Int32Array;
  categories: string[];

  termCount: number;
  /** Concept index per term. */
  termConcept: Int32Array;
  /** Term text per term, as given. */
  termText: string[];
  /** Index into `termTypes` per term (PREFERRED, SYNONYM, others). */
  termType: Uint8Array;
  termTypes: string[];
  /** Stable term identifier per term, '' when absent. */
  termId: string[];
  /** Index into `languages` per term, -1 when absent. */
  termLanguage: Int32Array;
  languages: string[];
  /** ACTIVE or INACTIVE per term (term_status column; ACTIVE when absent). */
  termStatus: Uint8Array;
  /** Source line per term. */
  termLine: Int32Array;

  /** conceptTerms[conceptTermStart[c] .. conceptTermStart[c+1]) are the terms of concept c. */
  conceptTermStart: Int32Array;
  conceptTerms: Int32Array;
  /** Which optional columns the file had. */
  hasColumn: { term_type: boolean; status: boolean; category: boolean; term_id: boolean; language: boolean; term_status: boolean };
}

/** One mapping of a local code to a concept of the terminology. */
export interface Mapping {
  localCode: string;
  localLabel: string;
  targetId: string;
  /** exact | broad | narrow | related */
  relation: MappingRelation;
  usage: number;
  owner: string;
  line: number;
  /** Columns the input had beyond the known ones, kept for writing back. */
  extra: Record<string, string>;
}

export type MappingRelation = 'exact' | 'broad' | 'narrow' | 'related';

export type MappingFormat = 'csv' | 'tsv' | 'sssom' | 'fhir';

export interface MappingSet extends Loaded {
  format: MappingFormat;
  mappings: Mapping[];
  /** Header of the input as given (for writing back in the same format). */
  header: string[];
  /** SSSOM metadata block (parsed YAML) when the input was SSSOM. */
  metadata?: Record<string, unknown>;
  /** SSSOM curie_map (prefix → IRI). */
  curieMap?: Record<string, string>;
}

export interface HierarchyEdge {
  child: string;
  parent: string;
}

export interface Hierarchy extends Loaded {
  /** child concept id → parent concept ids */
  parents: Map<string, string[]>;
  edgeCount: number;
  /**
   * The same hierarchy as integers (load/hierarchyGraph.ts), in canonical order. The loader
   * gives it, and then builds `parents` from it only when read; `graphOf` builds it for a
   * hierarchy made as a plain Map.
   */
  graph?: HierarchyGraph;
}

export interface HistoryRow {
  oldId: string;
  newId: string;
  /** replaced_by, consider, same_as, or the value as given */
  relation: string;
  line: number;
}

export interface HistoryTable extends Loaded {
  rows: HistoryRow[];
  /** old id → rows */
  byOld: Map<string, HistoryRow[]>;
}
