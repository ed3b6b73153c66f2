/**
 * The worker side of the nearest-concept index (indexThread.ts): build the index of a release
 * from its index source, say so, then answer requests in order: searches (run here, on the
 * second core) and, last, the index parts themselves (typed arrays transferred, not copied),
 * after which the port closes and the worker ends. Each answer is counted in the shared state,
 * which the main thread waits on.
 *
 * Run by indexWorker.ts (a worker started for the index alone) and by releaseWorker.ts (the
 * worker that loaded the new release goes on to index it, so that the build starts the moment
 * the release is read: load/releaseThread.ts).
 */
import type { MessagePort } from 'node:worker_threads';
import { ConceptIndex, buildIndexParts, type ConceptIndexOptions } from './conceptIndex.js';
import type { IndexAnswer, IndexRequest } from './indexThread.js';
import { answerer } from './workerAnswers.js';
import type { Release } from '../load/types.js';

export interface IndexServerData {
  termCount: number; active: Uint8Array; termConcept: Int32Array; options: ConceptIndexOptions;
  blocks: Uint8Array[]; termBlock: Int32Array; textStart: Int32Array; textEnd: Int32Array;
  state: Int32Array; port: MessagePort;
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
    );
    // Search needs of the release only its term → concept column and its size.
    const release = { termCount: d.termCount, termConcept: d.termConcept } as unknown as Release;
    index = new ConceptIndex(release, d.options, parts);
    answer({ built: true });
  } catch (e) {
    answer({ error: e instanceof Error ? e.message : String(e) });
  }

  d.port.on('message', (m: IndexRequest) => {
    if (index === undefined) return;
    try {
      if ('searches' in m) {
        const hits = m.searches.map((q, i) => {
          if ((i & 63) === 0) beat();
          return index!.search(q.texts, q.limit, q.skipConcept);
        });
        answer({ hits });
      } else {
        const p = index.parts();
        answer({ parts: p }, [p.start, p.terms, p.idfs, p.termNorm, p.termStart, p.termWords].map((a) => a.buffer as ArrayBuffer));
        d.port.close();
      }
    } catch (e) {
      answer({ error: e instanceof Error ? e.message : String(e) });
    }
  });
}
