/**
 * Lexical features of re-scoring computed on a second core.
 *
 * Most mappings of a set point at a concept the release did not change; for each of them
 * re-scoring needs the label's comparison forms and its lexical features against the target's
 * terms (features.ts), which is most of its lexical work and needs nothing but the texts and the
 * document frequencies. So rescoreMappings sends those jobs, in batches, to a worker that runs
 * the same functions (textForms, lexicalOfTerms) on the same texts, and goes on with the scorer's
 * training and the other mappings meanwhile. Same code, same strings: the same floats;
 * tests/rescore/lexicalThread.test.ts compares the whole re-scoring with and without the worker.
 *
 * When no compiled worker is there (runs from the TypeScript sources), when the jobs are few, or
 * when the worker fails or stalls, the caller computes the features itself (`take` answers
 * undefined).
 */
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { DocumentFrequencies } from '../text/tfidf.js';
import { startAnswering } from './workerAnswers.js';

/** One batch of jobs: job i compares labels[i] with terms[termStart[i] .. termStart[i+1]). */
export interface LexicalBatch {
  labels: string[];
  termStart: Int32Array;
  terms: string[];
}

/** The answer to one batch: features (LEXICAL_COUNT per job) and the label's forms (nfc, folded, lexical per job). */
export interface LexicalResult {
  features: Float64Array;
  forms: string[];
}

export type LexicalAnswer = LexicalResult | { error: string };

/** Fewer jobs than this are computed on the calling thread (a worker costs about 50 ms to start). */
export const THREAD_FROM_JOBS = 20_000;
const STALL_SECONDS = 30;

/** Batches answered by a worker so far (tests check that the thread was used, not the fallback). */
export const threadStats = { batches: 0 };

export interface LexicalThread {
  /** Send a batch; returns its number (batches are answered in order). */
  post(batch: LexicalBatch): number;
  /** The answer to batch `k`, waited for; undefined when the worker could not answer (compute it here). */
  take(k: number): LexicalResult | undefined;
  /** Stop the worker. */
  close(): void;
}

function workerScript(): URL | undefined {
  const url = new URL('./lexicalWorker.js', import.meta.url);
  return existsSync(fileURLToPath(url)) ? url : undefined;
}

/**
 * A worker for `jobs` jobs with document frequencies `df`, or undefined when the work is better
 * done here (`thread`: true whenever a worker can start, false never; default from THREAD_FROM_JOBS).
 */
export function startLexicalThread(df: DocumentFrequencies, jobs: number, thread?: boolean): LexicalThread | undefined {
  if (jobs === 0 || !(thread ?? jobs >= THREAD_FROM_JOBS)) return undefined;
  const script = workerScript();
  if (script === undefined) return undefined;
  const started = startAnswering<LexicalAnswer>(script, { df: df.toParts() }, [], STALL_SECONDS);
  if (!started) return undefined;
  const { answers, port } = started;
  let posted = 0;
  /** Answers read so far, by batch number (a failed one is undefined). */
  const got: (LexicalResult | undefined)[] = [];
  return {
    post(batch) {
      if (answers.alive) port.postMessage(batch, [batch.termStart.buffer as ArrayBuffer]);
      return posted++;
    },
    take(k) {
      while (got.length <= k && answers.alive) {
        const a = answers.next() as LexicalResult | undefined;
        got.push(a);
        if (a) threadStats.batches++;
      }
      const a = got[k];
      got[k] = undefined;
      return a;
    },
    close: () => answers.stop(),
  };
}
