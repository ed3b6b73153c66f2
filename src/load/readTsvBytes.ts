/**
 * readTsvBytes: read a TSV table as bytes, handing plain records to the sink as byte ranges.
 *
 * Hot path; measured in docs/BENCHMARKS.md ("Loading"). On two synthetic releases of 4.1 M rows
 * (335 MB) each, decoding to strings and splitting every line into field strings with no other
 * work (`phase.js split`, the floor the loader is held to: at most 1.5 times it) took 7.6–9.7 s
 * of CPU, and keeping one or two strings per row alive costs more than that again (garbage
 * collection of retained strings). So this reader makes no string per row: the file is read
 * straight into large blocks that stay alive (one block for an uncompressed file; memory about
 * the file's size), one JS loop over the bytes finds line ends and tabs and notes NUL bytes,
 * quotes at the start of a field and bytes ≥ 0x80 (as fast as `indexOf` per line end and per
 * tab, which would still need a second pass for the flags), and a plain record is passed on as
 * (block, start[], end[]). The bare scan of both files took 3.2–3.7 s of CPU with one block per
 * file and 3.6–4.6 s when the stream's 1 MiB chunks were kept alive instead (hundreds of retained
 * external buffers make the collector run more often). The next read is started before the
 * bytes already read are scanned.
 *
 * Any line that is not plain goes through the LineReader (lineReader.ts) as text, so
 * diagnostics, quote recovery and row accounting are those of readTable: lines before and
 * including the header, lines while a quoted record is open, a field that starts with `"`, a NUL
 * byte, bytes that are not valid UTF-8 or that encode U+FFFD (checked only on lines with bytes
 * ≥ 0x80, a stretch of lines at a time with `isUtf8`), the wrong field count, an empty line, a
 * line longer than the field limit, and every line of a table whose delimiter is not a tab.
 * A UTF-8 byte order mark and CRLF line ends are handled as readTable does. gzip input is
 * decompressed into the blocks; the SHA-256 is of the bytes as stored.
 */
import { promises as fsp, createReadStream } from 'node:fs';
import { createHash } from 'node:crypto';
import { createGunzip } from 'node:zlib';
import { isUtf8 } from 'node:buffer';
import { Worker } from 'node:worker_threads';
import { InputError } from '../errors.js';
import type { RowLedger } from './ledger.js';
import { LineReader, type TableSink } from './lineReader.js';
import { checkFile, checkTextBytes, delimiterFromName, finishInfo, readHead, progressCounter, DEFAULT_MAX_FIELD, type ReadTableOptions, type TableInfo } from './readTable.js';

/** A sink that also takes plain TSV records as byte ranges. */
export interface ByteTableSink extends TableSink {
  /**
   * A plain TSV record in block `blockNo` (= buf): field k is buf[start[k]..end[k]), as many
   * fields as the header; no field starts with a quote; the bytes are valid UTF-8 with no NUL and
   * no U+FFFD; the record is no longer than the field limit. `ascii`: no byte ≥ 0x80.
   * The arrays are reused for the next record.
   */
  rowBytes(buf: Buffer, blockNo: number, start: Int32Array, end: Int32Array, line: number, ascii: boolean): void;
  /** Told once, early, about how many records the file will likely hold (to size arrays). */
  expectRecords?(records: number): void;
}

export interface ReadTsvBytesOptions extends ReadTableOptions {
  /** Where the reader appends the blocks holding the file's bytes; record ranges index into it. */
  blocks: Buffer[];
  /** Bytes asked for per read (default 1 MiB). */
  readSize?: number;
  /**
   * Block size in bytes. Default: one block for the whole file when it is not compressed, else
   * 64 MiB blocks. Small values (tests) make lines cross block ends.
   */
  blockSize?: number;
  /** Uncompressed files of at least this many bytes are hashed in a worker thread (default 64 MiB). */
  hashInThreadFrom?: number;
}

const MIB = 1 << 20;
const GROW_BLOCK = 64 * MIB;
const MAX_BLOCK = 1024 * MIB;
/** U+FFFD in UTF-8: the string path rejects a row holding it, so such lines go there. */
const REPLACEMENT = Buffer.from([0xef, 0xbf, 0xbd]);

