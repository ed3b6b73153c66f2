/**
 * A progress indicator on standard error, drawn with cli-progress, for commands on big inputs.
 *
 * Shown only when standard error is a terminal, and only once a run has lasted a second: a
 * short run, a pipe, a file or CI sees nothing. While the inputs load, the bar counts the bytes
 * read of all of them (the loaders report through their `onProgress` option, at most once per
 * MiB); after that it names the phase (comparing and re-scoring, then writing the report). The
 * comparison runs on the main thread without yielding, so during it the bar stands still on its
 * phase name rather than moving.
 */
import { SingleBar } from 'cli-progress';

export interface Progress {
  /** For the loaders' `onProgress`: `bytesRead` of `fileSize` bytes of the file at `path`. */
  file(path: string, bytesRead: number, fileSize: number): void;
  /** The run moved on to a phase that reports no amounts. */
  phase(name: string): void;
  /** Remove the bar (always call it, also on errors). */
  stop(): void;
}

/** A Progress that shows nothing. */
export const SILENT: Progress = { file() {}, phase() {}, stop() {} };

const MIB = 1 << 20;
/** A phase must last this long before anything is drawn. */
export const SHOW_AFTER_MS = 1000;

export interface ProgressOptions {
  stream?: NodeJS.WriteStream;
  /** The clock (tests). */
  now?: () => number;
}

/** A Progress on `stream` (standard error), or SILENT when that is not a terminal. */
export function createProgress(options: ProgressOptions = {}): Progress {
  const stream = options.stream ?? process.stderr;
  if (!stream.isTTY) return SILENT;
  const now = options.now ?? Date.now;
  const started = now();
  const files = new Map<string, { read: number; size: number }>();
  let bar: SingleBar | null = null;
  let phase = 'reading inputs';

  const totals = () => {
    let read = 0;
    let size = 0;
    for (const f of files.values()) {
      read += f.read;
      size += f.size;
    }
    return { read: Math.round(read / MIB), size: Math.max(1, Math.round(size / MIB)) };
  };
  const show = () => {
    if (bar === null) {
      if (now() - started < SHOW_AFTER_MS) return;
      bar = new SingleBar({
        stream,
        format: '{phase} [{bar}] {value}/{total} MiB | {duration_formatted}',
        barsize: 30,
        hideCursor: true,
        clearOnComplete: true,
        fps: 5,
      });
      const t = totals();
      bar.start(t.size, t.read, { phase });
      return;
    }
    const t = totals();
    bar.setTotal(t.size);
    bar.update(t.read, { phase });
  };

  return {
    file(path, bytesRead, fileSize) {
      files.set(path, { read: bytesRead, size: fileSize });
      // Every file read so far is complete: the loaders are done, the comparison starts.
      if ([...files.values()].every((f) => f.read >= f.size)) phase = 'inputs read, working';
      show();
    },
    phase(name) {
      phase = name;
      show();
    },
    stop() {
      if (bar !== null) bar.stop();
      bar = null;
    },
  };
}
