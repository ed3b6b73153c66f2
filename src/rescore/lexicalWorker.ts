/**
 * The worker of lexicalThread.ts: for each batch, the comparison forms of every label and its
 * lexical features against the terms it came with, answered in order (features transferred).
 */
import { workerData, type MessagePort } from 'node:worker_threads';
import { DocumentFrequencies } from '../text/tfidf.js';
import { LEXICAL_COUNT, lexicalOfTerms, termEntry, textForms } from './features.js';
import type { LexicalAnswer, LexicalBatch } from './lexicalThread.js';
import { answerer } from './workerAnswers.js';

const d = workerData as { df: Parameters<typeof DocumentFrequencies.fromParts>[0]; state: Int32Array; port: MessagePort };
const { beat, answer } = answerer(d.state, d.port);
const df = DocumentFrequencies.fromParts(d.df);

d.port.on('message', (b: LexicalBatch) => {
  try {
    const n = b.labels.length;
    const features = new Float64Array(n * LEXICAL_COUNT);
    const forms: string[] = new Array(n * 3);
    for (let i = 0; i < n; i++) {
      if ((i & 255) === 0) beat();
      const label = textForms(b.labels[i]);
      const entries = [];
      for (let k = b.termStart[i]; k < b.termStart[i + 1]; k++) entries.push(termEntry(k, b.terms[k]));
      lexicalOfTerms(label, entries, df, features, i * LEXICAL_COUNT);
      forms[3 * i] = label.nfc;
      forms[3 * i + 1] = label.folded;
      forms[3 * i + 2] = label.lexical;
    }
    answer({ features, forms } satisfies LexicalAnswer, [features.buffer]);
  } catch (e) {
    answer({ error: e instanceof Error ? e.message : String(e) } satisfies LexicalAnswer);
  }
});
