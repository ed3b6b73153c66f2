/**
 * The pipeline: load → align → classify (diff) → rescore → rank (check).
 * Each stage is a function of typed data; this file only chains them and gathers the inputs'
 * accounting for the report.
 */
import { loadHierarchy, loadHistory, loadMappings, loadRelease } from './load/index.js';
import type { MappingSet } from './load/types.js';
import { canonicalHierarchy, canonicalHistory } from './load/canonicalOrder.js';
import { loadHierarchyInThread, loadReleaseInThread } from './load/releaseThread.js';
import { rescoreMappings, type RescoreOptions } from './rescore/rescoreMappings.js';
import { rankByImpact, groupByChange } from './rank/rankByImpact.js';
import { VERDICTS, type Verdict } from './rescore/types.js';
import { countReaching, type FailLevel } from './rank/failOn.js';
import type { ColumnRenames } from './load/columns.js';
import type { Diagnostic, Hierarchy, HistoryTable, Loaded, Release } from './load/types.js';
import { buildContext, type DiffContext } from './classify/context.js';
import { classifyChanges } from './classify/classifyChanges.js';
import { CHANGE_KINDS, type ChangeKind } from './classify/types.js';
import type { Thresholds } from './classify/thresholds.js';
import type { CheckReport, DiffReport, InputInfo } from './report/types.js';
import { CAUTION } from './report/caution.js';
import { NAME, VERSION } from './version.js';
import { StateStore, runFromReport, type DecisionRecord } from './state/stateStore.js';
import { settleMappings } from './state/settle.js';
import { buildHistory, reportHistory } from './state/history.js';

export interface DiffOptions {
  old: string;
  new: string;
  oldHierarchy?: string;
  newHierarchy?: string;
  history?: string;
  oldLabel?: string;
  newLabel?: string;
  columns?: ColumnRenames;
  thresholds?: Partial<Thresholds>;
  /** ISO time written into the report; omitted when not given (reports stay reproducible). */
  now?: string;
  /** Told the bytes read of each input file as it loads (the CLI's progress bar). */
  onProgress?: (path: string, bytesRead: number, fileSize: number) => void;
  /** Called once every input is read, before the diff (the CLI tunes the collector there: cli/heap.ts, afterInputsRead). */
  onLoaded?: () => void;
}

export interface DiffInputs {
  old: Release;
  new: Release;
  oldHierarchy?: Hierarchy;
  newHierarchy?: Hierarchy;
  history?: HistoryTable;
}

/** Load every input of a diff; the two releases are read concurrently. */
export async function loadDiffInputs(o: DiffOptions): Promise<DiffInputs> {
  const onProgress = (path: string) => (o.onProgress ? (read: number, size: number) => o.onProgress!(path, read, size) : undefined);
  const [oldR, newR, oh, nh, hist] = await Promise.all([
    loadRelease(o.old, { label: o.oldLabel, columns: o.columns, order: 'canonical', onProgress: onProgress(o.old) }),
    // The new release in a worker thread when it is large (load/releaseThread.ts): two cores read
    // the two files. That worker then builds the new release's nearest-concept index, which the
    // diff needs late (successors of retired concepts), while the old release is still being read
    // and the terms are aligned (rescore/indexThread.ts).
    loadReleaseInThread(o.new, { label: o.newLabel, columns: o.columns, order: 'canonical', onProgress: onProgress(o.new) }, undefined, true),
    // Canonical order (load/canonicalOrder.ts): the report does not depend on the row order.
    o.oldHierarchy ? loadHierarchyInThread(o.oldHierarchy, { onProgress: onProgress(o.oldHierarchy) }).then(canonicalHierarchy) : undefined,
    o.newHierarchy ? loadHierarchy(o.newHierarchy, { onProgress: onProgress(o.newHierarchy) }).then(canonicalHierarchy) : undefined,
    o.history ? loadHistory(o.history, { onProgress: onProgress(o.history) }).then(canonicalHistory) : undefined,
  ]);
  return { old: oldR, new: newR, oldHierarchy: oh, newHierarchy: nh, history: hist };
}

export function inputInfos(inputs: DiffInputs): InputInfo[] {
  const list: [InputInfo['role'], Loaded | undefined][] = [
    ['old', inputs.old], ['new', inputs.new], ['old_hierarchy', inputs.oldHierarchy], ['new_hierarchy', inputs.newHierarchy], ['history', inputs.history],
  ];
  return list.filter((x): x is [InputInfo['role'], Loaded] => x[1] !== undefined).map(([role, l]) => ({ role, path: l.path, sha256: l.sha256, accounting: l.accounting }));
}

export function splitDiagnostics(loaded: (Loaded | undefined)[]): { rejected: Diagnostic[]; warnings: Diagnostic[] } {
  const all = loaded.filter((l): l is Loaded => l !== undefined).flatMap((l) => l.diagnostics);
  return { rejected: all.filter((d) => d.rejected), warnings: all.filter((d) => !d.rejected) };
}

