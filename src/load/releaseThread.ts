/**
 * Load a release in a worker thread, so that the two releases of a diff are read on two cores
 * at once (the loader is single-threaded: about 3.5 s per 4 M-row file, docs/BENCHMARKS.md).
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
import { Worker } from 'node:worker_threads';
import { loadRelease, type LoadReleaseOptions } from './loadRelease.js';
import { ReleaseBytes, attachReleaseBytes, releaseBytesOf } from './releaseBytes.js';
import type { Release } from './types.js';

/** Files of fewer bytes are loaded on the calling thread (a worker costs about 50 ms to start). */
export const THREAD_FROM_BYTES = 16 * 1024 * 1024;

/** Releases received from a worker so far (tests check that the thread was used, not the fallback). */
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

/**
 * loadRelease, in a worker thread when the file is large enough to gain from it (`thread`: true
 * always when a worker can be started, false never; default: from THREAD_FROM_BYTES).
 */
export async function loadReleaseInThread(path: string, options: LoadReleaseOptions = {}, thread?: boolean): Promise<Release> {
  const script = workerScript();
  let size = 0;
  try {
    size = statSync(path).size;
  } catch {
    // loadRelease reports a missing or unreadable file.
  }
  if (script === undefined || !(thread ?? size >= THREAD_FROM_BYTES)) return loadRelease(path, options);
  const { onProgress, ...rest } = options;
  const posted = await new Promise<PostedRelease | undefined>((resolve) => {
    let worker: Worker;
    try {
      worker = new Worker(script, { workerData: { path, options: rest, progress: onProgress !== undefined } });
    } catch {
      resolve(undefined);
      return;
    }
    worker.on('message', (m: { progress?: [number, number]; release?: PostedRelease; error?: string }) => {
      if (m.progress) onProgress?.(m.progress[0], m.progress[1]);
      else resolve(m.release);
    });
    worker.on('error', () => resolve(undefined));
    worker.on('exit', () => resolve(undefined));
  });
  if (posted === undefined) return loadRelease(path, options);
  threadStats.received++;
  return receiveRelease(posted);
}
