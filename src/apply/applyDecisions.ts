/**
 * applyDecisions: turn a filled-in worklist into the updated mapping set and its audit rows.
 *
 * Decisions (the `decision` column, case and surrounding spaces ignored):
 * - `accept`: the mapping takes the proposed target (`proposed_target`);
 * - `keep`: the mapping stays as it is;
 * - `remap`: the mapping takes `new_target`;
 * - `retire`: the mapping is dropped from the set;
 * - empty: undecided; the mapping stays as it is and is counted.
 *
 * Every decided row is checked before anything is built, and every problem is collected: a row
 * whose mapping (local_code → target_id) is not in the set, an unknown decision word, a second
 * decision for the same mapping, an `accept` without a proposed target, a `remap` without a
 * new_target, a target that is not an active concept of the new release, a `keep` or `retire` that
 * also names a new target, two mappings of one code ending on the same target, a row made for
 * another release (its new_sha256 differs from the release given), a `decided_at` that is not a
 * time. Any problem throws one DecisionError listing them all; the caller writes nothing.
 *
 * A new target is written in the form of the old one: when the old target was a CURIE (`QCV:QV1…`)
 * found in the release by its local part, the new one gets the same prefix.
 */
import type { Mapping, MappingSet, Release } from '../load/types.js';
import { ACTIVE } from '../load/types.js';
import { conceptLabel } from '../classify/detector.js';
import { quoteValue } from '../load/ledger.js';
import type { OutputRow } from '../exchange/writeMappingSet.js';
import { DecisionError, type DecisionProblem, type DecisionProblemCode } from './decisionError.js';
import { DECISIONS, type Decision, type Worklist, type WorklistField, type WorklistRow } from './readWorklist.js';

/** One row of the audit log: one per decision applied. */
export interface AuditRow {
  local_code: string;
  local_label: string;
  old_target: string;
  /** '' for a retired mapping. */
  new_target: string;
  decision: Decision;
  reviewer: string;
  note: string;
  /** Label of the release the decision was made for. */
  release: string;
  release_sha256: string;
  /** ISO time from --now, else the row's decided_at, else ''. */
  time: string;
}

export const AUDIT_COLUMNS: readonly (keyof AuditRow)[] = ['local_code', 'local_label', 'old_target', 'new_target', 'decision', 'reviewer', 'note', 'release', 'release_sha256', 'time'];

export interface ApplyInput {
  mappings: MappingSet;
  worklist: Worklist;
  /** The new release: targets must be active concepts of it. */
  release: Release;
  /** The release label written into the audit log, the state and the output (SSSOM, FHIR). */
  releaseLabel: string;
  /** ISO time of the decisions (--now); otherwise each row's decided_at, else none. */
  now?: string;
}

export interface ApplyCounts {
  /** Worklist rows read. */
  rows: number;
  accept: number;
  keep: number;
  remap: number;
  retire: number;
  /** Rows with an empty decision. */
  undecided: number;
  /** Mappings of the set that the worklist does not name. */
  not_in_worklist: number;
  /** Mappings written. */
  written: number;
}

export interface ApplyResult {
  rows: OutputRow[];
  audit: AuditRow[];
  counts: ApplyCounts;
}

/** Find a target in the release: the id as given, else the local part of a CURIE. */
export function resolveInRelease(release: Release, id: string): { index: number; id: string; viaLocalPart: boolean } | null {
  const direct = release.conceptIndex.get(id);
  if (direct !== undefined) return { index: direct, id, viaLocalPart: false };
  const colon = id.indexOf(':');
  if (colon > 0) {
    const local = id.slice(colon + 1);
    const i = release.conceptIndex.get(local);
    if (i !== undefined) return { index: i, id: local, viaLocalPart: true };
  }
  return null;
}

/** Write `newId` (a release concept id) in the form of `oldTarget` (same CURIE prefix when the old one had one). */
function formLike(release: Release, oldTarget: string, newId: string): string {
  const colon = oldTarget.indexOf(':');
  if (colon > 0 && !release.conceptIndex.has(oldTarget)) {
    const prefix = oldTarget.slice(0, colon);
    return newId.startsWith(`${prefix}:`) ? newId : `${prefix}:${newId}`;
  }
  return newId;
}

