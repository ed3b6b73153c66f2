/**
 * Re-scoring with its lexical work on a worker thread (rescore/lexicalThread.ts) gives the same
 * results as re-scoring on one thread: every mapping, every score and suggestion, to the float.
 * Compiled modules, as in tests/rescore/indexThread.test.ts (the worker is a compiled script).
 */
import { describe, expect, it } from 'vitest';
import { generateDataset } from '../../src/gen/dataset.js';
import { writeDataset } from '../../src/gen/writeDataset.js';
import { tempDir } from '../helpers/files.js';

const dist = '../../dist/';
const { loadDiffInputs, diffReleases } = (await import(`${dist}pipeline.js`)) as typeof import('../../src/pipeline.js');
const { loadMappings } = (await import(`${dist}load/index.js`)) as typeof import('../../src/load/index.js');
const { rescoreMappings } = (await import(`${dist}rescore/rescoreMappings.js`)) as typeof import('../../src/rescore/rescoreMappings.js');
const { startLexicalThread, threadStats, lexicalBatch } = (await import(`${dist}rescore/lexicalThread.js`)) as typeof import('../../src/rescore/lexicalThread.js');
const { DocumentFrequencies } = (await import(`${dist}text/tfidf.js`)) as typeof import('../../src/text/tfidf.js');
const { LEXICAL_COUNT, lexicalOfTerms, termEntry, textForms } = (await import(`${dist}rescore/features.js`)) as typeof import('../../src/rescore/features.js');

describe('lexical features on a worker thread', () => {
  it('re-scoring a generated set gives the same results with and without the worker', async () => {
    const dir = tempDir();
    const { paths } = await writeDataset(dir, generateDataset({ concepts: 3000, seed: 4 }));
    const inputs = await loadDiffInputs({
      old: paths.old, new: paths.new, oldHierarchy: paths.oldHierarchy, newHierarchy: paths.newHierarchy, history: paths.history,
    });
    const set = await loadMappings(paths.mappings);
    const run = (thread: boolean) => {
      const { report, context } = diffReleases(inputs);
      return rescoreMappings(context, report.changes, set, { training: { seed: 2 }, thread });
    };
    const here = run(false);
    const batches = threadStats.batches;
    const there = run(true);
    expect(threadStats.batches).toBeGreaterThan(batches); // the worker answered, not the fallback
    expect(there.mappings).toHaveLength(set.mappings.length);
    expect(there.scorer).toEqual(here.scorer);
    expect(there.mappings).toEqual(here.mappings);
    // The set is not trivial: it holds mappings of every kind of outcome the generator makes.
    expect(new Set(here.mappings.map((m) => m.verdict)).size).toBeGreaterThanOrEqual(5);
  }, 120_000);

  it('a batch answered by the worker holds the features and forms computed here', async () => {
    const texts = ['Chronic kidney disease', 'Kidney disease, chronic', 'Renal failure', 'Acute renal failure', 'Haemoglobin measurement', 'Hb level'];
    const df = new DocumentFrequencies();
    for (const t of texts) df.add(textForms(t).lexical.split(' '));
    const copy = DocumentFrequencies.fromParts(df.toParts());
    const probe = ['renal', 'failur', 'chronic', 'absent'];
    expect([copy.count, copy.vocabularySize, ...probe.map((t) => copy.idf(t))]).toEqual([df.count, df.vocabularySize, ...probe.map((t) => df.idf(t))]);
    expect(df.frequency('renal')).toBe(2); // the round trip is not of an empty table
    const labels = ['chronic kidney dis', 'Hb', 'Renal failures, acute'];
    const termStart = Int32Array.from([0, 2, 4, 6]);
    const expected = labels.map((l, i) => {
      const label = textForms(l);
      const out = new Float64Array(LEXICAL_COUNT);
      const entries = [];
      for (let k = termStart[i]; k < termStart[i + 1]; k++) entries.push(termEntry(k, texts[k]));
      lexicalOfTerms(label, entries, df, out, 0);
      return { features: [...out], forms: [label.nfc, label.folded, label.lexical] };
    });
    const thread = startLexicalThread(df, 1, true)!;
    expect(thread).toBeDefined();
    const k = thread.post({ labels, termStart: termStart.slice(), terms: texts });
    // Wait until the worker has answered, so that take() reads its answer (not one computed here).
    while (thread.answered() === 0) await new Promise((r) => setTimeout(r, 10));
    const batches = threadStats.batches;
    const result = thread.take(k)!;
    expect(threadStats.batches).toBe(batches + 1);
    thread.close();
    expect(result).toBeDefined();
    expect(labels.map((_, i) => ({
      features: [...result.features.subarray(i * LEXICAL_COUNT, (i + 1) * LEXICAL_COUNT)],
      forms: result.forms.slice(3 * i, 3 * i + 3),
    }))).toEqual(expected);
  });

  it('batches the worker has not started are computed here, from the last, each once, with the same answers', async () => {
    const words = ['renal', 'hepatic', 'chronic', 'acute', 'failure', 'cyst', 'injury', 'left', 'right', 'lobe'];
    const text = (i: number, k: number) => `${words[i % 10]} ${words[(i * 7 + k) % 10]} ${words[(i * 3 + 2 * k) % 10]} ${i % 13}`;
    const df = new DocumentFrequencies();
    for (let i = 0; i < 500; i++) df.add(textForms(text(i, 0)).lexical.split(' '));
    const batches = Array.from({ length: 8 }, (_, b) => {
      const labels = Array.from({ length: 400 }, (_, i) => text(b * 400 + i, 5).replace('a', ''));
      const termStart = Int32Array.from({ length: 401 }, (_, i) => 3 * i);
      const terms = Array.from({ length: 1200 }, (_, k) => text(b * 400 + Math.floor(k / 3), k % 3));
      return { labels, termStart, terms };
    });
    const expected = batches.map((b) => lexicalBatch(b, df));
    const thread = startLexicalThread(df, 1, true)!;
    const before = { ...threadStats };
    const ks = batches.map((b) => thread.post({ ...b, termStart: b.termStart.slice() }));
    // Taken in order at once: the worker has hardly started, so this thread computes from the end.
    const got = ks.map((k) => thread.take(k)!);
    expect(got.map((r) => ({ features: [...r.features], forms: r.forms }))).toEqual(expected.map((r) => ({ features: [...r.features], forms: r.forms })));
    // Once the worker has answered all of them, its answers to the batches taken here are
    // `skipped`: reading them gives nothing more, and each batch was computed once.
    while (thread.answered() < batches.length) await new Promise((r) => setTimeout(r, 10));
    for (const k of ks) expect(thread.take(k)).toBeUndefined();
    thread.close();
    expect(threadStats.batches - before.batches + threadStats.takenHere - before.takenHere).toBe(batches.length);
    expect(threadStats.takenHere).toBeGreaterThan(before.takenHere);
  });

  it('few jobs stay on this thread unless asked', () => {
    const df = new DocumentFrequencies();
    df.add(['a', 'b']);
    expect(startLexicalThread(df, 10)).toBeUndefined();
    expect(startLexicalThread(df, 0, true)).toBeUndefined();
    expect(startLexicalThread(df, 50_000, false)).toBeUndefined();
  });
});
