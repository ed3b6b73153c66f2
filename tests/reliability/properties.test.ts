/**
 * Properties of the diff that must hold for any input (fast-check):
 *  - a release diffed against itself shows no change (generated releases, and random small
 *    releases with arbitrary Unicode terms);
 *  - the changes do not depend on the order of the rows of any table, nor on the order of the
 *    columns;
 *  - renaming every concept identifier through a one-to-one map changes no kind: mapped back,
 *    the changes are the same;
 *  - a change injected into a random release is found: src/gen/inject.ts injects one change of
 *    a random kind into a generated release, with its truth (kind, from, to).
 * Releases come from the ground-truth generator (src/gen) with random seeds; the comparisons
 * leave out what may rightly differ (file paths, hashes, line numbers).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { generateDataset } from '../../src/gen/dataset.js';
import { writeDataset, type DatasetFile } from '../../src/gen/writeDataset.js';
import { runDiff, type DiffOptions } from '../../src/pipeline.js';
import { CHANGE_KINDS, type Change, type ChangeKind } from '../../src/classify/types.js';
import { tempDir } from '../helpers/files.js';
import { renameColumns, seeded, shuffleColumns, shuffleRows } from './tables.js';

const CONCEPTS = 400;

async function writeGenerated(seed: number, inject?: Parameters<typeof generateDataset>[0]['inject']) {
  const data = generateDataset({ concepts: CONCEPTS, seed, inject });
  const dir = tempDir('termdrift-prop-');
  const { paths } = await writeDataset(dir, data);
  return { data, dir, paths };
}

type Paths = Record<DatasetFile, string>;

function diffOptions(p: Paths): DiffOptions {
  return { old: p.old, new: p.new, oldHierarchy: p.oldHierarchy, newHierarchy: p.newHierarchy, history: p.history, oldLabel: 'old', newLabel: 'new' };
}

/** Remove what depends on where a row or a file was (lines, paths, hashes), keep everything else. */
function strip(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(strip);
  if (value && typeof value === 'object') {
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(value)) {
      if (k === 'line' || k === 'lines' || k === 'path' || k === 'sha256' || k === 'file') continue;
      out[k] = strip(v);
    }
    return out;
  }
  return value;
}

async function changesOf(o: DiffOptions): Promise<Change[]> {
  const { report } = await runDiff(o);
  expect(report.rejected_rows).toEqual([]);
  return report.changes;
}

/** Write a rewritten copy of each table of a dataset into a new folder. */
function rewrite(p: Paths, rewriteTable: (file: DatasetFile, text: string) => string): Paths {
  const dir = tempDir('termdrift-prop-');
  const out = {} as Paths;
  for (const [file, path] of Object.entries(p) as [DatasetFile, string][]) {
    out[file] = join(dir, `${file}.tsv`);
    writeFileSync(out[file], rewriteTable(file, readFileSync(path, 'utf8')));
  }
  return out;
}

const ID_COLUMNS: Partial<Record<DatasetFile, string[]>> = {
  old: ['concept_id'],
  new: ['concept_id'],
  oldHierarchy: ['concept_id', 'parent_id'],
  newHierarchy: ['concept_id', 'parent_id'],
  history: ['old_id', 'new_id'],
};

const seeds = fc.integer({ min: 1, max: 1_000_000 });

