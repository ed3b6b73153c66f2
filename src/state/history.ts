/**
 * Score history across the recorded runs: one series per mapping (local code and target), one
 * point per release, and the mappings whose score has fallen release after release.
 *
 * A point is the calibrated score of the mapping's label against its target in one release:
 * `score_new` of the latest run in which that release was the new one, or else `score_old` of the
 * latest run in which it was the old one. Releases are ordered as the runs first named them.
 * A mapping that was remapped starts a new series (its target changed).
 *
 * A series is **declining** when its last `minDrops` or more steps (up to the latest release it
 * has a point in) each fell by at least `minStep`, and together by at least `minTotalDrop`, and the
 * mapping is in the latest run that names its code. The defaults, 2 steps, 0.01 and 0.15, and why:
 * docs/STATE.md. `step_crossed_threshold` says whether some single step fell by more than the drift
 * threshold (which the check itself flags); the list is for the declines that no single step shows.
 */
import type { Verdict } from '../rescore/types.js';
import { RUN_COLUMNS, type RunRecord } from './stateStore.js';
import { DEFAULT_VERDICT_THRESHOLDS } from '../rescore/rescoreMappings.js';

export interface DeclineOptions {
  /** Consecutive drops needed. */
  minDrops: number;
  /** Smallest fall that counts as a drop. */
  minStep: number;
  /** Smallest total fall over the drops. */
  minTotalDrop: number;
  /** A single step larger than this crosses the drift threshold. */
  stepThreshold: number;
}

export const DEFAULT_DECLINE: DeclineOptions = { minDrops: 2, minStep: 0.01, minTotalDrop: 0.15, stepThreshold: DEFAULT_VERDICT_THRESHOLDS.driftDrop };

export interface HistoryRelease {
  label: string;
  sha256: string;
}

export interface HistoryRun {
  id: number;
  old: string;
  new: string;
  mappings: number;
  /** Mappings with a verdict other than ok and not settled. */
  needing_action: number;
  settled: number;
}

export interface Decline {
  from_release: string;
  to_release: string;
  drops: number;
  total_drop: number;
  largest_step: number;
  step_crossed_threshold: boolean;
}

export interface MappingTrend {
  local_code: string;
  local_label: string;
  target_id: string;
  /** One score per release of `releases` (null: no score, the target absent or the mapping not checked then). */
  scores: (number | null)[];
  /** The verdict in each release where it was the new release (null elsewhere). */
  verdicts: (Verdict | null)[];
  decline: Decline | null;
}

export interface History {
  releases: HistoryRelease[];
  runs: HistoryRun[];
  parameters: { min_drops: number; min_step: number; min_total_drop: number };
  /** Every series, by local code then target. */
  mappings: MappingTrend[];
  /** Keys (local_code → target_id) of the declining series, steepest total fall first. */
  declining: MappingTrend[];
}

/** The history part carried by a check report: the runs and the declining series only. */
export type ReportHistory = Omit<History, 'mappings'>;

const round = (x: number) => Math.round(x * 1e4) / 1e4;

