/**
 * Memory for big inputs: estimate up front what a command will need, and either run, re-run
 * itself with a larger V8 heap, or stop with a clear message (exit 2, `input_too_large`) — never
 * an out-of-memory abort half-way through.
 *
 * The estimate is rows × a measured cost per row (docs/RELIABILITY.md, "Huge input"): the rows
 * of each input are its (uncompressed) size divided by the bytes per line of its first 64 KiB.
 * Costs are per kind of input and split into the V8 heap (strings, objects: bounded by
 * --max-old-space-size) and memory outside it (the file's bytes and the typed arrays of a
 * release: bounded by the machine). Node's default heap limit is often well below the machine's
 * memory, so when the heap is what is short and the machine has room, the CLI runs itself again
 * with `--max-old-space-size` set to what the inputs need (unless the limit was given by the
 * user, or TERMDRIFT_MEMORY_CHECK=off turns the check off).
 */
import { spawnSync } from 'node:child_process';
import { closeSync, openSync, readSync, statSync } from 'node:fs';
import { totalmem } from 'node:os';
import { getHeapStatistics, setFlagsFromString } from 'node:v8';
import { constants as zlibConstants, gunzipSync } from 'node:zlib';
import { InputError } from '../errors.js';

export type InputRole = 'release' | 'new_release' | 'mapping' | 'hierarchy' | 'history';

export interface InputFile {
  path: string;
  role: InputRole;
}

/**
 * Bytes per row, from peak heap used and peak memory outside the heap (external + array buffers,
 * sampled every 20 ms) of `diff` and `check` on generated releases of 4 and 16 million rows each
 * (docs/RELIABILITY.md, "16-million-row run"), rounded up by about half. Measured: a release row
 * about 80 bytes of heap and 157 outside it beyond the file's own bytes, a hierarchy row about
 * 120 bytes of heap, a mapping about 12 KB of heap in `check` (its scoring caches, the result and
 * its share of the report). `new_release` is the new release of `check`; it measured as a release.
 */
export const ROW_COST: Record<InputRole, { heap: number; offHeap: number }> = {
  release: { heap: 120, offHeap: 240 },
  new_release: { heap: 120, offHeap: 240 },
  mapping: { heap: 15_000, offHeap: 0 },
  hierarchy: { heap: 180, offHeap: 0 },
  history: { heap: 250, offHeap: 0 },
};

/** What any run takes besides its inputs (code, the report, the collector's slack). */
export const BASE_COST = { heap: 64 << 20, offHeap: 128 << 20 };

/** Inputs smaller than this in all are not estimated: they fit any Node.js default. */
export const SMALL_INPUTS = 64 << 20;

const HEAD = 1 << 16;

export interface FileEstimate {
  path: string;
  role: InputRole;
  /** Size as stored, and uncompressed (from the gzip trailer, or a guess when it cannot say). */
  bytes: number;
  textBytes: number;
  rows: number;
  heap: number;
  offHeap: number;
}

export interface MemoryEstimate {
  files: FileEstimate[];
  heap: number;
  offHeap: number;
}

function readHead(path: string, size: number): { head: Buffer; tail: Buffer } {
  const fd = openSync(path, 'r');
  try {
    const head = Buffer.alloc(Math.min(HEAD, size));
    readSync(fd, head, 0, head.length, 0);
    const tail = Buffer.alloc(Math.min(4, size));
    readSync(fd, tail, 0, tail.length, Math.max(0, size - 4));
    return { head, tail };
  } finally {
    closeSync(fd);
  }
}

/** Estimate one file; a file that cannot be read is left to the loader (which says why). */
export function estimateFile(file: InputFile): FileEstimate | undefined {
  let size: number;
  try {
    const st = statSync(file.path);
    if (!st.isFile()) return undefined;
    size = st.size;
  } catch {
    return undefined;
  }
  let textBytes = size;
  let sample: Buffer;
  try {
    const { head, tail } = readHead(file.path, size);
    sample = head;
    if (head.length >= 2 && head[0] === 0x1f && head[1] === 0x8b) {
      // gzip: ISIZE, the last four bytes, is the uncompressed size modulo 2^32 (RFC 1952).
      const isize = tail.length === 4 ? tail.readUInt32LE(0) : 0;
      textBytes = isize >= size ? isize : size * 10;
      try {
        sample = gunzipSync(head, { finishFlush: zlibConstants.Z_SYNC_FLUSH });
      } catch {
        sample = Buffer.alloc(0);
      }
    }
  } catch {
    return undefined;
  }
  let lines = 0;
  for (const b of sample) if (b === 10) lines++;
  // Without a line end in the sample the file is one long line: one row, rejected unread.
  const perLine = lines > 0 ? sample.length / lines : textBytes;
  const rows = Math.ceil(textBytes / Math.max(1, perLine));
  const cost = ROW_COST[file.role];
  return { path: file.path, role: file.role, bytes: size, textBytes, rows, heap: rows * cost.heap, offHeap: textBytes + rows * cost.offHeap };
}

