/**
 * The nearest-concept index built in a worker thread (rescore/indexThread.ts) is the index built
 * here: the same hits for the same queries. Compiled modules, as in tests/load/releaseThread.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { generateDataset } from '../../src/gen/dataset.js';
import { writeDataset } from '../../src/gen/writeDataset.js';
import { tempDir } from '../helpers/files.js';

const dist = '../../dist/';
const { loadRelease } = (await import(`${dist}load/index.js`)) as typeof import('../../src/load/index.js');
const { ConceptIndex, buildIndexParts, indexSource } = (await import(`${dist}rescore/conceptIndex.js`)) as typeof import('../../src/rescore/conceptIndex.js');
const { startConceptIndex, threadStats } = (await import(`${dist}rescore/indexThread.js`)) as typeof import('../../src/rescore/indexThread.js');
const { termTextAt } = (await import(`${dist}load/releaseBytes.js`)) as typeof import('../../src/load/releaseBytes.js');
const { loadReleaseInThread } = (await import(`${dist}load/releaseThread.js`)) as typeof import('../../src/load/releaseThread.js');
const { takeConceptIndex } = (await import(`${dist}rescore/indexThread.js`)) as typeof import('../../src/rescore/indexThread.js');

describe('startConceptIndex', () => {
  it('the index from the worker thread answers as the one built here', async () => {
    const dir = tempDir();
    const { paths } = await writeDataset(dir, generateDataset({ concepts: 1500, seed: 9 }));
    const oldR = await loadRelease(paths.old, { order: 'canonical' });
    const newR = await loadRelease(paths.new, { order: 'canonical' });
    const before = threadStats.received;
    const handle = startConceptIndex(newR, { thread: true });
    const here = new ConceptIndex(newR);
    // Queries: every term of every 7th old concept, as the retirement detector asks them, and
    // misspelled ones (the fuzzy expansion over the vocabulary); the concept itself left out.
    const queries: { texts: string[]; limit: number; skipConcept: number }[] = [];
    for (let c = 0; c < oldR.conceptCount; c += 7) {
      const texts: string[] = [];
      for (let k = oldR.conceptTermStart[c]; k < oldR.conceptTermStart[c + 1]; k++) texts.push(termTextAt(oldR, oldR.conceptTerms[k]));
      const skipConcept = newR.conceptIds.indexOf(oldR.conceptIds[c]);
      queries.push({ texts, limit: 10, skipConcept }, { texts: texts.map((s) => s.replace(/[aeiou]/, 'x')), limit: 10, skipConcept: -1 });
    }
    expect(queries.length).toBeGreaterThan(200);
    const expected = queries.map((q) => here.search(q.texts, q.limit, q.skipConcept));
    // Searched on the worker and here, each query once, in two batches (answered in order) …
    const searched = threadStats.searchedThere + threadStats.searchedHere;
    const first = handle.searchAhead(queries.slice(0, 100));
    const second = handle.searchAhead(queries.slice(100));
    expect(second()).toEqual(expected.slice(100));
    expect(first()).toEqual(expected.slice(0, 100));
    expect(threadStats.searchedThere + threadStats.searchedHere).toBe(searched + queries.length);
    // The word lists, once built: the worker's shared arrays, which the worker goes on serving from.
    const lists = handle.ready()!;
    expect(lists.termWords.buffer).toBeInstanceOf(SharedArrayBuffer);
    const plain = buildIndexParts(indexSource(newR));
    expect(lists.words).toEqual(plain.words);
    expect(Array.from(lists.termStart)).toEqual(Array.from(plain.termStart));
    expect(Array.from(lists.termWords)).toEqual(Array.from(plain.termWords));
    expect(threadStats.received).toBe(before);
    expect(handle.searchAhead(queries.slice(0, 3))()).toEqual(expected.slice(0, 3));
    // … then the index itself, the worker's shared arrays, taken here.
    const fromThread = handle.get();
    expect(threadStats.received).toBe(before + 1);
    expect(fromThread).not.toBe(here);
    expect(handle.get()).toBe(fromThread);
    expect(queries.map((q) => fromThread.search(q.texts, q.limit, q.skipConcept))).toEqual(expected);
    // Searches after that run here, outside the batches.
    expect(handle.searchAhead(queries.slice(0, 5))()).toEqual(expected.slice(0, 5));
    expect(threadStats.searchedThere + threadStats.searchedHere).toBe(searched + queries.length + 3);
  }, 60_000);

  it('a small release is built on first need, on this thread', async () => {
    const dir = tempDir();
    const { paths } = await writeDataset(dir, generateDataset({ concepts: 200, seed: 3 }));
    const r = await loadRelease(paths.new, { order: 'canonical' });
    const before = threadStats.received;
    const handle = startConceptIndex(r);
    expect(handle.get()).toBe(handle.get());
    expect(handle.ready()).toBeUndefined(); // not in shared memory: no lists for another thread
    expect(threadStats.received).toBe(before);
    expect(handle.get().search([termTextAt(r, 0)], 1)[0].score).toBe(1);
    expect(handle.searchAhead([{ texts: [termTextAt(r, 0)], limit: 1, skipConcept: -1 }])()[0][0].score).toBe(1);
  });
});

describe('an index built by the worker that loaded the release', () => {
  it('answers as the one built here, is taken once, and moves here on get()', async () => {
    const dir = tempDir();
    const { paths } = await writeDataset(dir, generateDataset({ concepts: 1500, seed: 9 }));
    // hashInThreadFrom 0: the blocks in shared memory, as for a large file.
    const newR = await loadReleaseInThread(paths.new, { order: 'canonical', hashInThreadFrom: 0 }, true, true);
    const same = await loadRelease(paths.new, { order: 'canonical' });
    expect(newR.termCount).toBe(same.termCount);
    const here = new ConceptIndex(same);
    const handle = takeConceptIndex(newR);
    expect(handle).toBeDefined();
    expect(takeConceptIndex(newR)).toBeUndefined();
    const queries: { texts: string[]; limit: number; skipConcept: number }[] = [];
    for (let c = 0; c < same.conceptCount; c += 5) {
      const texts: string[] = [];
      for (let k = same.conceptTermStart[c]; k < same.conceptTermStart[c + 1]; k++) texts.push(termTextAt(same, same.conceptTerms[k]));
      queries.push({ texts, limit: 10, skipConcept: c }, { texts: texts.map((s) => s.replace(/[aeiou]/, 'x')), limit: 10, skipConcept: -1 });
    }
    const expected = queries.map((q) => here.search(q.texts, q.limit, q.skipConcept));
    const searched = threadStats.searchedThere + threadStats.searchedHere;
    const received = threadStats.received;
    expect(handle!.searchAhead(queries)()).toEqual(expected);
    expect(threadStats.searchedThere + threadStats.searchedHere).toBe(searched + queries.length);
    const moved = handle!.get();
    expect(threadStats.received).toBe(received + 1);
    expect(queries.map((q) => moved.search(q.texts, q.limit, q.skipConcept))).toEqual(expected);
  }, 60_000);

  it('copies small unshared blocks before they are moved, and answers from them', async () => {
    const dir = tempDir();
    const { paths } = await writeDataset(dir, generateDataset({ concepts: 300, seed: 4 }));
    const r = await loadReleaseInThread(paths.new, { order: 'canonical' }, true, true);
    const same = await loadRelease(paths.new, { order: 'canonical' });
    const handle = takeConceptIndex(r);
    expect(handle).toBeDefined();
    const texts = [termTextAt(same, 0), termTextAt(same, 5)];
    expect(handle!.searchAhead([{ texts, limit: 5, skipConcept: -1 }])()).toEqual([new ConceptIndex(same).search(texts, 5, -1)]);
  }, 60_000);
});
