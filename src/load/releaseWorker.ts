/** The worker of releaseThread.ts: loads one release and posts it back as parts (or an error). */
import { parentPort, workerData } from 'node:worker_threads';
import { loadRelease, type LoadReleaseOptions } from './loadRelease.js';
import { postRelease } from './releaseThread.js';

const d = workerData as { path: string; options: LoadReleaseOptions; progress: boolean };
const port = parentPort!;
try {
  const r = await loadRelease(d.path, { ...d.options, onProgress: d.progress ? (read, size) => port.postMessage({ progress: [read, size] }) : undefined });
  const { posted, transfer } = postRelease(r);
  port.postMessage({ release: posted }, transfer);
} catch (e) {
  port.postMessage({ error: e instanceof Error ? e.message : String(e) });
}