interface ByteSource {
  /** Read up to `max` bytes into `into` at `at`; 0 at the end. */
  read(into: Buffer, at: number, max: number): Promise<number>;
  close(): Promise<void>;
}

/** SHA-256 of the bytes read, in order. */
interface Hasher {
  update(bytes: Buffer, at: number, n: number): void;
  digest(): Promise<string>;
  /** Stop (a worker is terminated); safe to call twice. */
  close(): Promise<void>;
}

function inlineHasher(): Hasher {
  const hash = createHash('sha256');
  return {
    update: (bytes, at, n) => void hash.update(bytes.subarray(at, at + n)),
    digest: async () => hash.digest('hex'),
    close: async () => {},
  };
}

/** A large uncompressed file is hashed in a worker thread, beside the scan. */
const HASH_IN_WORKER_FROM = 64 * MIB;

const HASH_WORKER = `
const { parentPort } = require('node:worker_threads');
const { createHash } = require('node:crypto');
const hash = createHash('sha256');
const buffers = [];
parentPort.on('message', (m) => {
  if (m === null) parentPort.postMessage(hash.digest('hex'));
  else if (m.buffer !== undefined) buffers[m.id] = m.buffer;
  else hash.update(new Uint8Array(buffers[m.id], m.offset, m.length));
});`;

/**
 * SHA-256 in a worker thread, over blocks backed by a SharedArrayBuffer (nothing is copied).
 * Measured: hashing 670 MB on the main thread took about 0.45 s of its 10 s of CPU; posting the
 * SharedArrayBuffer with every 1 MiB read cost more than that (0.8 s), and posting offsets per
 * read still 0.45 s, so each buffer is posted once and ranges of at least 16 MiB as offsets.
 */
function workerHasher(): Hasher {
  const worker = new Worker(HASH_WORKER, { eval: true });
  const ids = new Map<ArrayBufferLike, number>();
  // Bytes read but not yet posted: one contiguous range of one buffer.
  let pendingBuffer: ArrayBufferLike | null = null;
  let pendingOffset = 0;
  let pendingLength = 0;
  const flush = () => {
    if (pendingBuffer === null || pendingLength === 0) return;
    let id = ids.get(pendingBuffer);
    if (id === undefined) {
      id = ids.size;
      ids.set(pendingBuffer, id);
      worker.postMessage({ id, buffer: pendingBuffer });
    }
    worker.postMessage({ id, offset: pendingOffset, length: pendingLength });
    pendingLength = 0;
  };
  const result = new Promise<string>((resolve, reject) => {
    worker.once('message', resolve);
    worker.once('error', reject);
    worker.once('exit', (code) => reject(new Error(`the hashing thread stopped (exit code ${code})`)));
  });
  result.catch(() => {});
  return {
    update(bytes, at, n) {
      const offset = bytes.byteOffset + at;
      if (bytes.buffer !== pendingBuffer || offset !== pendingOffset + pendingLength) {
        flush();
        pendingBuffer = bytes.buffer;
        pendingOffset = offset;
      }
      pendingLength += n;
      if (pendingLength >= 16 * MIB) flush();
    },
    digest() {
      flush();
      worker.postMessage(null);
      return result;
    },
    async close() {
      await worker.terminate();
    },
  };
}

/** The hasher sees every byte read as stored: count them there for the progress callback. */
function counting(hasher: Hasher, count: ((n: number) => void) | undefined): Hasher {
  if (!count) return hasher;
  return { ...hasher, update: (bytes, at, n) => { hasher.update(bytes, at, n); count(n); } };
}

function plainSource(fh: fsp.FileHandle, hasher: Hasher): ByteSource {
  return {
    async read(into, at, max) {
      const { bytesRead } = await fh.read(into, at, max, null);
      if (bytesRead > 0) hasher.update(into, at, bytesRead);
      return bytesRead;
    },
    close: () => fh.close(),
  };
}

