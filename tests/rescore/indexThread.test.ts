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
const { ConceptIndex } = (await import(`${dist}rescore/conceptIndex.js`)) as typeof import('../../src/rescore/conceptIndex.js');
const { startConceptIndex, threadStats } = (await import(`${dist}rescore/indexThread.js`)) as typeof import('../../src/rescore/indexThread.js');
const { termTextAt } = (await import(`${dist}load/releaseBytes.js`)) as typeof import('../../src/load/releaseBytes.js');

describe('startConceptIndex', () => {
  it('the index from the worker thread answers as the one built here', async () => {
    const dir = tempDir();
    const { paths } = await writeDataset(dir, generateDataset({ concepts: 1500, seed: 9 }));
    const oldR = await loadRelease(paths.old, { order: 'canonical' });
    const newR = await loadRelease(paths.new, { order: 'canonical' });
    const before = threadStats.received;
    const fromThread = startConceptIndex(newR, { thread: true })();
    expect(threadStats.received).toBe(before + 1);
    const here = new ConceptIndex(newR);
    expect(fromThread).not.toBe(here);
    // Queries: every term of every 7th old concept, as the retirement detector asks them, and
    // misspelled ones (the fuzzy expansion over the vocabulary).
    let compared = 0;
    for (let c = 0; c < oldR.conceptCount; c += 7) {
      const texts: string[] = [];
      for (let k = oldR.conceptTermStart[c]; k < oldR.conceptTermStart[c + 1]; k++) texts.push(termTextAt(oldR, oldR.conceptTerms[k]));
      const typo = texts.map((s) => s.replace(/[aeiou]/, 'x'));
      expect(fromThread.search(texts, 10)).toEqual(here.search(texts, 10));
      expect(fromThread.search(typo, 10)).toEqual(here.search(typo, 10));
      compared++;
    }
    expect(compared).toBeGreaterThan(100);
  }, 60_000);

  it('a small release is built on first need, on this thread', async () => {
    const dir = tempDir();
    const { paths } = await writeDataset(dir, generateDataset({ concepts: 200, seed: 3 }));
    const r = await loadRelease(paths.new, { order: 'canonical' });
    const before = threadStats.received;
    const get = startConceptIndex(r);
    expect(get()).toBe(get());
    expect(threadStats.received).toBe(before);
    expect(get().search([termTextAt(r, 0)], 1)[0].score).toBe(1);
  });
});
