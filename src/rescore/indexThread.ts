/**
 * The nearest-concept index of a large release, built in a worker thread while the main thread
 * goes on (aligning terms, classifying changes); the first caller that needs it waits for it.
 *
 * Building the index of a 4 M-term release takes about 6 s on one core, and the diff needs it
 * only late (for the successors of retired concepts), so on a machine with a second core that
 * time overlaps the rest of the diff (docs/BENCHMARKS.md). The worker builds from the release's
 * indexSource (typed arrays and the loader's byte blocks; blocks of large files live in a
 * SharedArrayBuffer and are not copied) with the same function as the main thread
 * (buildIndexParts), and hands the typed arrays back by transfer, so the index is the same either
 * way; tests/rescore/indexThread.test.ts compares the two.
 *
 * The wait is synchronous (Atomics.wait, then receiveMessageOnPort), since the detectors are. A
 * worker that stops without answering (out of memory, killed) is noticed by its heartbeat: when
 * that has not moved for STALL_SECONDS the index is built here instead. Small releases, and
 * releases without byte storage, are built here on first need as before.
 */
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { MessageChannel, Worker, receiveMessageOnPort } from 'node:worker_threads';
import type { Release } from '../load/types.js';
import { ConceptIndex, indexSource, type ConceptIndexOptions, type IndexParts } from './conceptIndex.js';

/** Releases of fewer terms are indexed on the main thread (starting a worker costs about 50 ms). */
export const THREAD_FROM_TERMS = 100_000;
/** Seconds without a heartbeat from the worker after which the main thread builds the index itself. */
const STALL_SECONDS = 30;

/** State shared with the worker: [0] 0 running, 1 answered; [1] heartbeat. */
export const RUNNING = 0;
export const ANSWERED = 1;

/** Indexes received from a worker so far (tests check that the thread was used, not the fallback). */
export const threadStats = { received: 0 };

export interface IndexThreadOptions extends ConceptIndexOptions {
  /** Build in a worker thread: true always (when possible), false never; default from THREAD_FROM_TERMS. */
  thread?: boolean;
}

function workerScript(): URL | undefined {
  const url = new URL('./indexWorker.js', import.meta.url);
  // Run from the TypeScript sources (tests), there is no compiled worker beside this file.
  return existsSync(fileURLToPath(url)) ? url : undefined;
}

/**
 * Start building the index of `release`; returns the function that gives it (waiting for the
 * worker the first time, or building it then when no worker was started).
 */
export function startConceptIndex(release: Release, options: IndexThreadOptions = {}): () => ConceptIndex {
  const { thread, ...indexOptions } = options;
  let index: ConceptIndex | undefined;
  const here = () => (index ??= new ConceptIndex(release, indexOptions));
  const wanted = thread ?? release.termCount >= THREAD_FROM_TERMS;
  const script = wanted ? workerScript() : undefined;
  if (script === undefined) return here;
  const src = indexSource(release);
  if (src.bytes === undefined) return here;

  const state = new Int32Array(new SharedArrayBuffer(8));
  const { port1, port2 } = new MessageChannel();
  const bytes = src.bytes;
  let worker: Worker;
  try {
    worker = new Worker(script, {
      workerData: { termCount: src.termCount, active: src.active, blocks: bytes.blocks, termBlock: bytes.termBlock, textStart: bytes.textStart, textEnd: bytes.textEnd, state, port: port2 },
      transferList: [port2, src.active.buffer as ArrayBuffer],
    });
  } catch {
    port1.close();
    return here;
  }
  worker.unref();
  // An error is answered on the port; this only keeps an unanswered failure from being an unhandled event.
  worker.on('error', () => {});
  return () => {
    if (index !== undefined) return index;
    let beat = Atomics.load(state, 1);
    let quiet = 0;
    while (Atomics.load(state, 0) === RUNNING && quiet < STALL_SECONDS) {
      if (Atomics.wait(state, 0, RUNNING, 1000) !== 'timed-out') continue;
      const now = Atomics.load(state, 1);
      quiet = now === beat ? quiet + 1 : 0;
      beat = now;
    }
    const answer = Atomics.load(state, 0) === ANSWERED ? (receiveMessageOnPort(port1)?.message as { parts?: IndexParts } | undefined) : undefined;
    port1.close();
    if (answer?.parts) {
      index = new ConceptIndex(release, indexOptions, answer.parts);
      threadStats.received++;
    }
    else {
      void worker.terminate();
      index = new ConceptIndex(release, indexOptions);
    }
    return index;
  };
}
