/**
 * Loading a release in a worker thread (load/releaseThread.ts) gives the release that loading it
 * here gives: every column, every text and id read through the byte storage, the concept index,
 * and the same diff. The worker is the compiled one, so these tests use the compiled modules
 * (npm test builds them first); a release's byte storage is private to the module that made it.
 */
import { describe, expect, it } from 'vitest';
import { generateDataset } from '../../src/gen/dataset.js';
import { writeDataset } from '../../src/gen/writeDataset.js';
import { tempDir, tsv, writeFile } from '../helpers/files.js';

const dist = '../../dist/';
const { loadRelease, loadHierarchy } = (await import(`${dist}load/index.js`)) as typeof import('../../src/load/index.js');
const { loadReleaseInThread, loadHierarchyInThread, threadStats } = (await import(`${dist}load/releaseThread.js`)) as typeof import('../../src/load/releaseThread.js');
const bytesApi = (await import(`${dist}load/releaseBytes.js`)) as typeof import('../../src/load/releaseBytes.js');
const { diffReleases } = (await import(`${dist}pipeline.js`)) as typeof import('../../src/pipeline.js');

type Release = import('../../src/load/types.js').Release;

function expectSameRelease(a: Release, b: Release) {
  const keys = Object.keys(a).sort();
  expect(Object.keys(b).sort()).toEqual(keys);
  for (const k of keys) {
    if (k === 'termText' || k === 'termId' || k === 'conceptIndex') continue;
    expect((b as unknown as Record<string, unknown>)[k], k).toEqual((a as unknown as Record<string, unknown>)[k]);
  }
  for (let t = 0; t < a.termCount; t++) {
    expect(bytesApi.termTextAt(b, t)).toBe(bytesApi.termTextAt(a, t));
    expect(bytesApi.termIdAt(b, t)).toBe(bytesApi.termIdAt(a, t));
  }
  for (let c = 0; c < a.conceptCount; c++) expect(bytesApi.conceptIndexOf(b, a.conceptIds[c])).toBe(c);
  expect(bytesApi.conceptIndexOf(b, 'no such concept')).toBe(-1);
  // The lazy properties are built from the moved storage, as from the original.
  expect(b.termText).toEqual(a.termText);
  expect(b.termId).toEqual(a.termId);
  expect([...b.conceptIndex]).toEqual([...a.conceptIndex]);
}

describe('loadReleaseInThread', () => {
  it('gives the release loadRelease gives, and the same diff', async () => {
    const dir = tempDir();
    const { paths } = await writeDataset(dir, generateDataset({ concepts: 800, seed: 5 }));
    for (const order of ['canonical', 'file'] as const) {
      for (const path of [paths.old, paths.new]) {
        const here = await loadRelease(path, { order });
        const before = threadStats.received;
        const there = await loadReleaseInThread(path, { order }, true);
        expect(threadStats.received).toBe(before + 1);
        expectSameRelease(here, there);
      }
    }
    const load = (thread: boolean) => Promise.all([paths.old, paths.new].map((p) => loadReleaseInThread(p, { order: 'canonical' }, thread)));
    const [o1, n1] = await load(false);
    const [o2, n2] = await load(true);
    expect(JSON.stringify(diffReleases({ old: o2, new: n2 }).report)).toBe(JSON.stringify(diffReleases({ old: o1, new: n1 }).report));
  }, 60_000);

  it('keeps rejected rows and warnings, and a file with an error fails as loadRelease fails', async () => {
    const dir = tempDir();
    const rows = tsv([['concept_id', 'term', 'term_type'], ['C1', 'Alpha', 'preferred'], ['C1', 'Alpha', 'synonym'], ['C2', 'Beta', 'preferred'], ['C2', 'Beta two', 'preferred'], ['', 'Gamma', 'synonym']]);
    const path = writeFile(dir, 'r.tsv', rows);
    const here = await loadRelease(path, { order: 'canonical' });
    const there = await loadReleaseInThread(path, { order: 'canonical' }, true);
    expect(there.diagnostics.length).toBeGreaterThan(0);
    expect(there.diagnostics).toEqual(here.diagnostics);
    expect(there.accounting).toEqual(here.accounting);
    const bad = writeFile(dir, 'bad.tsv', tsv([['concept', 'text'], ['C1', 'Alpha']]));
    const err = await loadRelease(bad).catch((e: Error) => e);
    const before = threadStats.received;
    const errThere = await loadReleaseInThread(bad, {}, true).catch((e: Error) => e);
    expect(threadStats.received).toBe(before); // the worker answered with an error; loaded here again
    expect(err).toBeInstanceOf(Error);
    expect(errThere).toBeInstanceOf(Error);
    expect((errThere as Error).message).toBe((err as Error).message);
    expect((errThere as Error).constructor).toBe((err as Error).constructor);
  }, 60_000);

  it('a hierarchy loaded in a worker is the one loaded here, rejected rows and their messages too', async () => {
    const dir = tempDir();
    const path = writeFile(dir, 'h.tsv', tsv([['concept_id', 'parent_id'], ['C2', 'C1'], ['C3', 'C2'], ['C3', 'C1'], ['C3', 'C2'], ['C4', ''], ['C5', 'C5'], ['C6', 'C4']]));
    const here = await loadHierarchy(path);
    const before = threadStats.received;
    const there = await loadHierarchyInThread(path, {}, true);
    expect(threadStats.received).toBe(before + 1);
    expect([...there.parents]).toEqual([...here.parents]);
    // In id order, children and parents (the loader's graph is in canonical order).
    expect([...here.parents]).toEqual([['C2', ['C1']], ['C3', ['C1', 'C2']], ['C6', ['C4']]]);
    expect(there.edgeCount).toBe(here.edgeCount);
    expect(there.accounting).toEqual(here.accounting);
    expect(there.diagnostics).toEqual(here.diagnostics);
    // The duplicate names the line of the first C3 → C2 edge (line 3; the header is line 1).
    expect(here.diagnostics.find((d) => d.code === 'duplicate_row')?.message).toMatch(/^duplicate of line 3:/);
  });
});
