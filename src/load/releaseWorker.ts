/**
 * The worker of releaseThread.ts: loads one release or hierarchy and posts it back (or an error).
 * Asked to (`index`), it then builds the release's nearest-concept index and answers for it
 * (rescore/indexServer.ts) until the main thread takes the index or stops it.
 */
import { parentPort, workerData, type MessagePort } from 'node:worker_threads';
import { indexSource } from '../rescore/conceptIndex.js';
import { serveIndex, type IndexServerData } from '../rescore/indexServer.js';
import { loadRelease, type LoadReleaseOptions } from './loadRelease.js';
import { loadHierarchy } from './loadHierarchy.js';
import { postHierarchy, postRelease } from './releaseThread.js';

const d = workerData as { kind: 'release' | 'hierarchy'; path: string; options: LoadReleaseOptions; progress: boolean; index?: { state: Int32Array; port: MessagePort } };
const port = parentPort!;
/** Bytes of unshared blocks copied at most to index the release here. */
const UNSHARED_COPY_MAX = 16 * 1024 * 1024;
const onProgress = d.progress ? (read: number, size: number) => port.postMessage({ progress: [read, size] }) : undefined;
try {
  if (d.kind === 'hierarchy') {
    const { posted, transfer } = postHierarchy(await loadHierarchy(d.path, { ...d.options, onProgress }));
    port.postMessage({ result: posted }, transfer);
  } else {
    const release = await loadRelease(d.path, { ...d.options, onProgress });
    // Asked to index it too: the index source is taken before the release's columns are moved
    // to the main thread (copies; the byte blocks are shared and stay readable here).
    let serve: IndexServerData | undefined;
    if (d.index) {
      const src = indexSource(release);
      const b = src.bytes;
      // Shared blocks stay readable here after posting; the others (the small side block of values
      // that came as strings) are moved, so copied first. Not for a file read into unshared
      // blocks (a compressed one): that copy would be the whole file.
      const unshared = b ? b.blocks.reduce((n, x) => n + (x.buffer instanceof SharedArrayBuffer ? 0 : x.length), 0) : Infinity;
      if (b && unshared <= UNSHARED_COPY_MAX) {
        serve = {
          termCount: src.termCount, active: src.active, termConcept: release.termConcept.slice(), options: {},
          blocks: b.blocks.map((x) => (x.buffer instanceof SharedArrayBuffer ? x : Uint8Array.prototype.slice.call(x))),
          termBlock: b.termBlock.slice(), textStart: b.textStart.slice(), textEnd: b.textEnd.slice(),
          state: d.index.state, port: d.index.port,
        };
      } else d.index.port.close();
    }
    const { posted, transfer } = postRelease(release);
    port.postMessage({ result: posted, indexing: serve !== undefined }, transfer);
    if (serve) serveIndex(serve);
  }
} catch (e) {
  port.postMessage({ error: e instanceof Error ? e.message : String(e) });
}
