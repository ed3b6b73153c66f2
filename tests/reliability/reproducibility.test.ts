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
 *
 * Ties: the demo mapping set has one mapping per local code, so it cannot show how two mappings
 * of one local code with the same impact are ordered. A copy of it gets two such pairs (invented
 * rows on the demo releases): one local code mapped to two targets that both stay `ok` (impact 0
 * each), and one mapped to two targets that both drift (usage 1, impact 8 each). Its rows are
 * given in their order, reversed (so each pair is swapped) and shuffled; every form must give the
 * same bytes, once input hashes and row lines are set aside as above.
 */
import { describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { readFileSync, writeFileSync, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { tempDir } from '../helpers/files.js';
import { DEMO, expectCleanExit, runCli } from './cli.js';
import { formatTable, parseTable, seeded, shuffleRows } from './tables.js';

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

describe('mappings of one local code with equal impact are ordered by content, not by line', () => {
  // Invented rows on the demo releases (demo-data/, our own scenario). TIE-OK maps to two targets
  // whose terms still match ("FBC" to QV10169A, "Hb" to QV10188E); TIE-DRIFT maps "FBC" to two
  // targets whose meaning moved away from it, each under a change of its own; TIE-MERGE maps
  // "B12" to both concepts of one merge, so the pair is listed under one change in every form
  // (Markdown and HTML list mappings by change). Checked below: the verdicts, equal impacts.
  const TIES = [
    ['TIE-OK', 'FBC', 'QV10169A', 'exact', '1', 'Haematology'],
    ['TIE-OK', 'Hb', 'QV10188E', 'exact', '1', 'Haematology'],
    ['TIE-DRIFT', 'FBC', 'QV10188E', 'exact', '1', 'Haematology'],
    ['TIE-DRIFT', 'FBC', 'QV10040V', 'exact', '1', 'Haematology'],
    ['TIE-MERGE', 'B12', 'QV10269E', 'exact', '1', 'Haematology'],
    ['TIE-MERGE', 'B12', 'QV10251J', 'exact', '1', 'Haematology'],
  ];
  const PAIRS = [['TIE-OK', 'QV10169A', 'QV10188E'], ['TIE-DRIFT', 'QV10040V', 'QV10188E'], ['TIE-MERGE', 'QV10251J', 'QV10269E']];
  const base = parseTable(readFileSync(join(DEMO, 'mappings.tsv'), 'utf8'));
  const rows = [...base.rows, ...TIES];
  const orders: Record<string, string[][]> = {
    'as written': rows,
    reversed: [...rows].reverse(),
    'shuffled (seed 11)': shuffleRowsOf(rows, 11),
    'shuffled (seed 2026)': shuffleRowsOf(rows, 2026),
  };
  const dirs = Object.fromEntries(Object.entries(orders).map(([name, r]) => {
    const dir = demoCopy(0);
    writeFileSync(join(dir, 'mappings.tsv'), formatTable({ ...base, rows: r }));
    return [name, dir];
  }));

  function shuffleRowsOf(list: string[][], seed: number): string[][] {
    const text = formatTable({ ...base, rows: list });
    return parseTable(shuffleRows(text, seeded(seed))).rows;
  }

  it('the pairs are real ties, and the row orders really differ for them', () => {
    expect(base.header).toEqual(['local_code', 'local_label', 'target_id', 'relation', 'usage', 'owner']);
    const r = runCli(checkArgs('mappings.tsv', 'json'), { cwd: dirs['as written'] });
    expectCleanExit(r, 0);
    const mappings = (JSON.parse(r.stdout) as { mappings: { local_code: string; target_id: string; verdict: string; impact: number; change_ids: string[] }[] }).mappings;
    const of = (code: string) => mappings.filter((m) => m.local_code === code).map((m) => [m.target_id, m.verdict, m.impact]);
    // Equal impact within each pair, listed by target id.
    expect(of('TIE-OK')).toEqual([['QV10169A', 'ok', 0], ['QV10188E', 'ok', 0]]);
    expect(of('TIE-DRIFT')).toEqual([['QV10040V', 'drifted', 8], ['QV10188E', 'drifted', 8]]);
    expect(of('TIE-MERGE')).toEqual([['QV10251J', 'redirect', 4], ['QV10269E', 'redirect', 4]]);
    const merge = 'merge:QV10251J+QV10269E>QV21114K';
    expect(mappings.filter((m) => m.local_code === 'TIE-MERGE').every((m) => m.change_ids.includes(merge))).toBe(true);
    // Each pair is swapped in the reversed file, so a tie broken by line would show there.
    const position = (list: string[][], code: string, target: string) => list.findIndex((row) => row[0] === code && row[2] === target);
    for (const [code, a, b] of PAIRS) {
      expect(position(orders['as written'], code, a) < position(orders['as written'], code, b), code).not.toBe(position(orders.reversed, code, a) < position(orders.reversed, code, b));
    }
  });

  it.each(FORMATS)('check --format %s gives the same report for every row order', (format) => {
    const [first, ...others] = Object.entries(dirs);
    const expected = runCli(checkArgs('mappings.tsv', format), { cwd: first[1] });
    expectCleanExit(expected, 0);
    for (const [code] of PAIRS) if (code !== 'TIE-OK' || format === 'json') expect(expected.stdout).toContain(code);
    const want = normalise(expected.stdout, first[1]);
    for (const [name, dir] of others) {
      const r = runCli(checkArgs('mappings.tsv', format), { cwd: dir });
      expectCleanExit(r, 0);
      expect(normalise(r.stdout, dir), `${format}, rows ${name}`).toBe(want);
    }
  });
});
