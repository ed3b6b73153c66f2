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
import { key, render, score } from '../helpers/changeAccuracy.js';

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
