/**
 * Reproducibility: the same inputs give the same report, byte for byte, in every form (JSON,
 * Markdown, CSV, HTML, text): run twice, and run on copies of the demo inputs whose rows are
 * shuffled (both releases, both hierarchies, the history table, and the mapping set, plain and
 * SSSOM).
 *
 * What "the same" means (docs/RELIABILITY.md, "Reproducibility"): run twice on the same files,
 * byte-identical. On shuffled rows, byte-identical once two things that describe the files, not
 * the findings, are set aside: the SHA-256 of each input (the bytes differ) and the source line
 * of a row ("line 18 of the mappings", `"line": 18`), which says where the row is in its file.
 * The inputs are given by the same relative paths, so paths do not differ. Every change, verdict,
 * score, suggestion, order and count must be the same.
 */
import { describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { readFileSync, writeFileSync, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { tempDir } from '../helpers/files.js';
import { DEMO, expectCleanExit, runCli } from './cli.js';
import { seeded, shuffleRows } from './tables.js';

const FILES = ['release-r1.tsv', 'release-r2.tsv', 'hierarchy-r1.tsv', 'hierarchy-r2.tsv', 'history-r2.tsv', 'mappings.tsv', 'mappings.sssom.tsv'];
const FORMATS = ['json', 'md', 'csv', 'html', 'text'] as const;

function checkArgs(mappings: string, format: string): string[] {
  return ['check', 'release-r1.tsv', 'release-r2.tsv', '--old-hierarchy', 'hierarchy-r1.tsv', '--new-hierarchy', 'hierarchy-r2.tsv', '--history', 'history-r2.tsv', '--mappings', mappings, '--no-state', '--no-color', '--format', format];
}

/** A folder holding the demo inputs, each table's rows shuffled with `seed` (0: as shipped). */
function demoCopy(seed: number): string {
  const dir = join(tempDir('termdrift-repro-'), 'inputs');
  mkdirSync(dir);
  const rnd = seeded(seed);
  for (const f of FILES) {
    const text = readFileSync(join(DEMO, f), 'utf8');
    writeFileSync(join(dir, f), seed === 0 ? text : shuffleRows(text, rnd));
  }
  return dir;
}

/** Set aside what describes the files rather than the findings: input hashes and row lines. */
function normalise(report: string, dir: string): string {
  let out = report;
  for (const f of FILES) {
    const sha = createHash('sha256').update(readFileSync(join(dir, f))).digest('hex');
    out = out.split(sha).join(`<sha256 of ${f}>`);
  }
  return out.replace(/("line": )\d+/g, '$1#').replace(/\bline \d+/g, 'line #');
}

describe('the same report twice', () => {
  it.each(FORMATS)('demo --format %s is byte-identical across two runs', (format) => {
    const a = runCli(['demo', '--format', format, '--no-color']);
    const b = runCli(['demo', '--format', format, '--no-color']);
    expectCleanExit(a, 0);
    expect(b.stdout).toBe(a.stdout);
    expect(a.stdout.length).toBeGreaterThan(1000);
  });
});

describe('the same report whatever the order of the rows', () => {
  const original = demoCopy(0);
  const shuffled = [demoCopy(11), demoCopy(2026)];

  it('the shuffled copies really are in another order', () => {
    for (const dir of shuffled) {
      for (const f of FILES) expect(readFileSync(join(dir, f), 'utf8'), f).not.toBe(readFileSync(join(original, f), 'utf8'));
    }
  });

  for (const mappings of ['mappings.tsv', 'mappings.sssom.tsv']) {
    it.each(FORMATS)(`check --mappings ${mappings} --format %s: identical but for input hashes and row lines`, (format) => {
      const expected = runCli(checkArgs(mappings, format), { cwd: original });
      expectCleanExit(expected, 0);
      const want = normalise(expected.stdout, original);
      for (const dir of shuffled) {
        const r = runCli(checkArgs(mappings, format), { cwd: dir });
        expectCleanExit(r, 0);
        expect(normalise(r.stdout, dir)).toBe(want);
      }
    });
  }
});
