/** Test helpers: write small input files into a fresh temporary folder. */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';

export function tempDir(prefix = 'termdrift-test-'): string {
  return mkdtempSync(join(tmpdir(), prefix));
}

/** Write `content` (string or bytes) to `name` in `dir`; gzip it when the name ends in .gz. */
export function writeFile(dir: string, name: string, content: string | Buffer): string {
  const path = join(dir, name);
  let bytes = typeof content === 'string' ? Buffer.from(content, 'utf8') : content;
  if (name.endsWith('.gz')) bytes = gzipSync(bytes);
  writeFileSync(path, bytes);
  return path;
}

/** Build TSV text from rows of fields. */
export function tsv(rows: string[][]): string {
  return rows.map((r) => r.join('\t')).join('\n') + '\n';
}