export function estimateMemory(files: InputFile[]): MemoryEstimate {
  const list = files.map(estimateFile).filter((e): e is FileEstimate => e !== undefined);
  return {
    files: list,
    heap: BASE_COST.heap + list.reduce((n, f) => n + f.heap, 0),
    offHeap: BASE_COST.offHeap + list.reduce((n, f) => n + f.offHeap, 0),
  };
}

/** Memory the process may use: the machine's, or its control group's limit when lower. */
export function physicalMemory(): number {
  const constrained = (process as { constrainedMemory?: () => number | undefined }).constrainedMemory?.();
  const total = totalmem();
  return constrained && constrained > 0 && constrained < total ? constrained : total;
}

/** Was the heap limit set by the user (a --max-old-space-size flag or NODE_OPTIONS)? */
export function heapLimitGiven(): boolean {
  const flag = /--max[-_]old[-_]space[-_]size/;
  return process.execArgv.some((a) => flag.test(a)) || flag.test(process.env.NODE_OPTIONS ?? '');
}

export type HeapPlan =
  | { action: 'run' }
  | { action: 'reexec'; heapMb: number }
  | { action: 'refuse'; error: InputError };

/** The heap a run needs is its heap estimate times this: room for the garbage collector. */
export const HEAP_MARGIN = 1.25;

/** The share of the machine's memory (or the control group's limit) a run may plan to use. */
export const MEMORY_SHARE = 0.9;

const MIB = 1 << 20;
const count = (n: number) => n.toLocaleString('en-US');
/** Whole MiB: a need is rounded up, what there is rounded down, so a printed need above a printed supply is always a real shortfall. */
const needMib = (n: number) => Math.ceil(n / MIB);
const haveMib = (n: number) => Math.floor(n / MIB);
const mib = (n: number) => `${count(needMib(n))} MiB`;

/** What to do for this estimate, given the heap limit and the memory of the machine. */
export function planHeap(e: MemoryEstimate, limits: { heapLimit: number; physical: number; limitGiven: boolean; reexeced: boolean }): HeapPlan {
  const biggest = [...e.files].sort((a, b) => b.heap + b.offHeap - (a.heap + a.offHeap))[0];
  const about = e.files.map((f) => `${f.path} (${mib(f.bytes)}, about ${count(f.rows)} rows)`).join(', ');
  const location = biggest ? { file: biggest.path } : {};
  const heapNeed = e.heap * HEAP_MARGIN;
  const usable = limits.physical * MEMORY_SHARE;
  if (heapNeed + e.offHeap > usable) {
    // State the very sum that is compared: the heap with its margin plus memory outside the heap,
    // against the usable share of the memory (the parts are rounded up, so they add up as printed).
    const heapPart = needMib(heapNeed);
    const offPart = needMib(e.offHeap);
    const message =
      `the inputs are too large for this machine: ${about} need about ${count(heapPart + offPart)} MiB of memory ` +
      `(${count(heapPart)} MiB of JavaScript heap, which is the estimate of ${mib(e.heap)} plus ${Math.round((HEAP_MARGIN - 1) * 100)} % for the garbage collector, ` +
      `and ${count(offPart)} MiB outside the heap), more than the ${count(haveMib(usable))} MiB a run may use here ` +
      `(${Math.round(MEMORY_SHARE * 100)} % of the ${count(haveMib(limits.physical))} MiB of memory)`;
    return {
      action: 'refuse',
      error: new InputError('input_too_large', message, {
        location,
        fix: 'run on a machine with more memory, or split the release (e.g. by category) and compare the parts; TERMDRIFT_MEMORY_CHECK=off skips this estimate (docs/RELIABILITY.md)',
      }),
    };
  }
  if (heapNeed <= limits.heapLimit) return { action: 'run' };
  if (limits.limitGiven || limits.reexeced) {
    return {
      action: 'refuse',
      error: new InputError('input_too_large', `the inputs need about ${mib(heapNeed)} of JavaScript heap (${about}; the estimate plus ${Math.round((HEAP_MARGIN - 1) * 100)} % for the garbage collector); the heap limit is ${count(haveMib(limits.heapLimit))} MiB${limits.limitGiven ? ' (set by --max-old-space-size)' : ''}`, {
        location,
        fix: `raise it, e.g. NODE_OPTIONS=--max-old-space-size=${Math.ceil(heapNeed / MIB)}, or leave it unset and termdrift sets it; TERMDRIFT_MEMORY_CHECK=off skips this estimate`,
      }),
    };
  }
  // Heap to give: what the inputs need with room for the collector, within what the machine has.
  const room = usable - e.offHeap;
  return { action: 'reexec', heapMb: Math.ceil(Math.min(room, Math.max(heapNeed * 1.5, limits.heapLimit)) / MIB) };
}

