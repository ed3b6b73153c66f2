/**
 * Load a release in a worker thread, so that the two releases of a diff are read on two cores
 * at once (the loader is single-threaded: about 4.4 s per 4 M-row file alone, docs/BENCHMARKS.md).
 *
 * The worker runs loadRelease itself, with the same options, and posts the release back as its
 * parts: the typed columns and the byte blocks are transferred or shared (blocks of large files
 * live in a SharedArrayBuffer), the strings (concept ids, labels, diagnostics) are copied. Here
 * the parts are put together again with their byte storage (releaseBytes.ts), so the release is
 * the one loadRelease gives; tests/load/releaseThread.test.ts compares the two.
 *
 * When the worker cannot answer (the file has an error, or the worker stopped), the release is
 * loaded here instead: its errors are then the usual ones, with their file, line and column.
 * Small files, and runs from the TypeScript sources (no compiled worker), are loaded here.
 */
import { existsSync, statSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { MessageChannel, Worker, type TransferListItem } from 'node:worker_threads';
import { adoptConceptIndex, INDEX_STALL_SECONDS, type IndexAnswer } from '../rescore/indexThread.js';
import { WorkerAnswers, answerState } from '../rescore/workerAnswers.js';
import { loadRelease, type LoadReleaseOptions } from './loadRelease.js';
import { hierarchyOf, loadHierarchy } from './loadHierarchy.js';
import { HierarchyGraph, graphOf } from './hierarchyGraph.js';
import type { ColumnRenames } from './columns.js';
import type { ProgressCallback } from './readTable.js';
import { ReleaseBytes, attachReleaseBytes, releaseBytesOf } from './releaseBytes.js';
import type { Diagnostic, Hierarchy, Release, RowAccounting } from './types.js';

/** Files of fewer bytes are loaded on the calling thread (a worker costs about 50 ms to start). */
export const THREAD_FROM_BYTES = 16 * 1024 * 1024;

/** Releases and hierarchies received from a worker so far (tests check that the thread was used, not the fallback). */
export const threadStats = { received: 0 };

/** The release properties built on first read (not posted; they come back with the storage). */
const LAZY = new Set(['termText', 'termId', 'conceptIndex']);

export interface PostedRelease {
  fields: Record<string, unknown>;
  bytes: {
    blocks: Uint8Array[]; termBlock: Int32Array; textStart: Int32Array; textEnd: Int32Array; idStart: Int32Array; idEnd: Int32Array;
    concepts: { block: Int32Array; start: Int32Array; end: Int32Array; sorted: boolean; hash: Int32Array; table: Int32Array };
    idsInStringOrder: boolean | undefined;
  };
}

/** A loaded release as parts for postMessage, and the buffers worth transferring. */
export function postRelease(r: Release): { posted: PostedRelease; transfer: ArrayBuffer[] } {
  const b = releaseBytesOf(r);
  if (b === undefined || b.textReplaced || b.idReplaced || b.indexReplaced) throw new Error('only a release with its byte storage can be posted');
  const fields: Record<string, unknown> = {};
  for (const key of Object.keys(r)) if (!LAZY.has(key)) fields[key] = (r as unknown as Record<string, unknown>)[key];
  const c = b.concepts;
  const posted: PostedRelease = {
    fields,
    bytes: {
      blocks: b.blocks, termBlock: b.termBlock, textStart: b.textStart, textEnd: b.textEnd, idStart: b.idStart, idEnd: b.idEnd,
      concepts: { block: c.block, start: c.start, end: c.end, sorted: c.sorted, hash: c.hash, table: c.table },
      idsInStringOrder: b.idsInStringOrder,
    },
  };
  // Large unshared buffers are moved rather than copied; small ones may share a pool, so are copied.
  const transfer = new Set<ArrayBuffer>();
  const consider = (v: unknown) => {
    if (ArrayBuffer.isView(v) && v.buffer instanceof ArrayBuffer && v.buffer.byteLength >= 1 << 16) transfer.add(v.buffer);
  };
  for (const v of Object.values(fields)) consider(v);
  for (const v of Object.values(posted.bytes)) consider(v);
  for (const v of Object.values(posted.bytes.concepts)) consider(v);
  for (const v of b.blocks) consider(v);
  return { posted, transfer: [...transfer] };
}

/** The release of posted parts, with its byte storage attached again. */
export function receiveRelease(p: PostedRelease): Release {
  const blocks = p.bytes.blocks.map((u) => Buffer.from(u.buffer, u.byteOffset, u.byteLength));
  const conceptIds = p.fields.conceptIds as string[];
  const bytes = new ReleaseBytes({
    blocks, termBlock: p.bytes.termBlock, textStart: p.bytes.textStart, textEnd: p.bytes.textEnd, idStart: p.bytes.idStart, idEnd: p.bytes.idEnd,
    concepts: { blocks, ...p.bytes.concepts }, conceptIds,
  });
  bytes.idsInStringOrder = p.bytes.idsInStringOrder;
  return attachReleaseBytes(p.fields as unknown as Omit<Release, 'termText' | 'termId' | 'conceptIndex'>, bytes);
}

function workerScript(): URL | undefined {
  const url = new URL('./releaseWorker.js', import.meta.url);
  return existsSync(fileURLToPath(url)) ? url : undefined;
}

/** What a worker answers for one file: the result (undefined when it could not), and whether it goes on indexing it. */
interface WorkerResult<T> {
  result: T | undefined;
  indexing: boolean;
  worker?: Worker;
}

/** Run the worker on one file; its answer, or undefined when it could not answer. */
function inWorker<T>(script: URL, job: { kind: 'release' | 'hierarchy'; path: string; options: object; index?: object }, onProgress: ProgressCallback | undefined, transferList: TransferListItem[] = []): Promise<WorkerResult<T>> {
  return new Promise<WorkerResult<T>>((resolve) => {
    let worker: Worker;
    try {
      worker = new Worker(script, { workerData: { ...job, progress: onProgress !== undefined }, transferList });
    } catch {
      resolve({ result: undefined, indexing: false });
      return;
    }
    worker.on('message', (m: { progress?: [number, number]; result?: T; indexing?: boolean; error?: string }) => {
      if (m.progress) onProgress?.(m.progress[0], m.progress[1]);
      else resolve({ result: m.result, indexing: m.indexing === true, worker });
    });
    worker.on('error', () => resolve({ result: undefined, indexing: false }));
    worker.on('exit', () => resolve({ result: undefined, indexing: false }));
  });
}

/** Is the file large enough (or `thread` set) for a worker to pay, and is there one? */
function threadScript(path: string, thread: boolean | undefined): URL | undefined {
  const script = workerScript();
  let size = 0;
  try {
    size = statSync(path).size;
  } catch {
    // The loader reports a missing or unreadable file.
  }
  return script !== undefined && (thread ?? size >= THREAD_FROM_BYTES) ? script : undefined;
}

/**
 * loadRelease, in a worker thread when the file is large enough to gain from it (`thread`: true
 * always when a worker can be started, false never; default: from THREAD_FROM_BYTES).
 */
export async function loadReleaseInThread(path: string, options: LoadReleaseOptions = {}, thread?: boolean, index = false): Promise<Release> {
  const script = threadScript(path, thread);
  if (script === undefined) return loadRelease(path, options);
  const { onProgress, ...rest } = options;
  // `index`: the worker goes on to build the release's nearest-concept index (rescore/indexServer.ts)
  // and answers on this channel; the next diff of the release takes it (rescore/indexThread.ts).
  const channel = index ? new MessageChannel() : undefined;
  const state = index ? answerState() : undefined;
  const job = { kind: 'release' as const, path, options: rest, ...(channel ? { index: { state, port: channel.port2 } } : {}) };
  const answer = await inWorker<PostedRelease>(script, job, onProgress, channel ? [channel.port2] : []);
  const posted = answer.result;
  if (posted === undefined) {
    channel?.port1.close();
    return loadRelease(path, options);
  }
  threadStats.received++;
  const release = receiveRelease(posted);
  const worker = answer.worker!;
  if (channel && state && answer.indexing) {
    // The worker stays to answer; it must not keep the process alive.
    worker.unref();
    adoptConceptIndex(release, new WorkerAnswers<IndexAnswer>(state, channel.port1, INDEX_STALL_SECONDS, () => void worker.terminate()), channel.port1);
  } else channel?.port1.close();
  return release;
}

/** A loaded hierarchy as the worker posts it: its graph's arrays (moved) and ids (copied). */
export interface PostedHierarchy {
  meta: { path: string; sha256: string; accounting: RowAccounting; diagnostics: Diagnostic[] };
  ids: readonly string[];
  parentStart: Int32Array;
  parentNodes: Int32Array;
}

/** The parts of a loaded hierarchy to post, and the buffers to move. */
export function postHierarchy(h: Hierarchy): { posted: PostedHierarchy; transfer: ArrayBuffer[] } {
  const g = graphOf(h);
  const posted = { meta: { path: h.path, sha256: h.sha256, accounting: h.accounting, diagnostics: h.diagnostics }, ids: g.ids, parentStart: g.parentStart, parentNodes: g.parentNodes };
  const transfer = [g.parentStart.buffer, g.parentNodes.buffer].filter((b): b is ArrayBuffer => b instanceof ArrayBuffer && b.byteLength > 0);
  return { posted, transfer: [...new Set(transfer)] };
}

/**
 * loadHierarchy in a worker thread, likewise. The graph's two integer arrays are moved; its ids
 * come by structured clone (a string per distinct id).
 */
export async function loadHierarchyInThread(path: string, options: { columns?: ColumnRenames; onProgress?: ProgressCallback } = {}, thread?: boolean): Promise<Hierarchy> {
  const script = threadScript(path, thread);
  if (script === undefined) return loadHierarchy(path, options);
  const { onProgress, ...rest } = options;
  const p = (await inWorker<PostedHierarchy>(script, { kind: 'hierarchy', path, options: rest }, onProgress)).result;
  if (p === undefined) return loadHierarchy(path, options);
  threadStats.received++;
  return hierarchyOf(p.meta, new HierarchyGraph(p.ids, p.parentStart, p.parentNodes));
}
