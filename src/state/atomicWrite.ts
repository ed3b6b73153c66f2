/**
 * Atomic file writes: write a temporary file beside the target, fsync it, rename it over the
 * target, fsync the folder. A crash at any point leaves either the old file or the new one,
 * never a torn one. Files are created with mode 0600 unless told otherwise.
 *
 * `hooks` exist for the crash tests (tests/state/): they run at the two moments a crash matters,
 * with half the bytes in the temporary file and with all of them synced but not yet renamed.
 */
import { closeSync, fsyncSync, openSync, renameSync, unlinkSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';

export interface AtomicWriteHooks {
  /** Called when the first half of the bytes is in the temporary file. */
  afterPartialWrite?: (tmpPath: string) => void;
  /** Called when the temporary file is complete and synced, before the rename. */
  beforeRename?: (tmpPath: string) => void;
}

export function writeAtomic(path: string, data: string | Uint8Array, mode = 0o600, hooks: AtomicWriteHooks = {}): void {
  const dir = dirname(path);
  const tmp = join(dir, `.${basename(path)}.${process.pid}.${Date.now()}.tmp`);
  const fd = openSync(tmp, 'w', mode);
  try {
    const bytes = typeof data === 'string' ? Buffer.from(data, 'utf8') : data;
    const half = bytes.length >> 1;
    let off = 0;
    while (off < half) off += writeSync(fd, bytes, off, half - off);
    hooks.afterPartialWrite?.(tmp);
    while (off < bytes.length) off += writeSync(fd, bytes, off, bytes.length - off);
    fsyncSync(fd);
  } catch (err) {
    closeSync(fd);
    try { unlinkSync(tmp); } catch { /* already gone */ }
    throw err;
  }
  closeSync(fd);
  hooks.beforeRename?.(tmp);
  renameSync(tmp, path);
  try {
    const dfd = openSync(dir, 'r');
    try { fsyncSync(dfd); } finally { closeSync(dfd); }
  } catch {
    // Some file systems do not allow fsync on a folder; the rename is still atomic.
  }
}