export function buildHistory(runs: RunRecord[], options: Partial<DeclineOptions> = {}): History {
  const o = { ...DEFAULT_DECLINE, ...options };
  const releases: HistoryRelease[] = [];
  const releaseIndex = new Map<string, number>();
  const addRelease = (r: { label: string; sha256: string }) => {
    if (!releaseIndex.has(r.sha256)) {
      releaseIndex.set(r.sha256, releases.length);
      releases.push({ label: r.label, sha256: r.sha256 });
    }
  };
  for (const run of runs) {
    addRelease(run.releases.old);
    addRelease(run.releases.new);
  }
  const col = Object.fromEntries(RUN_COLUMNS.map((c, i) => [c, i])) as Record<(typeof RUN_COLUMNS)[number], number>;
  type Series = { code: string; label: string; target: string; scores: (number | null)[]; verdicts: (Verdict | null)[]; fromNew: boolean[]; has: boolean[] };
  const series = new Map<string, Series>();
  const historyRuns: HistoryRun[] = [];
  // The latest run naming each code, and the targets it names.
  const latestTargets = new Map<string, Set<string>>();
  runs.forEach((run, k) => {
    const oi = releaseIndex.get(run.releases.old.sha256)!;
    const ni = releaseIndex.get(run.releases.new.sha256)!;
    let needing = 0;
    let settled = 0;
    const targetsHere = new Map<string, Set<string>>();
    for (const row of run.rows) {
      const code = row[col.local_code] as string;
      const target = row[col.target_id] as string;
      const verdict = row[col.verdict] as Verdict;
      const isSettled = (row[col.settled] as string) !== '';
      if (isSettled) settled++;
      else if (verdict !== 'ok') needing++;
      const key = `${code}\u0001${target}`;
      let s = series.get(key);
      if (!s) {
        s = { code, label: '', target, scores: releases.map(() => null), verdicts: releases.map(() => null), fromNew: releases.map(() => false), has: releases.map(() => false) };
        series.set(key, s);
      }
      s.label = row[col.local_label] as string;
      if (!s.fromNew[oi]) {
        s.scores[oi] = row[col.score_old] as number | null;
        s.has[oi] = true;
      }
      s.scores[ni] = row[col.score_new] as number | null;
      s.verdicts[ni] = verdict;
      s.fromNew[ni] = true;
      s.has[ni] = true;
      const set = targetsHere.get(code) ?? new Set<string>();
      set.add(target);
      targetsHere.set(code, set);
    }
    for (const [code, set] of targetsHere) latestTargets.set(code, set);
    historyRuns.push({ id: k + 1, old: run.releases.old.label, new: run.releases.new.label, mappings: run.rows.length, needing_action: needing, settled });
  });

  const mappings: MappingTrend[] = [];
  for (const s of series.values()) {
    const trend: MappingTrend = { local_code: s.code, local_label: s.label, target_id: s.target, scores: s.scores, verdicts: s.verdicts, decline: null };
    if (latestTargets.get(s.code)?.has(s.target)) trend.decline = declineOf(s.scores, s.has, releases, o);
    mappings.push(trend);
  }
  mappings.sort((a, b) => (a.local_code < b.local_code ? -1 : a.local_code > b.local_code ? 1 : a.target_id < b.target_id ? -1 : a.target_id > b.target_id ? 1 : 0));
  const declining = mappings.filter((m) => m.decline).sort((a, b) => b.decline!.total_drop - a.decline!.total_drop || (a.local_code < b.local_code ? -1 : 1));
  return { releases, runs: historyRuns, parameters: { min_drops: o.minDrops, min_step: o.minStep, min_total_drop: o.minTotalDrop }, mappings, declining };
}

/** The trailing run of drops of a series, when it is long and deep enough. */
function declineOf(scores: (number | null)[], has: boolean[], releases: HistoryRelease[], o: DeclineOptions): Decline | null {
  const pts: { i: number; v: number | null }[] = [];
  scores.forEach((v, i) => {
    if (has[i]) pts.push({ i, v });
  });
  let k = pts.length - 1;
  if (k < 1 || pts[k].v === null) return null;
  let drops = 0;
  let largest = 0;
  while (k > 0) {
    const a = pts[k - 1].v;
    const b = pts[k].v;
    if (a === null || b === null || a - b < o.minStep) break;
    drops++;
    largest = Math.max(largest, a - b);
    k--;
  }
  if (drops < o.minDrops) return null;
  const total = (pts[k].v as number) - (pts[pts.length - 1].v as number);
  if (total < o.minTotalDrop) return null;
  return {
    from_release: releases[pts[k].i].label,
    to_release: releases[pts[pts.length - 1].i].label,
    drops,
    total_drop: round(total),
    largest_step: round(largest),
    step_crossed_threshold: largest > o.stepThreshold,
  };
}

/** The part of a history a check report carries. */
export function reportHistory(h: History): ReportHistory {
  return { releases: h.releases, runs: h.runs, parameters: h.parameters, declining: h.declining };
}

/** Eight block characters, lowest first (U+2581 … U+2588). */
export const SPARK_BLOCKS = ['▁', '▂', '▃', '▄', '▅', '▆', '▇', '█'];

/** A sparkline of scores on the fixed scale 0..1: ▁ below 0.125 … █ from 0.875; `·` where there is no score. */
export function sparkline(scores: (number | null)[]): string {
  return scores.map((v) => (v === null ? '·' : SPARK_BLOCKS[Math.min(7, Math.max(0, Math.floor(v * 8)))])).join('');
}
