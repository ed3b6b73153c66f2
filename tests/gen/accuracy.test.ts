/**
 * The accuracy test of change detection: generate the default mix at 20,000 concepts, run
 * termdrift's diff on the written files (with both hierarchies and the history table), match
 * the reported changes to the injected truth by (kind, from, to), and require precision and
 * recall of at least 0.98 for every kind. On failure the per-kind table of true positives,
 * false positives and false negatives is printed, with the first misses of each kind.
 *
 * The same on a real release: the IANA Language Subtag Registry (npm language-subtag-registry
 * 0.4.2, File-Date 2025-08-25, installed as lsr-2025) read by termdrift's importer, with the
 * changes injected through the generic term source.
 */
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { CHANGE_KINDS, type ChangeKind } from '../../src/classify/types.js';
import { runDiff } from '../../src/pipeline.js';
import { loadLanguageSubtagRegistry, languageSubtagsToRelease } from '../../src/importers/languageSubtags.js';
import { baseReleaseFromRows } from '../../src/gen/genericTerms.js';
import { injectChanges } from '../../src/gen/inject.js';
import { writeDataset } from '../../src/gen/writeDataset.js';
import { dataset, tempDir, written } from './fixture.js';

const key = (c: { kind: string; from: string[]; to: string[] }) => `${c.kind} ${c.from.join('+')} > ${c.to.join('+')}`;

interface Score { tp: number; fp: number; fn: number; precision: number; recall: number; misses: string[] }

function score(truth: { kind: ChangeKind; from: string[]; to: string[]; note?: string }[], found: { kind: ChangeKind; from: string[]; to: string[] }[]): Record<ChangeKind, Score> {
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

function render(table: Record<ChangeKind, Score>): string {
  const rows = CHANGE_KINDS.map((k) => {
    const s = table[k];
    return `${k.padEnd(22)} ${String(s.tp).padStart(4)} ${String(s.fp).padStart(4)} ${String(s.fn).padStart(4)}  ${s.precision.toFixed(3)}  ${s.recall.toFixed(3)}`;
  });
  const misses = CHANGE_KINDS.flatMap((k) => table[k].misses.slice(0, 5));
  return ['kind                     TP   FP   FN  prec.  recall', ...rows, '', ...misses].join('\n');
}

describe('detection accuracy on the generated ground truth (20,000 concepts, default mix)', () => {
  it('finds every injected change kind with precision and recall ≥ 0.98', async () => {
    const d = dataset(1);
    const { paths } = await written(1);
    const { report } = await runDiff({ old: paths.old, new: paths.new, oldHierarchy: paths.oldHierarchy, newHierarchy: paths.newHierarchy, history: paths.history });
    // Every row of every input was read and used.
    expect(report.rejected_rows).toEqual([]);
    expect(report.warnings).toEqual([]);
    const table = score(d.truth, report.changes);
    const failing = CHANGE_KINDS.filter((k) => table[k].precision < 0.98 || table[k].recall < 0.98 || table[k].tp === 0);
    if (failing.length) console.log(render(table));
    expect(failing).toEqual([]);
    // Cosmetic edits (case, punctuation) are reported as nothing at all.
    const touched = new Set(report.changes.flatMap((c) => [...c.from, ...c.to]));
    expect(d.injected.cosmetic.filter((id) => touched.has(id))).toEqual([]);
  }, 180_000);

  it('finds the changes injected into the IANA Language Subtag Registry with the same precision and recall', async () => {
    const parsed = await loadLanguageSubtagRegistry(join(process.cwd(), 'node_modules', 'lsr-2025'));
    const rows = languageSubtagsToRelease(parsed);
    const base = baseReleaseFromRows(rows.release, rows.hierarchy);
    const inj = injectChanges(base, { seed: 3 });
    const dir = tempDir();
    const { paths } = await writeDataset(dir, { old: base, new: inj.newRelease, history: inj.history, truth: inj.truth, mappings: [], mappingTruth: [] });
    const { report } = await runDiff({ old: paths.old, new: paths.new, oldHierarchy: paths.oldHierarchy, newHierarchy: paths.newHierarchy, history: paths.history });
    expect(report.rejected_rows).toEqual([]);
    const table = score(inj.truth, report.changes);
    // The registry has few records with four or more descriptions, so some kinds get few or no injections.
    const made = CHANGE_KINDS.filter((k) => inj.injected[k] > 0);
    expect(made.length).toBeGreaterThanOrEqual(11);
    const failing = CHANGE_KINDS.filter((k) => table[k].precision < 0.98 || table[k].recall < 0.98);
    if (failing.length) console.log(render(table));
    expect(failing).toEqual([]);
  }, 120_000);

  it('scores a report against the truth as intended (the scorer itself)', () => {
    const truth = [{ kind: 'merge' as const, from: ['A', 'B'], to: ['B'] }, { kind: 'retirement' as const, from: ['C'], to: [] }];
    const found = [{ kind: 'merge' as const, from: ['A', 'B'], to: ['B'] }, { kind: 'retirement' as const, from: ['D'], to: [] }];
    const t = score(truth, found);
    expect([t.merge.tp, t.merge.fp, t.merge.fn]).toEqual([1, 0, 0]);
    expect([t.retirement.tp, t.retirement.fp, t.retirement.fn]).toEqual([0, 1, 1]);
    expect(t.retirement.precision).toBe(0);
    expect(render(t)).toContain('FN retirement C > ');
  });
});