export function summarize(changes: { kind: ChangeKind }[]): Record<ChangeKind, number> {
  const summary = Object.fromEntries(CHANGE_KINDS.map((k) => [k, 0])) as Record<ChangeKind, number>;
  for (const c of changes) summary[c.kind]++;
  return summary;
}

/** Diff already-loaded inputs: the library entry point that does no I/O. */
export function diffReleases(inputs: DiffInputs, options: { thresholds?: Partial<Thresholds>; now?: string } = {}): { report: DiffReport; context: DiffContext } {
  const context = buildContext({ ...inputs, thresholds: options.thresholds });
  const changes = classifyChanges(context);
  const { rejected, warnings } = splitDiagnostics([inputs.old, inputs.new, inputs.oldHierarchy, inputs.newHierarchy, inputs.history]);
  const info = (r: Release) => ({ label: r.label, path: r.path, sha256: r.sha256, concepts: r.conceptCount, terms: r.termCount });
  const report: DiffReport = {
    tool: { name: NAME, version: VERSION },
    caution: CAUTION,
    releases: { old: info(inputs.old), new: info(inputs.new) },
    inputs: inputInfos(inputs),
    parameters: { thresholds: context.thresholds, match_levels: context.align.levelCounts, unchanged_concepts: context.align.unchangedConcepts },
    changes,
    summary: summarize(changes),
    rejected_rows: rejected,
    warnings,
  };
  if (options.now) report.generated_at = options.now;
  return { report, context };
}

/** Load and diff. */
export async function runDiff(options: DiffOptions): Promise<{ report: DiffReport; context: DiffContext; inputs: DiffInputs }> {
  const inputs = await loadDiffInputs(options);
  options.onLoaded?.();
  const { report, context } = diffReleases(inputs, options);
  return { report, context, inputs };
}

export interface CheckOptions extends DiffOptions {
  /** The mapping set: CSV/TSV, SSSOM TSV (or FHIR ConceptMap JSON, see load/loadMappings.ts). */
  mappings: string;
  /** Exit-1 level for schedulers; recorded in the report. */
  failOn?: FailLevel;
  rescore?: RescoreOptions;
  /**
   * State folder (docs/STATE.md): decisions recorded there settle mappings, the run is recorded
   * there, and the report gets the recorded history. Nothing is read or written without it.
   */
  state?: string;
}

/** Rescore already-loaded inputs: the library entry point of `check` that does no I/O. */
export function checkReleases(inputs: DiffInputs, mappings: MappingSet, options: { thresholds?: Partial<Thresholds>; now?: string; failOn?: FailLevel; rescore?: RescoreOptions; decisions?: readonly DecisionRecord[] } = {}): { report: CheckReport; context: DiffContext } {
  const { report: diff, context } = diffReleases(inputs, options);
  const rescored = rescoreMappings(context, diff.changes, mappings, options.rescore);
  const ranked = rankByImpact(rescored.mappings);
  if (options.decisions?.length) settleMappings(ranked, options.decisions, inputs.new.sha256);
  const grouped = groupByChange(ranked, diff.changes);
  const verdictSummary = Object.fromEntries(VERDICTS.map((v) => [v, 0])) as Record<Verdict, number>;
  for (const m of ranked) verdictSummary[m.verdict]++;
  const { rejected, warnings } = splitDiagnostics([mappings]);
  const report: CheckReport = {
    ...diff,
    inputs: [...diff.inputs, { role: 'mappings', path: mappings.path, sha256: mappings.sha256, accounting: mappings.accounting }],
    rejected_rows: [...diff.rejected_rows, ...rejected],
    warnings: [...diff.warnings, ...warnings],
    mappings: ranked,
    scorer: rescored.scorer,
    verdict_summary: verdictSummary,
    changes_without_mappings: grouped.changes_without_mappings,
  };
  if (options.failOn) {
    // Settled mappings were decided by a reviewer; they do not fail a scheduled run again.
    const n = countReaching(ranked.filter((m) => !m.settled).map((m) => m.verdict), options.failOn);
    report.fail_on = { level: options.failOn, reached: n > 0, mappings: n };
  }
  if (options.now) {
    // Keep generated_at last, as in a diff report.
    delete report.generated_at;
    report.generated_at = options.now;
  }
  return { report, context };
}

/** Load, diff and re-score. */
export async function runCheck(options: CheckOptions): Promise<{ report: CheckReport; context: DiffContext; inputs: DiffInputs; mappings: MappingSet }> {
  const [inputs, mappings] = await Promise.all([loadDiffInputs(options), loadMappings(options.mappings, { onProgress: options.onProgress && ((r, s) => options.onProgress!(options.mappings, r, s)) })]);
  options.onLoaded?.();
  const store = options.state !== undefined ? StateStore.open(options.state) : undefined;
  const { report, context } = checkReleases(inputs, mappings, { ...options, decisions: store?.decisions() });
  if (store) {
    store.recordRun(runFromReport(report));
    const generatedAt = report.generated_at;
    delete report.generated_at;
    report.history = reportHistory(buildHistory(store.loadRuns()));
    if (generatedAt) report.generated_at = generatedAt;
  }
  return { report, context, inputs, mappings };
}
