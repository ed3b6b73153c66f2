/** The worker of releaseThread.ts: loads one release or hierarchy and posts it back (or an error). */
import { parentPort, workerData } from 'node:worker_threads';
import { loadRelease, type LoadReleaseOptions } from './loadRelease.js';
import { loadHierarchy } from './loadHierarchy.js';
import { postRelease } from './releaseThread.js';

const d = workerData as { kind: 'release' | 'hierarchy'; path: string; options: LoadReleaseOptions; progress: boolean };
const port = parentPort!;
const onProgress = d.progress ? (read: number, size: number) => port.postMessage({ progress: [read, size] }) : undefined;
try {
  if (d.kind === 'hierarchy') {
    port.postMessage({ result: await loadHierarchy(d.path, { ...d.options, onProgress }) });
  } else {
    const { posted, transfer } = postRelease(await loadRelease(d.path, { ...d.options, onProgress }));
    port.postMessage({ result: posted }, transfer);
  }
} catch (e) {
  port.postMessage({ error: e instanceof Error ? e.message : String(e) });
}
