/**
 * The worker of indexThread.ts: builds the index parts of a release from its index source and
 * posts them back (typed arrays transferred, not copied), then marks the shared state answered.
 */
import { workerData } from 'node:worker_threads';
import type { MessagePort } from 'node:worker_threads';
import { buildIndexParts } from './conceptIndex.js';
import { ANSWERED } from './indexThread.js';

const d = workerData as {
  termCount: number; active: Uint8Array; blocks: Uint8Array[]; termBlock: Int32Array; textStart: Int32Array; textEnd: Int32Array;
  state: Int32Array; port: MessagePort;
};
const blocks = d.blocks.map((b) => Buffer.from(b.buffer, b.byteOffset, b.byteLength));
let answer: { parts?: object; error?: string };
let transfer: ArrayBuffer[] = [];
try {
  const parts = buildIndexParts(
    { termCount: d.termCount, active: d.active, bytes: { blocks, termBlock: d.termBlock, textStart: d.textStart, textEnd: d.textEnd }, text: (t) => blocks[d.termBlock[t]].toString('utf8', d.textStart[t], d.textEnd[t]) },
    () => Atomics.add(d.state, 1, 1),
  );
  answer = { parts };
  transfer = [parts.start, parts.terms, parts.idfs, parts.termNorm, parts.termStart, parts.termWords].map((a) => a.buffer as ArrayBuffer);
} catch (e) {
  answer = { error: e instanceof Error ? e.message : String(e) };
}
d.port.postMessage(answer, transfer);
Atomics.store(d.state, 0, ANSWERED);
Atomics.notify(d.state, 0);
