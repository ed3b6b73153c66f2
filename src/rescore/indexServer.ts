/**
 * The worker side of the nearest-concept index (indexThread.ts): build the index of a release
 * from its index source, its typed arrays in shared memory, and answer that it is built with
 * those arrays (shared, not copied: the main thread can search the same index). Then answer
 * batches of searches in order, each searched here, on the second core, and, when the batch
 * comes with a claim counter, shared with the main thread: each thread takes the next
 * CLAIM_CHUNK queries until none is left (searchClaimed). Each answer is counted in the shared
 * state, which the main thread waits on.
 *
 * Run by indexWorker.ts (a worker started for the index alone) and by releaseWorker.ts (the
 * worker that loaded the new release goes on to index it, so that the build starts the moment
 * the release is read: load/releaseThread.ts).
 */
import type { MessagePort } from 'node:worker_threads';
import { ConceptIndex, buildIndexParts, type ConceptIndexOptions, type IndexHit } from './conceptIndex.js';
import type { IndexAnswer, IndexRequest, SearchQuery } from './indexThread.js';
import { answerer } from './workerAnswers.js';
import type { Release } from '../load/types.js';

export interface IndexServerData {
  termCount: number; active: Uint8Array; termConcept: Int32Array; options: ConceptIndexOptions;
  blocks: Uint8Array[]; termBlock: Int32Array; textStart: Int32Array; textEnd: Int32Array;
  state: Int32Array; port: MessagePort;
}

/** Queries a thread claims at a time from a batch shared by two threads. */
export const CLAIM_CHUNK = 8;

/**
 * Search the queries of a shared batch that this thread claims: CLAIM_CHUNK at a time, through
 * the batch's counter (claim[0], the next query not yet taken, added to atomically), until the
 * batch is taken. Each result goes to `found` with its query's position. Returns the number of
 * queries searched here. The index is the same on both threads, so a query's hits do not depend
 * on which thread searched it.
 */
export function searchClaimed(index: ConceptIndex, queries: readonly SearchQuery[], claim: Int32Array, found: (at: number, hits: IndexHit[]) => void, onChunk?: () => void): number {
  let done = 0;
  for (;;) {
    const at = Atomics.add(claim, 0, CLAIM_CHUNK);
    if (at >= queries.length) return done;
    onChunk?.();
    const end = Math.min(queries.length, at + CLAIM_CHUNK);
    for (let i = at; i < end; i++) found(i, index.search(queries[i].texts, queries[i].limit, queries[i].skipConcept));
    done += end - at;
  }
}

export function serveIndex(d: IndexServerData): void {
  const { beat, answer: post } = answerer(d.state, d.port);
  const answer = (a: IndexAnswer, transfer: ArrayBuffer[] = []) => post(a, transfer);

  const blocks = d.blocks.map((b) => Buffer.from(b.buffer, b.byteOffset, b.byteLength));
  let index: ConceptIndex | undefined;
  try {
    const parts = buildIndexParts(
      { termCount: d.termCount, active: d.active, bytes: { blocks, termBlock: d.termBlock, textStart: d.textStart, textEnd: d.textEnd }, text: (t) => blocks[d.termBlock[t]].toString('utf8', d.textStart[t], d.textEnd[t]) },
      beat,
      true,
    );
    // Search needs of the release only its term → concept column and its size.
    const release = { termCount: d.termCount, termConcept: d.termConcept } as unknown as Release;
    index = new ConceptIndex(release, d.options, parts);
    answer({ built: true, parts });
  } catch (e) {
    answer({ error: e instanceof Error ? e.message : String(e) });
  }

  d.port.on('message', (m: IndexRequest) => {
    if (index === undefined) return;
    try {
      const at: number[] = [];
      const hits: IndexHit[][] = [];
      searchClaimed(index, m.searches, m.claim, (i, h) => {
        at.push(i);
        hits.push(h);
      }, beat);
      answer({ hits, at });
    } catch (e) {
      answer({ error: e instanceof Error ? e.message : String(e) });
    }
  });
}
