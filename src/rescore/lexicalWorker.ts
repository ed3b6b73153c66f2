/**
 * The worker of lexicalThread.ts: for each batch, the comparison forms of every label and its
 * lexical features against the terms it came with (lexicalBatch), answered in order (features
 * transferred); a batch the calling thread has claimed is answered as skipped.
 */
import { workerData, type MessagePort } from 'node:worker_threads';
import { DocumentFrequencies } from '../text/tfidf.js';
import { WORKER, lexicalBatch, type LexicalAnswer, type PostedBatch } from './lexicalThread.js';
import { answerer } from './workerAnswers.js';
import type { TermWordLists } from './conceptIndex.js';

const d = workerData as { df: Parameters<typeof DocumentFrequencies.fromParts>[0]; lists?: TermWordLists; state: Int32Array; port: MessagePort };
const { beat, answer } = answerer(d.state, d.port);
const df = DocumentFrequencies.fromParts(d.df);

d.port.on('message', (b: PostedBatch) => {
  try {
    // A batch the calling thread took (its claim set there) is answered as skipped.
    if (Atomics.compareExchange(b.claim, 0, 0, WORKER) !== 0) {
      answer({ skipped: true } satisfies LexicalAnswer);
      return;
    }
    const result = lexicalBatch(b, df, d.lists, (i) => {
      if ((i & 255) === 0) beat();
    });
    answer(result satisfies LexicalAnswer, [result.features.buffer as ArrayBuffer]);
  } catch (e) {
    answer({ error: e instanceof Error ? e.message : String(e) } satisfies LexicalAnswer);
  }
});
