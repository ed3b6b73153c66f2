/**
 * The generator's command line and files: same seed → byte-identical files, gzip output,
 * files termdrift reads without a rejected row, truth tables that agree with the written
 * releases, and usage errors for bad flags.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { gunzipSync } from 'node:zlib';
import { describe, expect, it, vi } from 'vitest';
import { loadHierarchy, loadHistory, loadRelease } from '../../src/load/index.js';
import { ACTIVE } from '../../src/load/types.js';
import { DATASET_FILES } from '../../src/gen/writeDataset.js';
import { main, runGen } from '../../src/gen/cli.js';
import { tempDir } from './fixture.js';

const sha = (path: string) => createHash('sha256').update(readFileSync(path)).digest('hex');
const files = Object.values(DATASET_FILES);

async function gen(seed: string, gzip = false, concepts = 3000) {
  const out = tempDir();
  const lines = await runGen({ concepts, seed, out, mappingsEvery: 10, gzip });
  return { out, lines };
}

describe('gen', () => {
  it('writes byte-identical files for the same seed, and different ones for another seed', async () => {
    const a = await gen('17');
    const b = await gen('17');
    const c = await gen('18');
    for (const f of files) expect(sha(join(a.out, f)), f).toBe(sha(join(b.out, f)));
    expect(sha(join(a.out, 'old.tsv'))).not.toBe(sha(join(c.out, 'old.tsv')));
    expect(a.lines[0]).toMatch(/^generated 3000 concepts \(seed 17\)/);
  }, 60_000);

  it('writes gzip files that hold the same bytes as the plain ones', async () => {
    const plain = await gen('5');
    const gz = await gen('5', true);
    for (const f of files) expect(gunzipSync(readFileSync(join(gz.out, `${f}.gz`))).equals(readFileSync(join(plain.out, f))), f).toBe(true);
  }, 60_000);

  it('writes releases, hierarchies and history that load with every row used, and truth that matches them', async () => {
    const { out } = await gen('9', false, 5000);
    const [oldR, newR] = await Promise.all([loadRelease(join(out, 'old.tsv')), loadRelease(join(out, 'new.tsv'))]);
    const [oh, nh, hist] = await Promise.all([loadHierarchy(join(out, 'old-hierarchy.tsv')), loadHierarchy(join(out, 'new-hierarchy.tsv')), loadHistory(join(out, 'history.tsv'))]);
    for (const l of [oldR, newR, oh, nh, hist]) {
      expect(l.diagnostics).toEqual([]);
      expect(l.accounting.rejected).toBe(0);
      expect(l.accounting.used).toBe(l.accounting.read);
    }
    expect(oldR.conceptCount).toBe(5000);
    expect(oldR.hasColumn).toEqual({ term_type: true, status: true, category: true, term_id: true, language: true, term_status: false });
    const truth = readFileSync(join(out, 'truth-changes.tsv'), 'utf8').trim().split('\n').slice(1).map((l) => l.split('\t'));
    expect(truth.length).toBeGreaterThan(150);
    const status = (id: string) => {
      const n = newR.conceptIndex.get(id);
      return n === undefined ? 'absent' : newR.conceptStatus[n] === ACTIVE ? 'active' : 'inactive';
    };
    for (const [kind, from, to] of truth) {
      const f = from ? from.split('|') : [];
      const t = to ? to.split('|') : [];
      if (kind === 'retirement') expect(status(f[0])).not.toBe('active');
      if (kind === 'addition') {
        expect(oldR.conceptIndex.has(t[0])).toBe(false);
        expect(status(t[0])).toBe('active');
      }
      if (kind === 'replacement') expect(status(f[0])).not.toBe('active');
      for (const id of f) expect(oldR.conceptIndex.has(id)).toBe(true);
      for (const id of t) expect(status(id)).toBe('active');
    }
    const verdicts = readFileSync(join(out, 'truth-mappings.tsv'), 'utf8').trim().split('\n');
    const mappings = readFileSync(join(out, 'mappings.tsv'), 'utf8').trim().split('\n');
    expect(verdicts[0]).toBe('local_code\tverdict\tsuccessor');
    expect(mappings[0]).toBe('local_code\tlocal_label\ttarget_id\trelation\tusage\towner');
    expect(verdicts.length).toBe(mappings.length);
  }, 60_000);

  it('rejects bad flags with exit code 2', async () => {
    const err = vi.spyOn(process.stderr, 'write').mockImplementation(() => true);
    try {
      expect(await main(['node', 'gen', '--concepts', '0', '--out', tempDir()])).toBe(2);
      expect(await main(['node', 'gen', '--concepts', '12x', '--out', tempDir()])).toBe(2);
      expect(await main(['node', 'gen', '--concepts', '100'])).toBe(2);
      expect(await main(['node', 'gen', '--concepts', '100', '--out', tempDir(), '--mappings-every', '-3'])).toBe(2);
    } finally {
      err.mockRestore();
    }
  });
});
