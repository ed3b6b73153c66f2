/**
 * `history [--state DIR] [--code X] [--format text|json]`: the score of every mapping across the
 * recorded releases, as a sparkline per mapping, and the mappings whose score keeps falling
 * (src/state/history.ts; docs/STATE.md). Reads the state; writes nothing.
 */
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { UsageError } from '../errors.js';
import { DEFAULT_STATE_DIR, StateStore } from '../state/stateStore.js';
import { buildHistory, sparkline, SPARK_BLOCKS, type History, type MappingTrend } from '../state/history.js';
import { VERDICT_INFO } from '../render/model.js';
import { EXIT, type ExitCode } from './exitCode.js';

export interface HistoryFlags {
  state?: string;
  code?: string;
  format?: string;
}

const score = (v: number | null) => (v === null ? 'none' : v.toFixed(2));
const pad = (s: string, n: number) => (s.length >= n ? s : s + ' '.repeat(n - s.length));

function lastScore(t: MappingTrend): number | null {
  for (let i = t.scores.length - 1; i >= 0; i--) if (t.scores[i] !== null) return t.scores[i];
  return null;
}

function lastVerdict(t: MappingTrend): string {
  for (let i = t.verdicts.length - 1; i >= 0; i--) {
    const v = t.verdicts[i];
    if (v) return VERDICT_INFO[v].title;
  }
  return '';
}

export function renderHistoryText(h: History, dir: string, code?: string): string {
  const out: string[] = [];
  const labels = h.releases.map((r) => r.label);
  out.push(`Score history in ${dir}: ${h.runs.length} run${h.runs.length === 1 ? '' : 's'}, ${labels.length} releases (${labels.join(', ')})`);
  out.push(`  A score is the probability that the local label names the target, on the scale ${SPARK_BLOCKS[0]} 0 … ${SPARK_BLOCKS[7]} 1; · no score (target absent, or not checked then).`);
  out.push('');
  out.push('Runs');
  for (const r of h.runs) out.push(`  ${String(r.id).padStart(3)}  ${r.old} → ${r.new}: ${r.mappings} mappings, ${r.needing_action} needing action, ${r.settled} settled by earlier decisions`);
  out.push('');
  const p = h.parameters;
  out.push(`Falling release after release (${p.min_drops} or more drops in a row of at least ${p.min_step} each, ${p.min_total_drop} or more in all): ${h.declining.length}`);
  if (!h.declining.length) out.push('  (none)');
  const w = Math.max(8, ...h.mappings.map((m) => m.local_code.length));
  const tw = Math.max(9, ...h.mappings.map((m) => m.target_id.length));
  for (const t of h.declining) {
    const d = t.decline!;
    out.push(`  ${pad(t.local_code, w)}  → ${pad(t.target_id, tw)}  ${sparkline(t.scores)}  ${d.from_release} to ${d.to_release}: fell ${d.total_drop.toFixed(2)} in ${d.drops} steps, largest step ${d.largest_step.toFixed(2)}${d.step_crossed_threshold ? ' (that step crossed the drift threshold)' : ' (no single step crossed the drift threshold)'}  ${t.local_label}`);
  }
  out.push('');
  const list = code === undefined ? h.mappings : h.mappings.filter((m) => m.local_code === code);
  out.push(code === undefined ? `Mappings (${list.length})` : `Mapping ${code}`);
  out.push(`  ${pad('code', w)}  ${pad('→ target', tw + 2)}  ${pad('trend', Math.max(5, labels.length))}  latest  verdict`);
  for (const t of list) {
    out.push(`  ${pad(t.local_code, w)}  → ${pad(t.target_id, tw)}  ${pad(sparkline(t.scores), Math.max(5, labels.length))}  ${pad(score(lastScore(t)), 6)}  ${lastVerdict(t)}`);
    if (code !== undefined) {
      t.scores.forEach((s, i) => {
        const v = t.verdicts[i];
        out.push(`      ${pad(labels[i], 12)} ${score(s)}${v ? `  ${VERDICT_INFO[v].title}` : ''}`);
      });
    }
  }
  return out.join('\n');
}

export async function runHistoryCommand(f: HistoryFlags, out: (s: string) => void): Promise<ExitCode> {
  const format = f.format ?? 'text';
  if (format !== 'text' && format !== 'json') throw new UsageError(`--format must be text or json; got "${format}"`);
  const dir = f.state ?? DEFAULT_STATE_DIR;
  if (!existsSync(join(dir, 'index.json'))) {
    throw new UsageError(`no runs are recorded in ${dir}`, `run termdrift check with --state ${dir} first${f.state === undefined ? ', or give --state DIR' : ''}`);
  }
  const store = StateStore.open(dir);
  const h = buildHistory(store.loadRuns());
  if (f.code !== undefined && !h.mappings.some((m) => m.local_code === f.code)) {
    throw new UsageError(`no recorded run has the local code "${f.code}"`, 'check the code (termdrift history lists them all)');
  }
  if (format === 'json') {
    const shown: History = f.code === undefined ? h : { ...h, mappings: h.mappings.filter((m) => m.local_code === f.code), declining: h.declining.filter((m) => m.local_code === f.code) };
    out(JSON.stringify(shown, null, 2));
  } else out(renderHistoryText(h, dir, f.code));
  return EXIT.ok;
}