/**
 * V8's heap growing factor for runs on big inputs, in percent (the collector lets the old space
 * grow by this share before its next full collection). Left to itself V8 picks the factor from
 * how little time collection took, up to a factor of 4 here: during re-scoring the heap went from
 * 441 MB after one full collection to 1,374 MB with no other, garbage included, which made most of
 * `check`'s peak. With 30 % from the moment the inputs are read, a 4 M-row `check`'s peak fell
 * from 3,167–3,180 MiB to 2,893–2,903 MiB (docs/BENCHMARKS.md, sixth run). Set from the start instead,
 * it gave the same peak but about ten more full collections while loading, which took 1–3 s
 * longer; set only before re-scoring, it came too late (the limit in force was already set).
 * 20 % rather than 30 % (seventh run): the CLI's `check --format json` on that pair peaked at
 * 2,837 and 2,829 MiB against 2,895 and 2,979 MiB, alternating runs of the same build, in the same
 * time; the bench's `check` phase (no report written) was the same either way.
 */
export const HEAP_GROWING_PERCENT = 20;

let collectorTuned = false;
let bigRun = false;

/**
 * Set the heap growing factor for this process (once; later calls do nothing). Returns whether it
 * was set by this call. A V8 flag set at run time: it holds for the collections after it and for
 * worker threads started later.
 */
export function tuneCollector(set: (flags: string) => void = setFlagsFromString): boolean {
  if (collectorTuned) return false;
  set(`--heap-growing-percent=${HEAP_GROWING_PERCENT}`);
  collectorTuned = true;
  return true;
}

/**
 * The CLI's `onLoaded` (pipeline.ts): tune the collector when guardMemory let a run on inputs of
 * SMALL_INPUTS or more go ahead (the re-run with a larger heap included). Returns whether it did.
 */
export function afterInputsRead(set?: (flags: string) => void): boolean {
  return bigRun && tuneCollector(set);
}

/** Thrown when the command ran again in a child process; main() exits with `exitCode`. */
export class RanInChild extends Error {
  constructor(readonly exitCode: number) {
    super('ran in a child process');
  }
}

/**
 * Check the inputs of a command before it runs: returns when it may run here; throws
 * InputError (`input_too_large`) when it cannot; or runs the command again with a larger heap and
 * throws RanInChild with that run's exit code.
 */
export function guardMemory(files: InputFile[], env: NodeJS.ProcessEnv = process.env): void {
  if (env.TERMDRIFT_MEMORY_CHECK === 'off' || files.length === 0) return;
  const sizes = files.map((f) => {
    try {
      return statSync(f.path).size;
    } catch {
      return 0;
    }
  });
  if (sizes.reduce((a, b) => a + b, 0) < SMALL_INPUTS) return;
  const plan = planHeap(estimateMemory(files), {
    heapLimit: getHeapStatistics().heap_size_limit,
    physical: physicalMemory(),
    limitGiven: heapLimitGiven(),
    reexeced: env.TERMDRIFT_HEAP_REEXEC === '1',
  });
  if (plan.action === 'run') {
    bigRun = true;
    return;
  }
  if (plan.action === 'refuse') throw plan.error;
  const r = spawnSync(process.execPath, [...process.execArgv, `--max-old-space-size=${plan.heapMb}`, process.argv[1], ...process.argv.slice(2)], {
    stdio: 'inherit',
    env: { ...env, TERMDRIFT_HEAP_REEXEC: '1' },
  });
  if (r.error) throw new InputError('input_too_large', `could not run again with a larger heap (${plan.heapMb} MiB): ${r.error.message}`, { fix: `set NODE_OPTIONS=--max-old-space-size=${plan.heapMb} yourself` });
  if (r.signal) {
    throw new InputError('input_too_large', `the run with a ${plan.heapMb} MiB heap was stopped by ${r.signal}, most likely for want of memory`, {
      fix: 'run on a machine with more memory, or split the release and compare the parts (docs/RELIABILITY.md)',
    });
  }
  throw new RanInChild(r.status ?? 2);
}

/** The input files of a command line, from commander's parsed arguments and options. */
export function inputFilesOf(command: string, args: string[], opts: Record<string, unknown>): InputFile[] {
  const str = (v: unknown) => (typeof v === 'string' ? v : undefined);
  const files: (InputFile | undefined)[] = [];
  const add = (path: string | undefined, role: InputRole) => files.push(path ? { path, role } : undefined);
  switch (command) {
    case 'validate': {
      const kind = str(opts.kind);
      add(args[0], kind === 'mapping' || kind === 'hierarchy' || kind === 'history' ? kind : 'release');
      break;
    }
    case 'diff':
    case 'check':
      add(args[0], 'release');
      add(args[1], command === 'check' ? 'new_release' : 'release');
      add(str(opts.oldHierarchy), 'hierarchy');
      add(str(opts.newHierarchy), 'hierarchy');
      add(str(opts.history), 'history');
      add(str(opts.mappings), 'mapping');
      break;
  }
  return files.filter((f): f is InputFile => f !== undefined);
}
