/**
 * Types shared by the importers: the rows of termdrift's input tables as an importer builds
 * them, and what an importer reports back.
 *
 * Field names are the column names of the tables termdrift reads (see `src/load/`), so a
 * writer can turn a row into a line without a mapping table:
 *  - release table: `concept_id term term_type status category term_id language`
 *  - hierarchy table: `concept_id parent_id`
 *  - history table: `old_id new_id relation`
 */
import type { Diagnostic } from '../load/types.js';

/** One term of one concept: one row of a release table. */
export interface ReleaseRow {
  /** Concept identifier as the importer spells it (e.g. `language:de`, `GO:0008150`). */
  concept_id: string;
  /** Term text as the publisher gives it (tabs and line breaks are replaced when written). */
  term: string;
  /** `preferred` for the concept's main term, `synonym` for the others. */
  term_type: 'preferred' | 'synonym';
  /** Concept status: `inactive` for deprecated, obsolete or retired concepts. */
  status: 'active' | 'inactive';
  /** Semantic category of the concept (the publisher's own grouping). */
  category: string;
  /** Stable term identifier, when the publisher has one. */
  term_id?: string;
  /** Language of the term (BCP 47), when the publisher says. */
  language?: string;
}

/** One child → parent edge: one row of a hierarchy table. */
export interface HierarchyRow {
  concept_id: string;
  parent_id: string;
}

/** One history statement published with a release: one row of a history table. */
export interface HistoryRow {
  old_id: string;
  new_id: string;
  /** `replaced_by`, `same_as` or `consider` (the words termdrift's history loader knows). */
  relation: 'replaced_by' | 'same_as' | 'consider';
}

/** The tables an importer produces. Hierarchy and history may be empty. */
export interface ReleaseTables {
  release: ReleaseRow[];
  hierarchy?: HierarchyRow[];
  history?: HistoryRow[];
}

/** What `writeReleaseTables` wrote. */
export interface WrittenTables {
  /** Absolute or caller-relative paths of the files written, in write order. */
  files: string[];
  counts: {
    releaseRows: number;
    hierarchyRows: number;
    historyRows: number;
    /** Tab, CR or LF characters replaced by a space (a CR LF pair counts once). */
    replacedControlChars: number;
    /** Fields written in RFC 4180 quotes because they begin with a double quote. */
    quotedFields: number;
  };
}

/** Diagnostics reuse the loader's shape (file, line, column, severity, code, fix). */
export type ImportDiagnostic = Diagnostic;
