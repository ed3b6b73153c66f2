/**
 * Scoring reported changes against injected ground truth by (kind, from, to): true positives,
 * false positives and false negatives per kind, and a table of them for failure messages.
 * Shared by the generator's accuracy test and the Gene Ontology perturbation benchmark.
 */
import { CHANGE_KINDS, type ChangeKind } from '../../src/classify/types.js';

export const key = (c: { kind: string; from: string[]; to: string[] }) => `${c.kind} ${c.from.join('+')} > ${c.to.join('+')}`;

export interface Score { tp: number; fp: number; fn: number; precision: number; recall: number; misses: string[] }

export function score(truth: readonly { kind: ChangeKind; from: string[]; to: string[]; note?: string }[], found: readonly { kind: ChangeKind; from: string[]; to: string[] }[]): Record<ChangeKind, Score> {
  const table = Object.fromEntries(CHANGE_KINDS.map((k) => [k, { tp: 0, fp: 0, fn: 0, precision: 1, recall: 1, misses: [] as string[] }])) as Record<ChangeKind, Score>;
  const t = new Map(truth.map((x) => [key(x), x]));
  const f = new Set(found.map(key));
  for (const c of found) {
    if (t.has(key(c))) table[c.kind].tp++;
    else {
      table[c.kind].fp++;
      table[c.kind].misses.push(`FP ${key(c)}`);
    }
  }
  for (const [k, x] of t) {
    if (f.has(k)) continue;
    table[x.kind].fn++;
    table[x.kind].misses.push(`FN ${k} [${x.note ?? ''}]`);
  }
  for (const s of Object.values(table)) {
    s.precision = s.tp + s.fp === 0 ? 1 : s.tp / (s.tp + s.fp);
    s.recall = s.tp + s.fn === 0 ? 1 : s.tp / (s.tp + s.fn);
  }
  return table;
}

export function render(table: Record<ChangeKind, Score>): string {
  const rows = CHANGE_KINDS.map((k) => {
    const s = table[k];
    return `${k.padEnd(22)} ${String(s.tp).padStart(4)} ${String(s.fp).padStart(4)} ${String(s.fn).padStart(4)}  ${s.precision.toFixed(3)}  ${s.recall.toFixed(3)}`;
  });
  const misses = CHANGE_KINDS.flatMap((k) => table[k].misses.slice(0, 5));
  return ['kind                     TP   FP   FN  prec.  recall', ...rows, '', ...misses].join('\n');
}
