/**
 * The nearest-concept index of a large release, built in a worker thread while the main thread
 * goes on (aligning terms, classifying changes), and searched there too.
 *
 * Building the index of a 4 M-term release takes about 6 s on one core, and the diff needs it
 * only late (for the successors of retired concepts), so on a machine with a second core that
 * time overlaps the rest of the diff (docs/BENCHMARKS.md). The worker builds from the release's
 * indexSource (typed arrays and the loader's byte blocks; blocks of large files live in a
 * SharedArrayBuffer and are not copied) with the same function as the main thread
 * (buildIndexParts), its typed arrays in shared memory, and answers that it is built with those
 * arrays: from then on this thread can search the very same index without a copy. Batches of
 * searches (`searchAhead`; the retirement detector starts its batch before the other detectors
 * run) go to the worker, and when this thread asks for their hits before the worker is through,
 * it searches the rest of the batch beside the worker instead of waiting: the two threads take
 * the next queries in turn from a shared counter (indexServer.ts, searchClaimed). When something
 * here needs the index itself (`get`; re-scoring does), it is the shared one, and the worker is
 * stopped.
 * Same code, same data: the hits and the index are those of the main thread;
 * tests/rescore/indexThread.test.ts compares them.
 *
 * Waits are synchronous (Atomics.wait on a count of the worker's answers, then
 * receiveMessageOnPort), since the detectors are. A worker that fails answers with an error; one
 * that stops without answering (out of memory, killed) is noticed by its heartbeat, which has not
 * moved for STALL_SECONDS. Either way it is stopped and the work is done here. Small releases,
 * and releases without byte storage, are indexed here on first need.
 */
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { Release } from '../load/types.js';
import { ConceptIndex, indexSource, type ConceptIndexOptions, type IndexHit, type IndexParts, type TermWordLists } from './conceptIndex.js';
import { startAnswering, type WorkerAnswers } from './workerAnswers.js';
import { searchClaimed } from './indexServer.js';
import type { MessagePort } from 'node:worker_threads';

/** One nearest-concept search: the texts of a concept, as ConceptIndex.search takes them. */
export interface SearchQuery {
  texts: string[];
  limit: number;
  skipConcept: number;
}

/** To the worker: a batch of searches, with its claim counter (the next query not yet taken by either thread). */
export type IndexRequest = { searches: SearchQuery[]; claim: Int32Array };
/** Its answers, in the order asked (the first says it has built): built (with the index's shared parts), the hits of the queries the worker took (`at`: their positions in the batch), or an error. */
export type IndexAnswer = { built: true; parts: IndexParts } | { hits: IndexHit[][]; at: number[] } | { error: string };

export interface IndexHandle {
  /** The index on this thread (the worker's, in shared memory, or built here, on first need). */
  get(): ConceptIndex;
  /**
   * Start the searches; the function returned gives their hits, in order. With a worker, they
   * run there while this thread goes on; otherwise on this thread, when the hits are asked for.
   */
  searchAhead(queries: SearchQuery[]): () => IndexHit[][];
  /**
   * The index's vocabulary and forward lists when they are in shared memory and at hand without
   * waiting (the worker has said it is built), else undefined. The worker goes on serving searches.
   * Another thread may read terms' stems from them (termStems: re-scoring's lexical worker does).
   */
  ready(): TermWordLists | undefined;
}

/** Releases of fewer terms are indexed on the main thread (starting a worker costs about 50 ms). */
export const THREAD_FROM_TERMS = 100_000;
/** Seconds without a heartbeat from the worker after which the main thread builds the index itself. */
const STALL_SECONDS = 30;
/** The same, for an index built by the worker that loaded the release (load/releaseThread.ts). */
export const INDEX_STALL_SECONDS = STALL_SECONDS;

/**
 * Indexes built by a worker and taken here so far, and queries of batches searched on the worker
 * and here (tests check that the thread was used, not the fallback).
 */
export const threadStats = { received: 0, searchedThere: 0, searchedHere: 0 };

export interface IndexThreadOptions extends ConceptIndexOptions {
  /** Build in a worker thread: true always (when possible), false never; default from THREAD_FROM_TERMS. */
  thread?: boolean;
}

function workerScript(): URL | undefined {
  const url = new URL('./indexWorker.js', import.meta.url);
  // Run from the TypeScript sources (tests), there is no compiled worker beside this file.
  return existsSync(fileURLToPath(url)) ? url : undefined;
}

const runHere = (index: () => ConceptIndex, queries: SearchQuery[]) => queries.map((q) => index().search(q.texts, q.limit, q.skipConcept));

/**
 * Start building the index of `release`: in a worker thread when the release is large (or
 * `thread` says so) and a compiled worker is there, else on this thread on first need.
 */
