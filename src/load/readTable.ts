/**
 * readTable: stream one delimited table (CSV or TSV, optionally gzip) row by row.
 *
 * The stream is decoded to text, cut into lines with `indexOf`, and each line is given to the
 * LineReader (lineReader.ts), which does the quoting (RFC 4180, csv-parse for quoted records),
 * the checks and the accounting. This is the reader for CSV and for the small tables (mappings,
 * hierarchy, history); release tables in TSV go through readTsvBytes, which reads bytes and
 * falls back to the same LineReader for any line that is not plain.
 *
 * Nothing is lost: every physical line is a header, a metadata line, a blank line, or part of
 * exactly one record; each record is read once and either passed to the sink or rejected on
 * the ledger with file, line and column.
 */
import { createReadStream, promises as fsp } from 'node:fs';
import { createHash } from 'node:crypto';
import { createGunzip } from 'node:zlib';
import { StringDecoder } from 'node:string_decoder';
import { basename } from 'node:path';
import { InputError } from '../errors.js';
import type { RowLedger } from './ledger.js';
import { LineReader, type Delimiter, type TableSink } from './lineReader.js';

export type { Delimiter, TableSink } from './lineReader.js';

export interface ReadTableOptions {
  /** Force a delimiter; otherwise by extension (.csv, .tsv/.tab), else sniffed from the header. */
  delimiter?: Delimiter;
  /** Accept a `#`-prefixed metadata block before the header (SSSOM). */
  metadata?: boolean;
  /** Longest field accepted, in characters (default 65,536). */
  maxFieldLength?: number;
  /** Stop after this many records (for sniffing). */
  maxRecords?: number;
  /**
   * Told how many bytes of the file (as stored: compressed bytes for .gz) have been read, out of
   * its size: at most once per MiB, and once at the end (the CLI's progress bar, cli/progress.ts).
   */
  onProgress?: ProgressCallback;
}

export type ProgressCallback = (bytesRead: number, fileSize: number) => void;

/** A counter of bytes read that calls `onProgress` each time another MiB has come in. */
export function progressCounter(fileSize: number, onProgress: ProgressCallback | undefined): ((n: number) => void) | undefined {
  if (!onProgress) return undefined;
  let read = 0;
  let next = 1 << 20;
  return (n) => {
    read += n;
    if (read >= next || read >= fileSize) {
      next = read + (1 << 20);
      onProgress(read, fileSize);
    }
  };
}

export interface TableInfo {
  sha256: string;
  delimiter: Delimiter;
  compressed: boolean;
  metadataLines: string[];
  headerLine: number;
  headerFields: string[];
  lines: number;
}

export const DEFAULT_MAX_FIELD = 1 << 16;

/** Delimiter from the file name, ignoring a trailing .gz; undefined when the name does not say. */
export function delimiterFromName(path: string): Delimiter | undefined {
  const name = basename(path).toLowerCase().replace(/\.gz$/, '');
  if (name.endsWith('.csv')) return ',';
  if (name.endsWith('.tsv') || name.endsWith('.tab')) return '\t';
  return undefined;
}

/** Check that `path` names a readable regular file; throws InputError otherwise. */
export async function checkFile(path: string): Promise<void> {
  let stat;
  try {
    stat = await fsp.stat(path);
  } catch {
    throw new InputError('file_not_found', `no such file: ${path}`, { location: { file: path }, fix: 'check the path' });
  }
  if (!stat.isFile()) {
    throw new InputError('not_a_file', `not a regular file: ${path}`, { location: { file: path }, fix: 'give the path of a CSV or TSV file' });
  }
}

export async function readHead(path: string, n: number): Promise<Buffer> {
  const fh = await fsp.open(path, 'r');
  try {
    const buf = Buffer.alloc(n);
    const { bytesRead } = await fh.read(buf, 0, n, 0);
    return buf.subarray(0, bytesRead);
  } finally {
    await fh.close();
  }
}

/** Reject binary and UTF-16 input from its first bytes (after decompression). */
export function checkTextBytes(path: string, head: Buffer): void {
  if (head.length >= 2 && ((head[0] === 0xff && head[1] === 0xfe) || (head[0] === 0xfe && head[1] === 0xff))) {
    throw new InputError('encoding', 'the file is UTF-16 (it starts with a UTF-16 byte order mark); termdrift reads UTF-8', {
      location: { file: path, line: 1, column: 1 },
      fix: 'convert it, e.g. `iconv -f UTF-16 -t UTF-8 IN > OUT`',
    });
  }
  const n = Math.min(head.length, 65536);
  let nul = 0;
  let evenNul = 0;
  let oddNul = 0;
  let control = 0;
  for (let i = 0; i < n; i++) {
    const b = head[i];
    if (b === 0) {
      nul++;
      if (i % 2 === 0) evenNul++;
      else oddNul++;
    } else if (b < 9 || (b > 13 && b < 32 && b !== 27)) control++;
  }
  if (n >= 8 && nul > n / 8 && (evenNul > nul * 0.9 || oddNul > nul * 0.9)) {
    throw new InputError('encoding', 'the file looks like UTF-16 without a byte order mark (every other byte is NUL); termdrift reads UTF-8', {
      location: { file: path, line: 1, column: 1 },
      fix: 'convert it, e.g. `iconv -f UTF-16LE -t UTF-8 IN > OUT`',
    });
  }
  if (n > 0 && (nul + control) / n > 0.05) {
    throw new InputError('binary_file', `the file looks binary (${nul + control} control bytes in the first ${n}), not a CSV or TSV table`, {
      location: { file: path, line: 1, column: 1 },
      fix: 'give a UTF-8 text table; unpack archives first (gzip alone is read directly)',
    });
  }
}

