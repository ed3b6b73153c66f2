/** The worker of indexThread.ts: builds the index of a release from its index source and answers on its port (indexServer.ts). */
import { workerData } from 'node:worker_threads';
import { serveIndex, type IndexServerData } from './indexServer.js';

serveIndex(workerData as IndexServerData);
