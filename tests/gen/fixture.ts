/**
 * Shared by the generator tests: one default dataset of 20,000 concepts per seed, generated
 * once per test file, and written to a temporary folder on request.
 */
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { generateDataset, type Dataset } from '../../src/gen/dataset.js';
import { writeDataset, type DatasetFile } from '../../src/gen/writeDataset.js';

export const CONCEPTS = 20_000;

const cache = new Map<string, Dataset>();

export function dataset(seed: number | string = 1, concepts = CONCEPTS): Dataset {
  const key = `${seed}:${concepts}`;
  let d = cache.get(key);
  if (!d) {
    d = generateDataset({ concepts, seed });
    cache.set(key, d);
  }
  return d;
}

export function tempDir(prefix = 'termdrift-gen-'): string {
  return mkdtempSync(join(tmpdir(), prefix));
}

export async function written(seed: number | string = 1, concepts = CONCEPTS, gzip = false): Promise<{ dir: string; paths: Record<DatasetFile, string>; rows: Record<DatasetFile, number> }> {
  const dir = tempDir();
  const { paths, rows } = await writeDataset(dir, dataset(seed, concepts), { gzip });
  return { dir, paths, rows };
}
