/**
 * Huge input: the up-front memory estimate (src/cli/heap.ts), the decision it leads to, the
 * clear stop at the CLI when the heap is too small, and the progress reporting of the loaders
 * (at most one call per MiB, the last one at the file's size) and of the CLI (src/cli/progress.ts:
 * nothing unless standard error is a terminal and a phase has lasted a second).
 */
import { describe, expect, it } from 'vitest';
import { statSync, truncateSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { Writable } from 'node:stream';
import { gzipSync } from 'node:zlib';
import { BASE_COST, estimateFile, estimateMemory, afterInputsRead, guardMemory, HEAP_GROWING_PERCENT, HEAP_MARGIN, inputFilesOf, MEMORY_SHARE, planHeap, ROW_COST, SMALL_INPUTS, tuneCollector } from '../../src/cli/heap.js';
import { createProgress, SILENT } from '../../src/cli/progress.js';
import { loadHierarchy, loadMappings, loadRelease } from '../../src/load/index.js';
import { runCheck, runDiff } from '../../src/pipeline.js';
import { tempDir } from '../helpers/files.js';
import { expectCleanExit, runCli } from './cli.js';

const MIB = 1 << 20;

function releaseText(rows: number): string {
  const lines = ['concept_id\tterm\tterm_type\tstatus'];
  for (let k = 0; k < rows; k++) lines.push(`C${k >> 2}\tterm ${k} of concept ${k >> 2}\t${k % 4 ? 'synonym' : 'preferred'}\tactive`);
  return lines.join('\n') + '\n';
}

describe('estimateFile', () => {
  it('counts rows from the size and the bytes per line of the head, also through gzip', () => {
    const dir = tempDir('termdrift-heap-');
    const text = releaseText(200_000);
    const plain = join(dir, 'r.tsv');
    const gz = join(dir, 'r.tsv.gz');
    writeFileSync(plain, text);
    writeFileSync(gz, gzipSync(text));
    for (const path of [plain, gz]) {
      const e = estimateFile({ path, role: 'release' })!;
      expect(e.textBytes).toBe(Buffer.byteLength(text));
      // The head's lines are a little shorter than the average (the numbers grow): within 20%.
      expect(e.rows).toBeGreaterThan(200_000 * 0.8);
      expect(e.rows).toBeLessThan(200_000 * 1.2);
      expect(e.heap).toBe(e.rows * ROW_COST.release.heap);
    }
    expect(estimateFile({ path: join(dir, 'missing.tsv'), role: 'release' })).toBeUndefined();
    expect(estimateFile({ path: dir, role: 'release' })).toBeUndefined();
  });

  it('takes the files of each command from its arguments and options', () => {
    expect(inputFilesOf('check', ['a', 'b'], { mappings: 'm', history: 'h', oldHierarchy: 'oh', newHierarchy: 'nh' }).map((f) => `${f.role}:${f.path}`)).toEqual([
      'release:a', 'new_release:b', 'hierarchy:oh', 'hierarchy:nh', 'history:h', 'mapping:m',
    ]);
    expect(inputFilesOf('validate', ['x'], { kind: 'mapping' })).toEqual([{ path: 'x', role: 'mapping' }]);
    expect(inputFilesOf('demo', [], {})).toEqual([]);
  });
});

describe('planHeap', () => {
  const GIB = 1024 * MIB;
  const estimate = (heap: number, offHeap: number) => ({ files: [{ path: 'big.tsv', role: 'release' as const, bytes: offHeap, textBytes: offHeap, rows: 1, heap, offHeap }], heap, offHeap });
  const limits = { heapLimit: 4 * GIB, physical: 16 * GIB, limitGiven: false, reexeced: false };

  it('runs when the heap suffices', () => {
    expect(planHeap(estimate(1 * GIB, 2 * GIB), limits)).toEqual({ action: 'run' });
  });

  it('runs again with a larger heap when the machine has room and the user set no limit', () => {
    const plan = planHeap(estimate(5 * GIB, 2 * GIB), limits);
    expect(plan.action).toBe('reexec');
    const heapMb = (plan as { heapMb: number }).heapMb;
    expect(heapMb * MIB).toBeGreaterThanOrEqual(5 * GIB * 1.25);
    expect(heapMb * MIB + 2 * GIB).toBeLessThanOrEqual(16 * GIB * 0.9);
  });

  it('stops with input_too_large when the user set the limit, or after running again, or when the machine is too small', () => {
    for (const [e, l] of [
      [estimate(5 * GIB, 2 * GIB), { ...limits, limitGiven: true }],
      [estimate(5 * GIB, 2 * GIB), { ...limits, reexeced: true }],
      [estimate(8 * GIB, 8 * GIB), limits],
    ] as const) {
      const plan = planHeap(e, l);
      expect(plan.action).toBe('refuse');
      const err = (plan as { error: { code: string; location: { file?: string }; fix: string } }).error;
      expect(err.code).toBe('input_too_large');
      expect(err.location.file).toBe('big.tsv');
      expect(err.fix.length).toBeGreaterThan(0);
    }
  });

  it('states the figures it compares when the machine is too small: heap with its margin plus outside the heap, against 90 % of the memory', () => {
    // Heap + outside (6 + 7 = 13 GiB) is below the 16 GiB of memory, yet the run cannot be
    // planned: 6 × 1.25 + 7 = 14.5 GiB is above 90 % of 16 GiB = 14.4 GiB. The message must
    // not read as if it would fit.
    expect([HEAP_MARGIN, MEMORY_SHARE]).toEqual([1.25, 0.9]);
    const plan = planHeap(estimate(6 * GIB, 7 * GIB), limits);
    expect(plan.action).toBe('refuse');
    const message = (plan as { error: { code: string; message: string } }).error.message;
    const n = (s: string) => Number(s.replace(/,/g, ''));
    const m = /need about ([\d,]+) MiB of memory \(([\d,]+) MiB of JavaScript heap, which is the estimate of ([\d,]+) MiB plus 25 % for the garbage collector, and ([\d,]+) MiB outside the heap\), more than the ([\d,]+) MiB a run may use here \(90 % of the ([\d,]+) MiB of memory\)/.exec(message);
    expect(m, message).not.toBeNull();
    const [need, heapWithMargin, heapEstimate, outside, usable, total] = m!.slice(1).map(n);
    expect(heapEstimate).toBe(6 * 1024);
    expect(heapWithMargin).toBe(6 * 1024 * 1.25);
    expect(outside).toBe(7 * 1024);
    expect(need).toBe(heapWithMargin + outside);
    expect(total).toBe(16 * 1024);
    expect(usable).toBe(Math.floor(16 * 1024 * 0.9));
    // The figures as printed say what the check found: the need is above what a run may use.
    expect(need).toBeGreaterThan(usable);
    expect(heapEstimate + outside).toBeLessThan(total);
  });

  it('rounds a need up and the memory there is down, so a need just above the limit never prints as equal to it', () => {
    // 90 % of 10,000.5 MiB is 9,000.45 MiB; the need is 9,000.5 MiB, just above it.
    const physical = 10_000.5 * MIB;
    const plan = planHeap(estimate(0, 9_000.5 * MIB), { ...limits, physical });
    expect(plan.action).toBe('refuse');
    const message = (plan as { error: { message: string } }).error.message;
    expect(message).toContain('need about 9,001 MiB of memory');
    expect(message).toContain('more than the 9,000 MiB a run may use here (90 % of the 10,000 MiB of memory)');
  });

  it('adds the base cost to the inputs', () => {
    expect(estimateMemory([]).heap).toBe(BASE_COST.heap);
  });
});

describe('tuneCollector', () => {
  it('sets V8\'s heap growing factor once the inputs are read, only after guardMemory let a big run go ahead, and once per process', () => {
    const flags: string[] = [];
    const set = (f: string) => void flags.push(f);
    expect(afterInputsRead(set)).toBe(false); // no run on big inputs yet
    expect(flags).toEqual([]);
    // A history table of SMALL_INPUTS + 1 MiB: 200-byte lines at its head, the rest sparse.
    const path = join(tempDir(), 'big-history.tsv');
    const line = `old_id\tnew_id\trelation\t${'x'.repeat(200 - 24)}\n`;
    writeFileSync(path, line.repeat(Math.ceil(2 * 65536 / line.length)));
    truncateSync(path, SMALL_INPUTS + MIB);
    guardMemory([{ path, role: 'history' }], {}); // about 350,000 rows: runs here
    expect(afterInputsRead(set)).toBe(true);
    expect(afterInputsRead(set)).toBe(false);
    expect(tuneCollector(set)).toBe(false);
    expect(flags).toEqual([`--heap-growing-percent=${HEAP_GROWING_PERCENT}`]);
    expect(HEAP_GROWING_PERCENT).toBeGreaterThan(0);
  });
});

describe('onLoaded (where the CLI tunes the collector)', () => {
  it('is called once by runDiff and runCheck, after every input is read', async () => {
    const files = {
      old: 'demo-data/release-r1.tsv',
      new: 'demo-data/release-r2.tsv',
      oldHierarchy: 'demo-data/hierarchy-r1.tsv',
      newHierarchy: 'demo-data/hierarchy-r2.tsv',
      history: 'demo-data/history-r2.tsv',
    };
    for (const run of [() => runDiff({ ...files, onProgress, onLoaded }), () => runCheck({ ...files, mappings: 'demo-data/mappings.tsv', onProgress, onLoaded })]) {
      events.length = 0;
      await run();
      expect(events.filter((e) => e === 'loaded')).toHaveLength(1);
      expect(events[events.length - 1]).toBe('loaded');
      expect(new Set(events.slice(0, -1)).size).toBeGreaterThanOrEqual(5); // every input reported reading first
    }
  });
  const events: string[] = [];
  const onProgress = (path: string) => void events.push(path);
  const onLoaded = () => void events.push('loaded');
});

describe('the CLI with a heap too small for its inputs', () => {
  it('stops before reading, with exit 2 and the estimate, not an out-of-memory abort', () => {
    const dir = tempDir('termdrift-heap-');
    // 1.2 million rows, 63,400,043 bytes (60.5 MiB), given twice: 121 MiB of input in all, above
    // SMALL_INPUTS (64 MiB), the size from which the estimate is made.
    const path = join(dir, 'big.tsv');
    writeFileSync(path, releaseText(1_200_000));
    expect(statSync(path).size).toBe(63_400_043);
    expect(2 * statSync(path).size).toBeGreaterThan(SMALL_INPUTS);
    const r = runCli(['diff', path, path], { env: { NODE_OPTIONS: '--max-old-space-size=64' } });
    expectCleanExit(r, 2);
    expect(r.stderr).toMatch(/^termdrift: .*big\.tsv: the inputs need about [\d,]+ MiB of JavaScript heap/);
    expect(r.stderr).toContain('--max-old-space-size');
    expect(r.stdout).toBe('');
  });
});

describe('progress', () => {
  it('loaders report the bytes read at most once per MiB, the last time at the size of the file', async () => {
    const dir = tempDir('termdrift-progress-');
    const text = releaseText(150_000);
    const size = Buffer.byteLength(text);
    expect(size).toBeGreaterThan(5 * MIB);
    for (const [name, load] of [
      ['r.tsv', (p: string, on: (r: number, s: number) => void) => loadRelease(p, { onProgress: on })],
      ['r.csv', (p: string, on: (r: number, s: number) => void) => loadRelease(p, { onProgress: on })],
      ['r2.tsv', (p: string, on: (r: number, s: number) => void) => loadRelease(p, { onProgress: on, reader: 'strings' })],
    ] as const) {
      const path = join(dir, name);
      writeFileSync(path, name.endsWith('.csv') ? text.replace(/\t/g, ',') : text);
      const calls: [number, number][] = [];
      await load(path, (r, s) => calls.push([r, s]));
      expect(calls.length).toBeLessThanOrEqual(Math.ceil(size / MIB) + 1);
      expect(calls.length).toBeGreaterThanOrEqual(2);
      expect(calls[calls.length - 1]).toEqual([size, size]);
      for (let k = 1; k < calls.length; k++) expect(calls[k][0]).toBeGreaterThan(calls[k - 1][0]);
    }
    const h = join(dir, 'h.tsv');
    const hText = 'concept_id\tparent_id\nA\tB\n';
    writeFileSync(h, hText);
    const hc: number[] = [];
    await loadHierarchy(h, { onProgress: (r) => hc.push(r) });
    expect(hc).toEqual([Buffer.byteLength(hText)]);
    const m = join(dir, 'm.csv');
    const mText = 'local_code,target_id\nL1,C1\n';
    writeFileSync(m, mText);
    const mc: number[] = [];
    await loadMappings(m, { onProgress: (r) => mc.push(r) });
    expect(mc).toEqual([Buffer.byteLength(mText)]);
  });

  class Terminal extends Writable {
    isTTY = true;
    columns = 100;
    text = '';
    _write(chunk: Buffer, _enc: string, done: () => void) {
      this.text += chunk.toString();
      done();
    }
    cursorTo() { return true; }
    clearLine() { return true; }
    moveCursor() { return true; }
  }

  it('draws nothing for a phase shorter than a second, then a bar of MiB read, and clears it', () => {
    let clock = 0;
    const stream = new Terminal();
    const p = createProgress({ stream: stream as unknown as NodeJS.WriteStream, now: () => clock });
    p.file('a.tsv', 2 * MIB, 10 * MIB);
    clock = 999;
    p.file('a.tsv', 4 * MIB, 10 * MIB);
    expect(stream.text).toBe('');
    clock = 1001;
    p.file('a.tsv', 6 * MIB, 10 * MIB);
    expect(stream.text).toContain('reading inputs');
    expect(stream.text).toContain('6/10 MiB');
    p.stop();
  });

  it('is silent when standard error is not a terminal', () => {
    const stream = new Terminal();
    stream.isTTY = false;
    expect(createProgress({ stream: stream as unknown as NodeJS.WriteStream })).toBe(SILENT);
  });
});