describe('a release diffed against itself', () => {
  it('shows no change (generated releases, random seeds)', async () => {
    await fc.assert(
      fc.asyncProperty(seeds, async (seed) => {
        const { paths } = await writeGenerated(seed);
        for (const side of ['old', 'new'] as const) {
          const h = side === 'old' ? paths.oldHierarchy : paths.newHierarchy;
          expect(await changesOf({ old: paths[side], new: paths[side], oldHierarchy: h, newHierarchy: h })).toEqual([]);
        }
      }),
      { numRuns: 6 },
    );
  });

  it('shows no change (random small releases with arbitrary Unicode terms)', async () => {
    // Terms of any Unicode text except the characters TSV cannot carry unquoted (tab, line
    // breaks) and a leading quote; ids from a small alphabet so concepts get several terms.
    const term = fc.string({ unit: 'grapheme', minLength: 1, maxLength: 12 }).map((s) => s.replace(/[\t\n\r\0\uFFFD]/g, ' ').replace(/^"/, "'")).filter((s) => s.trim() !== '');
    const row = fc.tuple(fc.constantFrom('A', 'B', 'C', 'Ç', 'D-1', '10'), term, fc.constantFrom('preferred', 'synonym'), fc.constantFrom('active', 'inactive'));
    await fc.assert(
      fc.asyncProperty(fc.array(row, { minLength: 1, maxLength: 30 }), async (rows) => {
        const text = ['concept_id\tterm\tterm_type\tstatus', ...rows.map((r) => r.join('\t'))].join('\n') + '\n';
        const path = join(tempDir('termdrift-prop-'), 'r.tsv');
        writeFileSync(path, text);
        const { report } = await runDiff({ old: path, new: path });
        expect(report.changes).toEqual([]);
      }),
      { numRuns: 60 },
    );
  });
});

describe('the diff does not depend on the layout of its inputs', () => {
  it('the same changes when the rows of every table are shuffled', async () => {
    await fc.assert(
      fc.asyncProperty(seeds, fc.integer(), async (seed, shuffleSeed) => {
        const { paths } = await writeGenerated(seed);
        const rnd = seeded(shuffleSeed);
        const shuffled = rewrite(paths, (_f, text) => shuffleRows(text, rnd));
        expect(strip(await changesOf(diffOptions(shuffled)))).toEqual(strip(await changesOf(diffOptions(paths))));
      }),
      { numRuns: 6 },
    );
  });

  it('the same changes when the columns of every table are in another order', async () => {
    await fc.assert(
      fc.asyncProperty(seeds, fc.integer(), async (seed, shuffleSeed) => {
        const { paths } = await writeGenerated(seed);
        const rnd = seeded(shuffleSeed);
        const permuted = rewrite(paths, (_f, text) => shuffleColumns(text, rnd));
        expect(await changesOf(diffOptions(permuted))).toEqual(await changesOf(diffOptions(paths)));
      }),
      { numRuns: 6 },
    );
  });
});

describe('renaming every identifier consistently', () => {
  it('changes no kind: mapped back, the changes are the same', async () => {
    await fc.assert(
      fc.asyncProperty(seeds, fc.integer(), async (seed, renameSeed) => {
        const { paths } = await writeGenerated(seed);
        // A one-to-one map onto identifiers of another shape (other letters, other length, a
        // multi-byte character) whose order differs from the original order.
        const rnd = seeded(renameSeed);
        const forward = new Map<string, string>();
        const back = new Map<string, string>();
        const rename = (id: string) => {
          let n = forward.get(id);
          if (n === undefined) {
            do n = `ž${Math.floor(rnd() * 1e9).toString(36)}`; while (back.has(n));
            forward.set(id, n);
            back.set(n, id);
          }
          return n;
        };
        const renamed = rewrite(paths, (f, text) => (ID_COLUMNS[f] ? renameColumns(text, ID_COLUMNS[f]!, rename) : text));
        const canon = (changes: Change[], map?: Map<string, string>) =>
          changes
            .map((c) => {
              const m = (id: string) => map?.get(id) ?? id;
              return `${c.kind} ${c.from.map(m).sort().join('+')} > ${c.to.map(m).sort().join('+')}`;
            })
            .sort();
        expect(canon(await changesOf(diffOptions(renamed)), back)).toEqual(canon(await changesOf(diffOptions(paths))));
      }),
      { numRuns: 6 },
    );
  });
});

describe('an injected change', () => {
  it('is found, whatever its kind and wherever it is injected (src/gen/inject.ts)', async () => {
    await fc.assert(
      fc.asyncProperty(seeds, fc.constantFrom(...CHANGE_KINDS), async (seed, kind: ChangeKind) => {
        // Only this kind, at a rate that injects a few changes into 400 concepts.
        const mix = Object.fromEntries(CHANGE_KINDS.map((k) => [k, k === kind ? 1 : 0]));
        const { data, paths } = await writeGenerated(seed, { mix, rate: 0.01, cosmeticRate: 0 });
        const injected = data.truth.filter((t) => t.kind === kind);
        expect(injected.length).toBeGreaterThan(0);
        const found = new Set((await changesOf(diffOptions(paths))).map((c) => `${c.kind} ${[...c.from].sort().join('+')} > ${[...c.to].sort().join('+')}`));
        for (const t of injected) expect(found, `${t.kind} ${t.note ?? ''}`).toContain(`${t.kind} ${[...t.from].sort().join('+')} > ${[...t.to].sort().join('+')}`);
      }),
      { numRuns: 26 },
    );
  });
});
