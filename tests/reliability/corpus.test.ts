/**
 * The bad-input corpus: tests/reliability/corpus/EXPECTED.tsv lists every malformed file (the
 * small ones are in the folder; the big ones are generated here at run time) with its kind, the
 * exit code of `validate`, the whole-file error code or the rejected rows (code@line), the rows
 * read, and the exit code of the `diff`/`check` run that takes the file as an input.
 *
 * Each file goes through the real CLI as a child process. Every run must end with a documented
 * exit code (never 70, never a signal) and no stack trace; a whole-file error names the file and
 * gives the same message from `validate` and from `diff`/`check`; otherwise the accounting is
 * exact (read = used + rejected, every rejected row listed with its line and column) and the
 * report of `diff`/`check` carries the same accounting and the same rejected rows as `validate`.
 * Release files are also loaded in-process by the byte reader and by the string path, which must
 * agree on every value and diagnostic.
 */
import { describe, expect, it, beforeAll } from 'vitest';
import { mkdirSync, readFileSync, readdirSync, writeFileSync, existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { parse as parseCsvSync } from 'csv-parse/sync';
import { loadRelease, type Release, type Diagnostic, type RowAccounting } from '../../src/load/index.js';
import { tempDir } from '../helpers/files.js';
import { DEMO, expectCleanExit, runCli } from './cli.js';

const CORPUS = resolve('tests/reliability/corpus');

interface Entry {
  file: string;
  kind: 'release' | 'mapping' | 'hierarchy' | 'history';
  source: 'file' | 'generated' | 'absent' | 'directory';
  exit: number;
  error: string;
  read: number;
  rejected: string;
  run_exit: number;
  note: string;
}

const ENTRIES: Entry[] = (parseCsvSync(readFileSync(join(CORPUS, 'EXPECTED.tsv')), { delimiter: '\t', columns: true, quote: false }) as Record<string, string>[]).map((r) => ({
  ...(r as unknown as Entry),
  exit: Number(r.exit),
  read: Number(r.read),
  run_exit: Number(r.run_exit),
}));

const MIB = 1 << 20;

/** The big inputs, made at run time rather than committed. */
const GENERATED: Record<string, () => string | Buffer> = {
  'release-10mb-field.tsv': () => `concept_id\tterm\nC1\t${'x'.repeat(10 * MIB)}\nC2\tok\n`,
  'release-20mb-line-without-breaks.tsv': () => `concept_id\tterm\nC1\t${'y'.repeat(20 * MIB)}`,
  'release-5mb-first-line.tsv': () => 'z'.repeat(5 * MIB),
  'release-50000-terms.tsv': () => {
    const rows = ['concept_id\tterm\tterm_type'];
    for (let k = 0; k < 50_000; k++) rows.push(`C1\tterm number ${k}\t${k === 0 ? 'preferred' : 'synonym'}`);
    rows.push('C2\tsomething else\tpreferred');
    return rows.join('\n') + '\n';
  },
};

let workDir = '';
/** validate's JSON output per file, kept from the validate test for the diff/check test. */
const validated = new Map<string, string>();

function pathOf(e: Entry): string {
  switch (e.source) {
    case 'file':
      return join(CORPUS, e.file);
    case 'absent':
      return join(workDir, 'absent', e.file);
    default:
      return join(workDir, e.file);
  }
}

/** The run of diff or check that takes the file as its kind of input. */
function runArgs(e: Entry, path: string): string[] {
  const d = (f: string) => join(DEMO, f);
  switch (e.kind) {
    case 'release':
      return ['diff', path, d('release-r1.tsv'), '--format', 'json'];
    case 'mapping':
      return ['check', d('release-r1.tsv'), d('release-r2.tsv'), '--mappings', path, '--no-state', '--format', 'json'];
    case 'history':
      return ['diff', d('release-r1.tsv'), d('release-r2.tsv'), '--history', path, '--format', 'json'];
    case 'hierarchy':
      return ['diff', d('release-r1.tsv'), d('release-r2.tsv'), '--old-hierarchy', d('hierarchy-r1.tsv'), '--new-hierarchy', path, '--format', 'json'];
  }
}

const rejectedList = (diagnostics: Diagnostic[]) => diagnostics.filter((d) => d.rejected).map((d) => `${d.code}@${d.line}`).join(' ');

beforeAll(() => {
  workDir = tempDir('termdrift-corpus-');
  for (const e of ENTRIES) {
    if (e.source === 'generated') writeFileSync(join(workDir, e.file), GENERATED[e.file]());
    if (e.source === 'directory') mkdirSync(join(workDir, e.file));
  }
});

describe('the corpus table', () => {
  it('lists every file of the corpus folder, and every generated file has a generator', () => {
    const listed = ENTRIES.filter((e) => e.source === 'file').map((e) => e.file).sort();
    const present = readdirSync(CORPUS).filter((f) => f !== 'EXPECTED.tsv').sort();
    expect(listed).toEqual(present);
    expect(ENTRIES.filter((e) => e.source === 'generated').map((e) => e.file).sort()).toEqual(Object.keys(GENERATED).sort());
    for (const e of ENTRIES) expect(e.exit === 2 || e.rejected === '', e.file).toBe(true);
  });
});

describe.each(ENTRIES.map((e) => [e.file, e] as const))('%s', (_name, e) => {
  it(`validate --kind ${e.kind}: exit ${e.exit}, ${e.error ? `error ${e.error}` : `${e.read} rows read${e.rejected ? `, rejected ${e.rejected}` : ''}`}`, () => {
    const path = pathOf(e);
    const r = runCli(['validate', path, '--kind', e.kind, '--format', 'json']);
    expectCleanExit(r, e.exit);
    validated.set(path, r.stdout);
    const out = JSON.parse(r.stdout) as { error?: { code: string; location: { file?: string } }; accounting?: RowAccounting; diagnostics?: Diagnostic[] };
    if (e.error) {
      expect(out.error?.code).toBe(e.error);
      expect(out.error?.location.file).toBe(path);
      // One clear message naming the file, and the fix.
      expect(r.stderr.startsWith(`termdrift: ${path}`)).toBe(true);
      expect(r.stderr).toContain('fix: ');
      return;
    }
    const a = out.accounting!;
    const diagnostics = out.diagnostics!;
    expect(a.read).toBe(e.read);
    expect(a.read).toBe(a.used + a.rejected);
    expect(rejectedList(diagnostics)).toBe(e.rejected);
    expect(diagnostics.filter((d) => d.rejected)).toHaveLength(a.rejected);
    for (const d of diagnostics) {
      expect(d.file).toBe(path);
      expect(d.line).toBeGreaterThan(0);
      expect(d.column).toBeGreaterThan(0);
      expect(d.message.length).toBeGreaterThan(0);
      expect(d.fix.length).toBeGreaterThan(0);
    }
  });

  it(`${e.kind === 'mapping' ? 'check --mappings' : e.kind === 'release' ? 'diff' : `diff --${e.kind === 'history' ? 'history' : 'new-hierarchy'}`}: exit ${e.run_exit}, the same accounting and rejected rows as validate`, () => {
    const path = pathOf(e);
    const r = runCli(runArgs(e, path));
    expectCleanExit(r, e.run_exit);
    if (e.error) {
      // The same message as validate gives.
      const v = runCli(['validate', path, '--kind', e.kind]);
      expect(r.stderr).toBe(v.stderr);
      expect(r.stdout).toBe('');
      return;
    }
    const report = JSON.parse(r.stdout) as { inputs: { path: string; accounting: RowAccounting }[]; rejected_rows: Diagnostic[]; mappings?: { verdict: string }[] };
    const v = JSON.parse(validated.get(path) ?? runCli(['validate', path, '--kind', e.kind, '--format', 'json']).stdout) as { accounting: RowAccounting; diagnostics: Diagnostic[] };
    const input = report.inputs.find((i) => i.path === path);
    expect(input?.accounting).toEqual(v.accounting);
    expect(report.rejected_rows.filter((d) => d.file === path)).toEqual(v.diagnostics.filter((d) => d.rejected));
    if (e.file === 'mapping-unknown-targets.tsv') {
      expect(report.mappings!.map((m) => m.verdict)).toEqual(['unknown_target', 'unknown_target', 'unknown_target']);
    }
  });

  if (e.kind === 'release' && (e.source === 'file' || e.source === 'generated')) {
    it('the byte reader and the string path read it alike', async () => {
      const path = pathOf(e);
      const strings = await loadOrError(path, { reader: 'strings' });
      // Small blocks and reads cut lines and characters across block ends (the big files get
      // bigger ones, to keep the number of reads down).
      const sizes = e.source === 'file' ? [[undefined, undefined], [7, 3], [4096, 1000]] : [[undefined, undefined], [1 << 16, 4099]];
      for (const [blockSize, readSize] of sizes) {
        expect(await loadOrError(path, { reader: 'bytes', blockSize, readSize }), `block ${blockSize}, read ${readSize}`).toEqual(strings);
      }
    });
  }
});

/** A release's values and diagnostics, or the error it threw. */
async function loadOrError(path: string, options: Parameters<typeof loadRelease>[1]) {
  try {
    const r: Release = await loadRelease(path, options);
    return {
      accounting: r.accounting,
      diagnostics: r.diagnostics,
      conceptIds: r.conceptIds,
      termText: r.termText,
      termConcept: Array.from(r.termConcept),
      termType: Array.from(r.termType),
      termLine: Array.from(r.termLine),
      conceptStatus: Array.from(r.conceptStatus),
    };
  } catch (err) {
    const x = err as { code?: string; message?: string; location?: unknown };
    return { code: x.code, message: x.message, location: x.location };
  }
}

describe('deep and cyclic hierarchies', () => {
  it('a 20,000-step chain whose top points back at its bottom is walked without a stack overflow', () => {
    const dir = tempDir('termdrift-chain-');
    const n = 20_000;
    const release = ['concept_id\tterm'];
    const chain = ['concept_id\tparent_id'];
    for (let k = 0; k < n; k++) {
      release.push(`K${k}\tthing ${k}`);
      if (k > 0) chain.push(`K${k}\tK${k - 1}`);
    }
    const cyclic = [...chain, `K0\tK${n - 1}`];
    const renamed = release.map((l) => (l === 'K5\tthing 5' ? 'K5\tthing five' : l));
    const w = (name: string, lines: string[]) => {
      const p = join(dir, name);
      writeFileSync(p, lines.join('\n') + '\n');
      return p;
    };
    const mappings = w('m.tsv', ['local_code\tlocal_label\ttarget_id', 'L1\tthing 5\tK5', `L2\tthing ${n - 1}\tK${n - 1}`]);
    const r = runCli(['check', w('r1.tsv', release), w('r2.tsv', renamed), '--old-hierarchy', w('h1.tsv', chain), '--new-hierarchy', w('h2.tsv', cyclic), '--mappings', mappings, '--no-state', '--format', 'json']);
    expectCleanExit(r, 0);
    const report = JSON.parse(r.stdout) as { summary: Record<string, number>; mappings: unknown[] };
    expect(report.summary.hierarchy_change).toBeGreaterThan(0);
    expect(report.mappings).toHaveLength(2);
    expect(existsSync(dir)).toBe(true);
  });
});