export function startConceptIndex(release: Release, options: IndexThreadOptions = {}): IndexHandle {
  const { thread, ...indexOptions } = options;
  let index: ConceptIndex | undefined;
  const here = () => (index ??= new ConceptIndex(release, indexOptions));
  const local: IndexHandle = {
    get: here,
    searchAhead: (queries) => {
      let hits: IndexHit[][] | undefined;
      return () => (hits ??= runHere(here, queries));
    },
    ready: () => undefined,
  };
  const wanted = thread ?? release.termCount >= THREAD_FROM_TERMS;
  const script = wanted ? workerScript() : undefined;
  if (script === undefined) return local;
  const src = indexSource(release);
  if (src.bytes === undefined) return local;

  const bytes = src.bytes;
  const started = startAnswering<IndexAnswer>(script, {
    termCount: src.termCount, active: src.active, termConcept: release.termConcept, options: indexOptions,
    blocks: bytes.blocks, termBlock: bytes.termBlock, textStart: bytes.textStart, textEnd: bytes.textEnd,
  }, [src.active.buffer as ArrayBuffer], STALL_SECONDS);
  if (!started) return local;
  return indexHandle(release, indexOptions, started.answers, started.port);
}

/** Indexes being built for a release by the worker that loaded it (adoptConceptIndex), until a diff takes them. */
const adopted = new WeakMap<Release, IndexHandle>();

/**
 * The index of `release` is being built by a worker already (the one that loaded it:
 * load/releaseThread.ts), which answers on `port` as indexServer.ts does: the next diff of the
 * release takes it (takeConceptIndex) instead of starting its own.
 */
export function adoptConceptIndex(release: Release, answers: WorkerAnswers<IndexAnswer>, port: MessagePort): void {
  adopted.set(release, indexHandle(release, {}, answers, port));
}

/** The index adopted for `release`, once (a later diff starts its own), else undefined. */
export function takeConceptIndex(release: Release): IndexHandle | undefined {
  const handle = adopted.get(release);
  adopted.delete(release);
  return handle;
}

/** The handle over a worker that builds (or built) the index of `release` and answers on `port`. */
function indexHandle(release: Release, indexOptions: ConceptIndexOptions, answers: WorkerAnswers<IndexAnswer>, port: MessagePort): IndexHandle {
  /** The index on this thread: over the worker's shared parts once it has built them, else built here. */
  let index: ConceptIndex | undefined;
  let shared: IndexParts | undefined;
  const here = () => (index ??= new ConceptIndex(release, indexOptions, shared));
  const local: IndexHandle = {
    get: here,
    searchAhead: (queries) => {
      let hits: IndexHit[][] | undefined;
      return () => (hits ??= runHere(here, queries));
    },
    ready: () => undefined,
  };
  const next = () => answers.next();
  let built: boolean | undefined;
  const waitBuilt = (): boolean => {
    if (built === undefined) {
      const a = next();
      built = a !== undefined && 'built' in a;
      if (a && 'built' in a) shared = a.parts;
    }
    return built;
  };
  /** Searches asked of the worker whose hits are not yet read, in order. */
  const pending: { hits?: IndexHit[][]; queries: SearchQuery[]; claim: Int32Array }[] = [];
  /**
   * Read the hits of every pending batch: search here what the worker has not taken yet, then
   * take the worker's answer; what is still missing (the worker failed) is searched here too.
   */
  const drain = () => {
    const ok = waitBuilt();
    for (const p of pending) {
      if (p.hits !== undefined) continue;
      const hits: (IndexHit[] | undefined)[] = new Array(p.queries.length);
      if (ok && answers.alive) {
        threadStats.searchedHere += searchClaimed(here(), p.queries, p.claim, (i, h) => {
          hits[i] = h;
        });
      }
      const a = ok ? next() : undefined;
      if (a && 'hits' in a) {
        for (let k = 0; k < a.at.length; k++) hits[a.at[k]] = a.hits[k];
        threadStats.searchedThere += a.at.length;
      }
      for (let i = 0; i < hits.length; i++) {
        const q = p.queries[i];
        hits[i] ??= here().search(q.texts, q.limit, q.skipConcept);
      }
      p.hits = hits as IndexHit[][];
    }
    pending.length = 0;
  };
  const handle: IndexHandle = {
    get() {
      if (answers.alive) {
        drain();
        if (waitBuilt() && shared !== undefined) threadStats.received++;
        answers.stop();
      }
      return here();
    },
    ready() {
      // The first answer says whether the worker built; it is read only when it is there.
      if (built === undefined && answers.alive && answers.posted() > 0) waitBuilt();
      return built ? shared : undefined;
    },
    searchAhead(queries) {
      if (!answers.alive) return local.searchAhead(queries);
      const p: (typeof pending)[number] = { queries, claim: new Int32Array(new SharedArrayBuffer(4)) };
      pending.push(p);
      port.postMessage({ searches: queries, claim: p.claim } satisfies IndexRequest);
      return () => {
        if (p.hits === undefined) drain();
        return p.hits!;
      };
    },
  };
  return handle;
}
