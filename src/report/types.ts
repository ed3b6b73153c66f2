/**
 * The report model: one object that every renderer (text, Markdown, JSON, CSV, HTML) reads.
 * `diff` fills the release and change parts; `check` adds mappings and the scorer block.
 * Its JSON form is the contract documented in docs/report-schema.md.
 */
import type { Change, ChangeKind } from '../classify/types.js';
import type { Diagnostic, RowAccounting } from '../load/types.js';
import type { Thresholds } from '../classify/thresholds.js';
import type { MatchLevel } from '../text/normalize.js';

export interface ReleaseInfo {
  label: string;
  path: string;
  sha256: string;
  concepts: number;
  terms: number;
}

export interface InputInfo {
  role: 'old' | 'new' | 'old_hierarchy' | 'new_hierarchy' | 'history' | 'mappings' | 'decisions';
  path: string;
  sha256: string;
  accounting: RowAccounting;
}

export interface DiffReport {
  tool: { name: string; version: string };
  caution: string;
  releases: { old: ReleaseInfo; new: ReleaseInfo };
  inputs: InputInfo[];
  parameters: { thresholds: Thresholds; match_levels: Record<MatchLevel, number>; unchanged_concepts: number };
  changes: Change[];
  summary: Record<ChangeKind, number>;
  rejected_rows: Diagnostic[];
  warnings: Diagnostic[];
  /** Set only when --now is given; reports carry no clock time otherwise. */
  generated_at?: string;
}

/** `check` = the diff plus every mapping re-scored, ordered by impact. */
export interface CheckReport extends DiffReport {
  mappings: import('../rescore/types.js').MappingResult[];
  scorer: import('../rescore/types.js').ScorerInfo;
  /** Count of mappings per verdict (every verdict present, zero included). */
  verdict_summary: Record<import('../rescore/types.js').Verdict, number>;
  /** Ids of changes that touch no mapping (listed after the mappings in reports). */
  changes_without_mappings: string[];
  /** Set by `--fail-on`: the level and whether it was reached. */
  fail_on?: { level: import('../rescore/types.js').Verdict; reached: boolean; mappings: number };
  /** Only with a state folder: the recorded runs and the mappings whose score keeps falling (docs/STATE.md). */
  history?: import('../state/history.js').ReportHistory;
}

export type Report = DiffReport | CheckReport;
export const isCheckReport = (r: Report): r is CheckReport => 'mappings' in r;