/**
 * Read a table from `path`, calling `sink.header` once and `sink.row` per good record.
 * Row-level problems go to `ledger`; whole-file problems throw InputError.
 */
export async function readTable(path: string, ledger: RowLedger, sink: TableSink, options: ReadTableOptions = {}): Promise<TableInfo> {
  await checkFile(path);
  const head = await readHead(path, 65536);
  const compressed = head.length >= 2 && head[0] === 0x1f && head[1] === 0x8b;
  const maxField = options.maxFieldLength ?? DEFAULT_MAX_FIELD;
  const maxRecords = options.maxRecords ?? Infinity;

  const hash = createHash('sha256');
  const raw = createReadStream(path, { highWaterMark: 1 << 20 });
  const counted = progressCounter(options.onProgress ? (await fsp.stat(path)).size : 0, options.onProgress);
  raw.on('data', (chunk) => {
    hash.update(chunk as Buffer);
    counted?.((chunk as Buffer).length);
  });
  let source: NodeJS.ReadableStream = raw;
  if (compressed) {
    const gunzip = createGunzip();
    raw.on('error', (e) => gunzip.destroy(e));
    source = raw.pipe(gunzip);
  }

  const lr = new LineReader(ledger, sink, { delimiter: options.delimiter ?? delimiterFromName(path), metadata: options.metadata, maxFieldLength: maxField, maxRecords });
  let firstChunk = true;

  const decoder = new StringDecoder('utf8');
  let carry = '';
  // Bytes of a line longer than lr.lineLimit, being skipped to its end (-1: none).
  let skipped = -1;
  /** UTF-8 length of s[from..to) when it may exceed the line limit, else 0 (no count made). */
  const longBytes = (s: string, from: number, to: number): number => {
    const limit = lr.lineLimit;
    if ((to - from) * 3 <= limit) return 0;
    const bytes = Buffer.byteLength(to - from === s.length ? s : s.slice(from, to), 'utf8');
    return bytes > limit ? bytes : 0;
  };
  const consume = (text: string): void => {
    if (firstChunk) {
      firstChunk = false;
      if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
    }
    let pos = 0;
    if (skipped >= 0) {
      const nl = text.indexOf('\n');
      if (nl === -1) {
        skipped += Buffer.byteLength(text, 'utf8');
        return;
      }
      lr.longLine(skipped + Buffer.byteLength(text.slice(0, nl), 'utf8'));
      skipped = -1;
      pos = nl + 1;
      if (lr.stop) return;
    }
    let s = carry.length > 0 ? carry + text : text;
    let nl = s.indexOf('\n', pos);
    while (nl !== -1 && !lr.stop) {
      const long = longBytes(s, pos, nl);
      if (long > 0) lr.longLine(long);
      else lr.line(s.slice(pos, nl));
      pos = nl + 1;
      nl = s.indexOf('\n', pos);
    }
    carry = lr.stop ? '' : s.slice(pos);
    s = '';
    const long = longBytes(carry, 0, carry.length);
    if (long > 0) {
      // No line end yet and already too long: skip to the line end instead of keeping it.
      skipped = long;
      carry = '';
    }
  };

  let decompressedHeadChecked = !compressed;
  if (!compressed) checkTextBytes(path, head);
  try {
    for await (const chunk of source as AsyncIterable<Buffer>) {
      if (!decompressedHeadChecked) {
        checkTextBytes(path, chunk.subarray(0, 65536));
        decompressedHeadChecked = true;
      }
      consume(decoder.write(chunk));
      if (lr.stop) break;
    }
  } catch (err) {
    if (err instanceof InputError) throw err;
    const e = err as NodeJS.ErrnoException;
    throw new InputError('file_unreadable', `cannot read the file: ${e.message}`, {
      location: { file: path, line: lr.lineNo + 1 },
      fix: compressed ? 'the gzip data is damaged or truncated; download the file again' : 'check the file and its permissions',
    });
  } finally {
    raw.destroy();
  }
  if (!lr.stop) {
    consume(decoder.end());
    if (skipped >= 0) lr.longLine(skipped);
    else if (carry.length > 0) {
      const last = carry;
      carry = '';
      lr.line(last);
    }
    lr.end();
  }
  return finishInfo(path, lr, hash.digest('hex'), compressed);
}

/** The TableInfo of a finished read; throws when the file had no header. */
export function finishInfo(path: string, lr: LineReader, sha256: string, compressed: boolean): TableInfo {
  if (lr.headerCount < 0) {
    throw new InputError('empty_file', lr.metadataLines.length ? 'the file has a metadata block but no header row' : 'the file is empty: no header row', {
      location: { file: path, line: lr.lineNo + 1, column: 1 },
      fix: 'the first row must name the columns',
    });
  }
  return { sha256, delimiter: lr.delimiter!, compressed, metadataLines: lr.metadataLines, headerLine: lr.headerLine, headerFields: lr.headerFields, lines: lr.lineNo };
}
