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
 * The worker takes the batches in the order posted. When the caller asks for an answer the
 * worker has not given yet, it does not wait while batches are left that the worker has not
 * started: it computes the last of them itself (the same function, lexicalBatch), so the two
 * threads work through the queue from either end. Each batch carries a claim in shared memory
 * that the thread starting it sets first (compare-and-exchange), so no batch is computed twice;
 * the worker answers a batch claimed here with `skipped`, to keep its answers in order.
 *
 * When no compiled worker is there (runs from the TypeScript sources), when the jobs are few, or
 * when the worker fails or stalls, the caller computes the features itself (`take` answers
 * undefined).
 */
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { DocumentFrequencies } from '../text/tfidf.js';
import { termStems, type TermWordLists } from './conceptIndex.js';
import { startAnswering } from './workerAnswers.js';
import { LEXICAL_COUNT, lexicalOfTerms, termEntry, textForms, type TermEntry } from './features.js';

/**
 * One batch of jobs: job i compares labels[i] with terms[termStart[i] .. termStart[i+1]).
 * `termIds[k]`, when given, is the number of terms[k] in the index whose word lists come with the
 * thread (startLexicalThread's `lists`), or -1: its stems are read there (termStems).
 */
export interface LexicalBatch {
  labels: string[];
  termStart: Int32Array;
  terms: string[];
  termIds?: Int32Array;
}

/** A batch as posted: with its claim (0 free, WORKER or HERE: the thread that computes it). */
export interface PostedBatch extends LexicalBatch {
  claim: Int32Array;
}

/** Claim values: which thread computes a batch. */
export const WORKER = 1;
const HERE = 2;

/** The answer to one batch: features (LEXICAL_COUNT per job) and the label's forms (nfc, folded, lexical per job). */
export interface LexicalResult {
  features: Float64Array;
  forms: string[];
}

export type LexicalAnswer = LexicalResult | { skipped: true } | { error: string };

/** The answer to a batch, computed on this thread: what the worker computes for it (`lists`: the index word lists that b.termIds refer to). */
export function lexicalBatch(b: LexicalBatch, df: DocumentFrequencies, lists?: TermWordLists, onJob?: (i: number) => void): LexicalResult {
  const n = b.labels.length;
  const features = new Float64Array(n * LEXICAL_COUNT);
  const forms: string[] = new Array(n * 3);
  const ids = lists ? b.termIds : undefined;
  for (let i = 0; i < n; i++) {
    onJob?.(i);
    const label = textForms(b.labels[i]);
    const entries: TermEntry[] = [];
    for (let k = b.termStart[i]; k < b.termStart[i + 1]; k++) {
      const id = ids ? ids[k] : -1;
      entries.push(termEntry(k, b.terms[k], id >= 0 ? termStems(lists!, id) : undefined));
    }
    lexicalOfTerms(label, entries, df, features, i * LEXICAL_COUNT);
    forms[3 * i] = label.nfc;
    forms[3 * i + 1] = label.folded;
    forms[3 * i + 2] = label.lexical;
  }
  return { features, forms };
}

/** Fewer jobs than this are computed on the calling thread (a worker costs about 50 ms to start). */
export const THREAD_FROM_JOBS = 20_000;
const STALL_SECONDS = 30;

/** Batches answered by a worker so far, and computed here from the end of the queue (tests check that the thread was used, not the fallback). */
export const threadStats = { batches: 0, takenHere: 0 };

export interface LexicalThread {
  /** Send a batch; returns its number (batches are answered in order). */
  post(batch: LexicalBatch): number;
  /** The answer to batch `k`, waited for or computed here; undefined when the worker could not answer (compute it here). */
  take(k: number): LexicalResult | undefined;
  /** Answers the worker has given so far (computed or skipped), read or not. */
  answered(): number;
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
export function startLexicalThread(df: DocumentFrequencies, jobs: number, thread?: boolean, lists?: TermWordLists): LexicalThread | undefined {
  if (jobs === 0 || !(thread ?? jobs >= THREAD_FROM_JOBS)) return undefined;
  const script = workerScript();
  if (script === undefined) return undefined;
  // The word lists' typed arrays are in shared memory (the index thread built them): not copied.
  const started = startAnswering<LexicalAnswer>(script, { df: df.toParts(), lists }, [], STALL_SECONDS);
  if (!started) return undefined;
  const { answers, port } = started;
  /** Batches posted and not yet answered (kept to be computed here if the worker has not started them). */
  const posted: (PostedBatch | undefined)[] = [];
  /** Answers by batch number: read from the worker, or computed here (a failed one is undefined). */
  const got: (LexicalResult | undefined)[] = [];
  /** Answers read from the worker so far (they come in batch order). */
  let read = 0;
  const readNext = () => {
    const a = answers.next();
    const k = read++;
    if (a && 'features' in a) {
      got[k] = a;
      threadStats.batches++;
    }
    posted[k] = undefined;
  };
  /** Compute here the last batch the worker has not started; false when there is none. */
  const takeLast = (): boolean => {
    for (let j = posted.length - 1; j >= read; j--) {
      const b = posted[j];
      if (b === undefined || Atomics.compareExchange(b.claim, 0, 0, HERE) !== 0) continue;
      got[j] = lexicalBatch(b, df, lists);
      posted[j] = undefined;
      threadStats.takenHere++;
      return true;
    }
    return false;
  };
  return {
    post(batch) {
      const k = posted.length;
      const p: PostedBatch = { ...batch, claim: new Int32Array(new SharedArrayBuffer(4)) };
      posted.push(p);
      if (answers.alive) port.postMessage(p);
      return k;
    },
    take(k) {
      while (read <= k && got[k] === undefined && answers.alive) {
        // The worker's answers that are there are read first; then, rather than wait, a batch
        // it has not started is computed here, the last one first.
        if (answers.posted() > read || !takeLast()) readNext();
      }
      const a = got[k];
      got[k] = undefined;
      return a;
    },
    answered: () => answers.posted(),
    close: () => answers.stop(),
  };
}