function gzipSource(path: string, hasher: Hasher): ByteSource {
  const raw = createReadStream(path, { highWaterMark: MIB });
  raw.on('data', (chunk) => hasher.update(chunk as Buffer, 0, (chunk as Buffer).length));
  const gunzip = createGunzip();
  raw.on('error', (e) => gunzip.destroy(e));
  const chunks = raw.pipe(gunzip)[Symbol.asyncIterator]() as AsyncIterator<Buffer>;
  let cur: Buffer | null = null;
  let curPos = 0;
  let first = true;
  return {
    async read(into, at, max) {
      while (cur === null || curPos >= cur.length) {
        const next = await chunks.next();
        if (next.done) return 0;
        cur = next.value;
        curPos = 0;
        if (first) {
          checkTextBytes(path, cur.subarray(0, 65536));
          first = false;
        }
      }
      const n = Math.min(max, cur.length - curPos);
      cur.copy(into, at, curPos, curPos + n);
      curPos += n;
      return n;
    },
    async close() {
      raw.destroy();
    },
  };
}

/** The first `\n` in buf[from..len), or -1 (the block past `len` holds no data yet). */
function lineEnd(buf: Buffer, from: number, len: number): number {
  if (from >= len) return -1;
  const i = buf.subarray(from, len).indexOf(10);
  return i < 0 ? -1 : from + i;
}

/** The line loop over bytes; state kept on the object, the inner loop on locals. */
class TsvScanner {
  /** Field ranges of the current record, as many as the header has fields. */
  private start = new Int32Array(0);
  private end = new Int32Array(0);
  /** True when records can be taken as bytes: header read, no quote open, tab-delimited. */
  private fast = false;
  /** Bytes from the start of the pending incomplete line known to hold no line end. */
  private noLineEnd = 0;
  /** Bytes so far of a line longer than the LineReader's lineLimit, skipped to its end (-1: none). */
  private skipped = -1;
  // A stretch of the current block whose UTF-8 was checked at once.
  private checkedBuf: Buffer | null = null;
  private checkedEnd = 0;
  private checkedOk = false;

  constructor(private readonly lr: LineReader, private readonly sink: ByteTableSink, private readonly maxField: number) {}

  /**
   * Take the lines of buf[pos..len); returns where the first incomplete line starts (len when
   * none). With `final`, the bytes up to len are the last line.
   */
  scan(buf: Buffer, blockNo: number, pos: number, len: number, final: boolean): number {
    const lr = this.lr;
    if (this.skipped >= 0) {
      // Inside a line too long to read: find its end, count it, go on after it.
      const nl = lineEnd(buf, pos, len);
      if (nl === -1) {
        this.skipped += len - pos;
        if (final) this.endSkip();
        return len;
      }
      this.skipped += nl - pos;
      this.endSkip();
      pos = nl + 1;
      if (lr.stop) return pos;
    }
    if (this.noLineEnd > 0 && !final) {
      // The line left incomplete last time: look for its end natively before scanning it again,
      // so that a long line is scanned once, not once per read.
      const nl = lineEnd(buf, pos + this.noLineEnd, len);
      if (nl === -1) {
        this.noLineEnd = len - pos;
        return this.keepOrSkip(pos, len);
      }
    }
    this.noLineEnd = 0;
    while (pos < len) {
      if (!this.fast) {
        let nl = lineEnd(buf, pos, len);
        if (nl === -1) {
          if (!final) {
            this.noLineEnd = len - pos;
            return this.keepOrSkip(pos, len);
          }
          nl = len;
        }
        this.slowLine(buf, pos, nl);
        pos = nl + 1;
        if (lr.stop) return pos;
        continue;
      }
      const start = this.start;
      const end = this.end;
      const count = start.length;
      let i = pos;
      let n = 0;
      let quote = buf[pos] === 34;
      let nul = false;
      let high = 0;
      start[0] = pos;
      for (; i < len; i++) {
        const b = buf[i];
        if (b < 14) {
          if (b === 10) break;
          if (b === 9) {
            if (n < count) end[n] = i;
            n++;
            if (n < count) start[n] = i + 1;
            if (i + 1 < len && buf[i + 1] === 34) quote = true;
          } else if (b === 0) nul = true;
        } else high |= b;
      }
      if (i === len && !final) {
        this.noLineEnd = len - pos;
        return this.keepOrSkip(pos, len);
      }
      let e = i;
      if (e > pos && buf[e - 1] === 13) e--;
      if (n < count) end[n] = e;
      n++;
      if (!quote && !nul && n === count && e > pos && e - pos <= this.maxField && (high < 0x80 || this.utf8Plain(buf, pos, e, len))) {
        this.sink.rowBytes(buf, blockNo, start, end, lr.takeRecord(), high < 0x80);
      } else this.slowLine(buf, pos, i);
      pos = i + 1;
      if (lr.stop) return pos;
    }
    return pos;
  }