export function applyDecisions(input: ApplyInput): ApplyResult {
  const { mappings, worklist, release } = input;
  const problems: DecisionProblem[] = [...worklist.problems];
  const col = (f: WorklistField) => Math.max(1, worklist.columns[f]);
  const problem = (row: WorklistRow, field: WorklistField, code: DecisionProblemCode, message: string, fix: string) => {
    problems.push({ file: worklist.path, line: row.line, column: col(field), code, message, fix });
  };

  const byKey = new Map<string, Mapping>();
  const byCode = new Map<string, Mapping[]>();
  for (const m of mappings.mappings) {
    byKey.set(`${m.localCode}\u0001${m.targetId}`, m);
    const list = byCode.get(m.localCode);
    if (list) list.push(m);
    else byCode.set(m.localCode, [m]);
  }

  const counts: ApplyCounts = { rows: worklist.rows.length, accept: 0, keep: 0, remap: 0, retire: 0, undecided: 0, not_in_worklist: 0, written: 0 };
  type Planned = { row: WorklistRow; mapping: Mapping; decision: Decision; newTarget: string; newIndex: number };
  const planned = new Map<Mapping, Planned>();
  const firstLine = new Map<Mapping, number>();
  const named = new Set<Mapping>();

  const checkTarget = (row: WorklistRow, field: WorklistField, id: string): { index: number; id: string } | null => {
    const r = resolveInRelease(release, id);
    if (!r) {
      problem(row, field, 'target_not_in_release', `${field} ${quoteValue(id)} is not a concept of release ${input.releaseLabel}`, 'give the id of an active concept of the new release (see other_candidates), or choose another decision');
      return null;
    }
    if (release.conceptStatus[r.index] !== ACTIVE) {
      problem(row, field, 'target_inactive', `${field} ${quoteValue(id)} is inactive in release ${input.releaseLabel}`, 'map to an active concept; an inactive one is no target');
      return null;
    }
    return r;
  };

  for (const row of worklist.rows) {
    const v = row.values;
    const word = v.decision.toLowerCase();
    const mapping = v.local_code ? byKey.get(`${v.local_code}\u0001${v.target_id}`) : undefined;
    if (mapping) named.add(mapping);
    if (word === '') {
      counts.undecided++;
      continue;
    }
    if (v.local_code === '') {
      problem(row, 'local_code', 'empty_local_code', 'the row has a decision but no local_code', 'restore the local_code of the row from the report');
      continue;
    }
    if (!(DECISIONS as readonly string[]).includes(word)) {
      problem(row, 'decision', 'unknown_decision', `unknown decision ${quoteValue(v.decision)} for ${quoteValue(v.local_code)}`, `write one of: ${DECISIONS.join(', ')} (or leave it empty for undecided)`);
      continue;
    }
    const decision = word as Decision;
    if (!mapping) {
      const others = byCode.get(v.local_code);
      problem(
        row,
        'local_code',
        'unknown_mapping',
        others
          ? `the mapping set has no mapping ${quoteValue(v.local_code)} → ${quoteValue(v.target_id)}; it maps ${quoteValue(v.local_code)} to ${others.map((m) => quoteValue(m.targetId)).join(', ')}`
          : `${quoteValue(v.local_code)} is not in the mapping set ${mappings.path}`,
        'apply the worklist to the mapping set it was made from, or run check again on this one',
      );
      continue;
    }
    const seenAt = firstLine.get(mapping);
    if (seenAt !== undefined) {
      problem(row, 'decision', 'duplicate_decision', `a second decision for ${quoteValue(v.local_code)} → ${quoteValue(v.target_id)} (the first is on line ${seenAt})`, 'keep one decision per mapping and empty the other row');
      continue;
    }
    firstLine.set(mapping, row.line);
    if (v.new_sha256 && v.new_sha256 !== release.sha256) {
      problem(row, 'new_sha256', 'release_mismatch', `the row was made for another release (new_sha256 ${v.new_sha256.slice(0, 12)}…, the release given is ${release.sha256.slice(0, 12)}…)`, 'give the release the worklist was made from (--release-file), or make a new worklist with check');
      continue;
    }
    if (v.decided_at && Number.isNaN(Date.parse(v.decided_at))) {
      problem(row, 'decided_at', 'bad_time', `decided_at ${quoteValue(v.decided_at)} is not a date or time`, 'write an ISO date or time, e.g. 2026-03-01 or 2026-03-01T14:00:00Z');
      continue;
    }
    let newTarget = mapping.targetId;
    let newIndex = -1;
    if (decision === 'accept') {
      if (!v.proposed_target) {
        problem(row, 'proposed_target', 'no_proposed_target', `accept for ${quoteValue(v.local_code)}, but the row proposes no target`, 'use remap with a new_target, keep, or retire');
        continue;
      }
      if (v.new_target && v.new_target !== v.proposed_target) {
        problem(row, 'new_target', 'contradictory_target', `accept takes the proposed target ${quoteValue(v.proposed_target)}, but new_target says ${quoteValue(v.new_target)}`, 'write remap to use new_target, or empty new_target to accept the proposal');
        continue;
      }
      const r = checkTarget(row, 'proposed_target', v.proposed_target);
      if (!r) continue;
      newTarget = formLike(release, mapping.targetId, r.id);
      newIndex = r.index;
    } else if (decision === 'remap') {
      if (!v.new_target) {
        problem(row, 'new_target', 'missing_new_target', `remap for ${quoteValue(v.local_code)} without a new_target`, 'write the new target concept id in new_target');
        continue;
      }
      const r = checkTarget(row, 'new_target', v.new_target);
      if (!r) continue;
      newTarget = formLike(release, mapping.targetId, r.id);
      newIndex = r.index;
    } else if (v.new_target) {
      problem(row, 'new_target', 'contradictory_target', `${decision} for ${quoteValue(v.local_code)}, but new_target names ${quoteValue(v.new_target)}`, 'write remap to use new_target, or empty new_target');
      continue;
    }
    planned.set(mapping, { row, mapping, decision, newTarget, newIndex });
  }

  // Two mappings of one code must not end on the same target.
  const ending = new Map<string, Planned | Mapping>();
  for (const m of mappings.mappings) {
    const p = planned.get(m);
    if (p?.decision === 'retire') continue;
    const key = `${m.localCode}\u0001${p ? p.newTarget : m.targetId}`;
    const other = ending.get(key);
    if (other !== undefined && p) {
      problem(p.row, p.decision === 'accept' ? 'proposed_target' : 'new_target', 'duplicate_result', `${quoteValue(m.localCode)} would map to ${quoteValue(p.newTarget)} twice`, 'retire one of the two mappings instead');
    } else if (other !== undefined && 'row' in other) {
      problem(other.row, other.decision === 'accept' ? 'proposed_target' : 'new_target', 'duplicate_result', `${quoteValue(m.localCode)} would map to ${quoteValue(other.newTarget)} twice`, 'retire one of the two mappings instead');
    }
    ending.set(key, p ?? m);
  }

  if (problems.length) throw new DecisionError(problems);

  const rows: OutputRow[] = [];
  const audited: { line: number; row: AuditRow }[] = [];
  for (const m of mappings.mappings) {
    if (!named.has(m)) counts.not_in_worklist++;
    const p = planned.get(m);
    if (!p) {
      rows.push({ mapping: m, targetId: m.targetId, targetLabel: '', targetChanged: false });
      continue;
    }
    counts[p.decision]++;
    const v = p.row.values;
    const time = input.now ?? (v.decided_at ? new Date(Date.parse(v.decided_at)).toISOString() : '');
    audited.push({ line: p.row.line, row: {
      local_code: m.localCode,
      local_label: m.localLabel,
      old_target: m.targetId,
      new_target: p.decision === 'retire' ? '' : p.newTarget,
      decision: p.decision,
      reviewer: v.reviewer,
      note: v.note,
      release: input.releaseLabel,
      release_sha256: release.sha256,
      time,
    } });
    if (p.decision === 'retire') continue;
    const changed = p.newTarget !== m.targetId;
    rows.push({
      mapping: m,
      targetId: p.newTarget,
      targetLabel: changed && p.newIndex >= 0 ? conceptLabel(release, p.newIndex) : '',
      targetChanged: changed,
      review: { decision: p.decision, reviewer: v.reviewer, note: v.note },
    });
  }
  counts.written = rows.length;
  // The audit log follows the worklist's order.
  const audit = audited.sort((a, b) => a.line - b.line).map((a) => a.row);
  return { rows, audit, counts };
}
