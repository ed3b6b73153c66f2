/**
 * Score history: series per mapping, the falling-release-after-release rule, sparklines, and
 * which mappings an earlier decision settles.
 */
import { describe, expect, it } from 'vitest';
import { buildHistory, sparkline, SPARK_BLOCKS } from '../../src/state/history.js';
import { settleMappings } from '../../src/state/settle.js';
import type { DecisionRecord, RunRecord, RunRow } from '../../src/state/stateStore.js';
import type { MappingResult } from '../../src/rescore/types.js';

const sha = (n: number) => String(n).padStart(64, '0');

/** Runs v1→v2, v2→v3, … with one score pair per code per run. */
function runs(series: Record<string, (number | null)[]>, targets: Record<string, string[]> = {}): RunRecord[] {
  const n = Math.max(...Object.values(series).map((s) => s.length)) - 1;
  const out: RunRecord[] = [];
  for (let k = 0; k < n; k++) {
    const rows: RunRow[] = Object.entries(series).map(([code, s]) => [code, `label ${code}`, targets[code]?.[k] ?? 'C1', 'ok', s[k], s[k + 1], 0, '']);
    out.push({
      format: 'termdrift-run',
      version: 1,
      tool: { name: 'termdrift', version: 'test' },
      releases: { old: { label: `v${k + 1}`, sha256: sha(k + 1), path: '' }, new: { label: `v${k + 2}`, sha256: sha(k + 2), path: '' } },
      inputs: [],
      columns: [],
      rows,
    });
  }
  return out;
}

describe('buildHistory', () => {
  it('orders the releases as the runs name them and gives one score per release', () => {
    const h = buildHistory(runs({ A: [0.9, 0.8, 0.7] }));
    expect(h.releases.map((r) => r.label)).toEqual(['v1', 'v2', 'v3']);
    expect(h.mappings[0].scores).toEqual([0.9, 0.8, 0.7]);
    expect(h.runs.map((r) => [r.old, r.new])).toEqual([['v1', 'v2'], ['v2', 'v3']]);
  });

  it('lists a steady fall that no single step shows, and names the steps that alone cross the threshold', () => {
    const h = buildHistory(runs({
      steady: [0.95, 0.88, 0.8, 0.74],     // three drops of 0.06–0.08: 0.21 in all
      shallow: [0.95, 0.9, 0.86, 0.83],    // three drops, 0.12 in all: not enough
      once: [0.95, 0.95, 0.95, 0.4],       // one big drop: not a steady fall
      recovered: [0.95, 0.8, 0.7, 0.75],   // fell, then rose: the trailing run of drops is broken
      two: [0.9, 0.9, 0.75, 0.6],          // the last two steps: 0.3 in all
      cliff: [0.9, 0.5, 0.2, 0.19],        // steps of 0.4 and 0.3: listed, and flagged
    }));
    const d = Object.fromEntries(h.mappings.map((m) => [m.local_code, m.decline]));
    expect(d.steady).toEqual({ from_release: 'v1', to_release: 'v4', drops: 3, total_drop: 0.21, largest_step: 0.08, step_crossed_threshold: false });
    expect(d.shallow).toBeNull();
    expect(d.once).toBeNull();
    expect(d.recovered).toBeNull();
    expect(d.two).toMatchObject({ from_release: 'v2', to_release: 'v4', drops: 2, total_drop: 0.3, step_crossed_threshold: false });
    expect(d.cliff).toMatchObject({ drops: 3, step_crossed_threshold: true });
    expect(h.declining.map((m) => m.local_code)).toEqual(['cliff', 'two', 'steady']);
  });

  it('starts a new series when the target changes, and lists no fall for a target the code left', () => {
    const h = buildHistory(runs({ A: [0.9, 0.7, 0.5, 0.9] }, { A: ['C1', 'C1', 'C2'] }));
    expect(h.mappings.map((m) => [m.target_id, m.scores])).toEqual([['C1', [0.9, 0.7, 0.5, null]], ['C2', [null, null, 0.5, 0.9]]]);
    expect(h.declining).toEqual([]);
  });

  it('counts the mappings needing action and the settled ones per run', () => {
    const r = runs({ A: [0.9, 0.9], B: [0.9, 0.2], C: [0.9, 0.1] });
    r[0].rows[1][3] = 'drifted';
    r[0].rows[2][3] = 'broken';
    r[0].rows[2][7] = 'keep';
    expect(buildHistory(r).runs[0]).toMatchObject({ mappings: 3, needing_action: 1, settled: 1 });
  });
});

describe('sparkline', () => {
  it('uses the eight Unicode block elements U+2581 to U+2588 on the fixed scale 0..1', () => {
    // Code points from the Unicode standard's Block Elements chart (U+2580–U+259F).
    expect(SPARK_BLOCKS.map((c) => c.codePointAt(0)!.toString(16))).toEqual(['2581', '2582', '2583', '2584', '2585', '2586', '2587', '2588']);
    expect(sparkline([0, 0.124, 0.125, 0.5, 0.874, 0.875, 1, null])).toBe('▁▁▂▅▇██·');
    expect(sparkline([0, 0.5, 1, null])).toBe('▁▅█·');
  });
});

describe('settleMappings', () => {
  const result = (code: string, target: string, changes: string[] = []): MappingResult => ({ local_code: code, local_label: '', target_id: target, target_label: '', relation: 'exact', usage: 1, owner: '', verdict: 'redirect', score_old: 0.9, score_new: 0.5, suggestions: [], impact: 4, change_ids: changes, reasons: [], line: 2 });
  const d = (code: string, decision: DecisionRecord['decision'], oldT: string, newT: string, release = sha(2)): DecisionRecord => ({ local_code: code, old_target: oldT, new_target: newT, decision, reviewer: 'A', note: 'n', release: 'v2', release_sha256: release, time: '', worklist_sha256: '' });

  it('settles a mapping left on the decided target, for the same release or when no change touches it since', () => {
    const ms = [
      result('A', 'C2', ['merge:x']),     // accepted C2 for v2; this check's new release is v2: settled
      result('B', 'C1', ['split:y']),     // kept C1 for v2, but in v3 a change touches C1 again: not settled
      result('C', 'C1'),                  // kept C1 for v2; nothing touches it in v3: settled
      result('D', 'C5'),                  // remapped to C4, but the set now maps it to C5: not settled
      result('E', 'C1'),                  // retired: nothing to settle
    ];
    settleMappings(ms.slice(0, 1), [d('A', 'accept', 'C1', 'C2')], sha(2));
    settleMappings(ms.slice(1), [d('B', 'keep', 'C1', 'C1'), d('C', 'keep', 'C1', 'C1'), d('D', 'remap', 'C1', 'C4'), d('E', 'retire', 'C1', '')], sha(3));
    expect(ms.map((m) => m.settled?.decision ?? null)).toEqual(['accept', null, 'keep', null, null]);
    expect(ms[0].settled).toEqual({ decision: 'accept', reviewer: 'A', note: 'n', release: 'v2', time: '' });
    expect(ms[0].verdict).toBe('redirect');
  });
});