  /**
   * The incomplete line from `pos` is kept for the next read (returns pos) unless it is already
   * longer than the LineReader's lineLimit: then its bytes are skipped (returns len).
   */
  private keepOrSkip(pos: number, len: number): number {
    if (len - pos <= this.lr.lineLimit) return pos;
    this.noLineEnd = 0;
    this.skipped = len - pos;
    return len;
  }

  /** Count the line being skipped, if any (at its line end, or at the end of the input). */
  endSkip(): void {
    if (this.skipped < 0) return;
    const bytes = this.skipped;
    this.skipped = -1;
    this.lr.longLine(bytes);
  }

  /** One line through the LineReader, as text (its `\r`, if any, included). */
  private slowLine(buf: Buffer, s: number, e: number): void {
    const lr = this.lr;
    const hadHeader = lr.headerCount >= 0;
    if (e - s > lr.lineLimit) lr.longLine(e - s);
    else lr.line(buf.toString('utf8', s, e));
    if (!hadHeader && lr.headerCount >= 0) {
      this.start = new Int32Array(lr.headerCount);
      this.end = new Int32Array(lr.headerCount);
    }
    this.fast = lr.headerCount >= 0 && !lr.pending && lr.delimiter === '\t';
  }

  /**
   * Is buf[s..e) valid UTF-8 without U+FFFD? Checks the whole stretch of complete lines from s
   * at once (a stretch is valid exactly when each of its lines is, as no sequence spans `\n`)
   * and only line by line within a stretch that failed.
   */
  private utf8Plain(buf: Buffer, s: number, e: number, len: number): boolean {
    if (buf !== this.checkedBuf || e > this.checkedEnd) {
      const last = buf.lastIndexOf(10, len - 1);
      const stretchEnd = last >= e ? last : e;
      const stretch = buf.subarray(s, stretchEnd);
      this.checkedBuf = buf;
      this.checkedEnd = stretchEnd;
      this.checkedOk = isUtf8(stretch) && stretch.indexOf(REPLACEMENT) === -1;
    }
    if (this.checkedOk) return true;
    const line = buf.subarray(s, e);
    return isUtf8(line) && line.indexOf(REPLACEMENT) === -1;
  }
}

/**
 * Read a table from `path` as bytes: `sink.header` once, `sink.rowBytes` per plain record,
 * `sink.row` per record that went through the string path. Row-level problems go to `ledger`;
 * whole-file problems throw InputError, as in readTable.
 */
export async function readTsvBytes(path: string, ledger: RowLedger, sink: ByteTableSink, options: ReadTsvBytesOptions): Promise<TableInfo> {
  await checkFile(path);
  const head = await readHead(path, 65536);
  const compressed = head.length >= 2 && head[0] === 0x1f && head[1] === 0x8b;
  const maxField = options.maxFieldLength ?? DEFAULT_MAX_FIELD;
  const lr = new LineReader(ledger, sink, {
    delimiter: options.delimiter ?? delimiterFromName(path),
    metadata: options.metadata,
    maxFieldLength: maxField,
    maxRecords: options.maxRecords ?? Infinity,
  });
  const scanner = new TsvScanner(lr, sink, maxField);
  const blocks = options.blocks;
  const readSize = Math.max(1, options.readSize ?? MIB);

  if (!compressed) checkTextBytes(path, head);
  const fileSize = (await fsp.stat(path)).size;
  const nextSize = options.blockSize ?? GROW_BLOCK;
  const firstSize = options.blockSize ?? (compressed ? Math.min(GROW_BLOCK, Math.max(1 << 16, fileSize * 4)) : Math.min(MAX_BLOCK, fileSize + 1));
  const shared = !compressed && fileSize >= (options.hashInThreadFrom ?? HASH_IN_WORKER_FROM);
  const hasher = counting(shared ? workerHasher() : inlineHasher(), progressCounter(fileSize, options.onProgress));
  try {
    const allocBlock = (size: number) => (shared ? Buffer.from(new SharedArrayBuffer(size)) : Buffer.allocUnsafeSlow(size));
    const source = compressed ? gzipSource(path, hasher) : plainSource(await fsp.open(path, 'r'), hasher);
    await readBlocks(path, lr, scanner, sink, source, { blocks, readSize, firstSize, nextSize, fileSize, compressed, allocBlock });
    return finishInfo(path, lr, await hasher.digest(), compressed);
  } finally {
    await hasher.close();
  }
}

