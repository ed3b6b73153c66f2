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
const { LEXICAL_COUNT, lexicalOfTerms, termEntry, textForms, activeTermsOf } = (await import(`${dist}rescore/features.js`)) as typeof import('../../src/rescore/features.js');
const { buildIndexParts, indexSource } = (await import(`${dist}rescore/conceptIndex.js`)) as typeof import('../../src/rescore/conceptIndex.js');
const { termTextAt } = (await import(`${dist}load/releaseBytes.js`)) as typeof import('../../src/load/releaseBytes.js');
const { loadRelease } = (await import(`${dist}load/index.js`)) as typeof import('../../src/load/index.js');

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

  it('re-scoring with the index word lists at hand (stems read there, on both threads) gives the same results', async () => {
    const { paths } = await writeDataset(tempDir(), generateDataset({ concepts: 3000, seed: 6 }));
    const inputs = await loadDiffInputs({ old: paths.old, new: paths.new, oldHierarchy: paths.oldHierarchy, newHierarchy: paths.newHierarchy, history: paths.history });
    const set = await loadMappings(paths.mappings);
    const run = (lists: boolean) => {
      const { report, context } = diffReleases(inputs);
      // A release this small is indexed on this thread, so the context has no shared lists of its own.
      expect(context.newIndexWords()).toBeUndefined();
      const parts = lists ? buildIndexParts(indexSource(context.new), undefined, true) : undefined;
      return rescoreMappings({ ...context, newIndexWords: () => parts }, report.changes, set, { training: { seed: 3 }, thread: true });
    };
    const plain = run(false);
    const before = { ...threadStats };
    const withLists = run(true);
    expect(threadStats.batches + threadStats.takenHere).toBeGreaterThan(before.batches + before.takenHere);
    expect(withLists.scorer).toEqual(plain.scorer);
    expect(withLists.mappings).toEqual(plain.mappings);
  }, 120_000);

  it('a batch with index numbers of its terms gives the answer of one without, on the worker too', async () => {
    const { paths } = await writeDataset(tempDir(), generateDataset({ concepts: 800, seed: 8 }));
    const r = await loadRelease(paths.new, { order: 'canonical' });
    const lists = buildIndexParts(indexSource(r), undefined, true);
    const df = new DocumentFrequencies();
    const labels: string[] = [];
    const terms: string[] = [];
    const termIds: number[] = [];
    const starts = [0];
    for (let c = 0; c < r.conceptCount && labels.length < 300; c++) {
      const ts = activeTermsOf(r, c);
      if (ts.length === 0 || r.conceptStatus[c] !== 0) continue;
      // A label made of another concept's words, so that the stems (TF-IDF, lexical key) decide.
      labels.push(`${termTextAt(r, ts[0]).split(' ').reverse().join(' ')} ${c % 3 === 0 ? 'left' : ''}`);
      for (const t of ts) {
        terms.push(termTextAt(r, t));
        termIds.push(t);
        df.add(textForms(termTextAt(r, t)).stems);
      }
      starts.push(terms.length);
    }
    const termStart = Int32Array.from(starts);
    const plain = lexicalBatch({ labels, termStart, terms }, df);
    const indexed = lexicalBatch({ labels, termStart, terms, termIds: Int32Array.from(termIds) }, df, lists);
    expect([...indexed.features]).toEqual([...plain.features]);
    expect(indexed.forms).toEqual(plain.forms);
    // Not all exact copies: the lexical level (stems) is what many of them match on.
    const lexicalOnly = labels.filter((_, i) => plain.features[i * LEXICAL_COUNT + 1] === 0 && plain.features[i * LEXICAL_COUNT + 2] === 1).length;
    expect(lexicalOnly).toBeGreaterThan(50);
    const thread = startLexicalThread(df, 1, true, lists)!;
    const k = thread.post({ labels, termStart: termStart.slice(), terms, termIds: Int32Array.from(termIds) });
    while (thread.answered() === 0) await new Promise((res) => setTimeout(res, 10));
    const there = thread.take(k)!;
    thread.close();
    expect([...there.features]).toEqual([...plain.features]);
  });

  it('few jobs stay on this thread unless asked', () => {
    const df = new DocumentFrequencies();
    df.add(['a', 'b']);
    expect(startLexicalThread(df, 10)).toBeUndefined();
    expect(startLexicalThread(df, 0, true)).toBeUndefined();
    expect(startLexicalThread(df, 50_000, false)).toBeUndefined();
  });
});