interface BlockOptions {
  blocks: Buffer[];
  readSize: number;
  firstSize: number;
  nextSize: number;
  fileSize: number;
  compressed: boolean;
  allocBlock(size: number): Buffer;
}

/** Read `source` into blocks and scan each stretch as it arrives; ends the LineReader's input. */
async function readBlocks(path: string, lr: LineReader, scanner: TsvScanner, sink: ByteTableSink, source: ByteSource, o: BlockOptions): Promise<void> {
  const { blocks, readSize, firstSize, nextSize, fileSize, compressed, allocBlock } = o;
  let block = allocBlock(Math.max(1, firstSize));
  let blockNo = blocks.push(block) - 1;
  let filled = 0;
  let pos = 0;
  let estimated = false;
  let bomChecked = false;
  let ahead: Promise<number> | null = null;
  try {
    for (;;) {
      if (filled === block.length) {
        // Block full: the incomplete line at its end moves to a fresh block.
        const tail = filled - pos;
        const next = allocBlock(Math.max(nextSize, tail * 2));
        block.copy(next, 0, pos, filled);
        block = next;
        // A block that held nothing but this line is referenced by no record: reuse its slot.
        if (pos === 0) blocks[blockNo] = block;
        else blockNo = blocks.push(block) - 1;
        filled = tail;
        pos = 0;
      }
      const n = await (ahead ?? source.read(block, filled, Math.min(readSize, block.length - filled)));
      ahead = null;
      if (n === 0) break;
      filled += n;
      if (!bomChecked) {
        // A UTF-8 byte order mark at the very start is not part of the first line.
        if (filled < 3) continue;
        bomChecked = true;
        if (block[0] === 0xef && block[1] === 0xbb && block[2] === 0xbf) pos = 3;
      }
      // Read the next bytes (into the free part of the block) while these are scanned.
      if (filled < block.length) ahead = source.read(block, filled, Math.min(readSize, block.length - filled));
      pos = scanner.scan(block, blockNo, pos, filled, false);
      if (lr.stop) break;
      if (!estimated && blockNo === 0 && lr.lineNo >= 1000) {
        // Records expected from the bytes per line so far (plain files, whose size is known).
        estimated = true;
        if (!compressed && sink.expectRecords) sink.expectRecords(Math.ceil((fileSize / pos) * lr.lineNo * 1.05) + 1024);
      }
    }
  } catch (err) {
    if (err instanceof InputError) throw err;
    const e = err as NodeJS.ErrnoException;
    throw new InputError('file_unreadable', `cannot read the file: ${e.message}`, {
      location: { file: path, line: lr.lineNo + 1 },
      fix: compressed ? 'the gzip data is damaged or truncated; download the file again' : 'check the file and its permissions',
    });
  } finally {
    if (ahead !== null) await ahead.catch(() => 0);
    await source.close();
  }
  if (!lr.stop) {
    if (pos < filled) scanner.scan(block, blockNo, pos, filled, true);
    scanner.endSkip();
    lr.end();
  }
  // Give back the unused end of a mostly empty last block (records only point below `filled`).
  if (block.length > 1 << 16 && filled < block.length / 2) blocks[blockNo] = Buffer.from(block.subarray(0, filled));
}
