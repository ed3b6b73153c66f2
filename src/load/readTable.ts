/**
 * readTable: stream one delimited table (CSV or TSV, optionally gzip) row by row.
 *
 * Hot path. Loading multi-million-row releases is dominated by this loop, so it works on
 * decoded string chunks with `indexOf`/`split` and allocates nothing per row beyond the
 * fields array (measured in docs/BENCHMARKS.md). Quoting follows RFC 4180: a line whose
 * fields contain no `"` is split directly (the fast path); a record that uses quotes is
 * handed to csv-parse, which is the reference parser for quoted CSV. In TSV a quote counts
 * as quoting only when a field starts with it; elsewhere it is a literal character, as is
 * common in terminology exports.
 *
 * Nothing is lost: every physical line is a header, a metadata line, a blank line, or part of
 * exactly one record; each record is read once and either passed to the sink or rejected on
 * the ledger with file, line and column. A quote that never closes rejects its first line and
 * the lines after it are read again as rows of their own.
 */
import { createReadStream, promises as fsp } from 'node:fs';
import { createHash } from 'node:crypto';
import { createGunzip } from 'node:zlib';
import { StringDecoder } from 'node:string_decoder';
import { basename } from 'node:path';
import { parse as parseCsvSync } from 'csv-parse/sync';
import { InputError } from '../errors.js';
import type { RowLedger } from './ledger.js';

/** What the reader tells the consumer. */
export interface TableSink {
  /**
   * Called once with the header's fields and any `#` metadata lines before it;
   * may throw an InputError for a bad header.
   */
  header(fields: string[], line: number, metadataLines: string[]): void;
  /** Called for every record whose fields passed the reader's checks. */
  row(fields: string[], line: number): void;
}

export type Delimiter = '\t' | ',';

export interface ReadTableOptions {
  /** Force a delimiter; otherwise by extension (.csv, .tsv/.tab), else sniffed from the header. */
  delimiter?: Delimiter;
  /** Accept a `#`-prefixed metadata block before the header (SSSOM). */
  metadata?: boolean;
  /** Longest field accepted, in characters (default 65,536). */
  maxFieldLength?: number;
  /** Stop after this many records (for sniffing). */
  maxRecords?: number;
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

/** A quoted record may span at most this many lines before its quote is judged unbalanced. */
const MAX_RECORD_LINES = 100;
const MAX_RECORD_CHARS = 1 << 20;
const DEFAULT_MAX_FIELD = 1 << 16;

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

async function readHead(path: string, n: number): Promise<Buffer> {
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
function checkTextBytes(path: string, head: Buffer): void {
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

/** Does some field of this TSV line start with a quote? */
function tsvUsesQuotes(line: string): boolean {
  if (line.charCodeAt(0) === 34) return true;
  return line.indexOf('\t"') !== -1;
}

function countQuotes(s: string): number {
  let n = 0;
  let i = s.indexOf('"');
  while (i !== -1) {
    n++;
    i = s.indexOf('"', i + 1);
  }
  return n;
}

/** Parse one quoted record with csv-parse; undefined if csv-parse rejects it. */
function parseQuoted(text: string, delimiter: Delimiter): { fields?: string[]; error?: string; column?: number } {
  try {
    const records = parseCsvSync(text, { delimiter, relax_column_count: true, relax_quotes: true, record_delimiter: ['\n'] }) as string[][];
    if (records.length !== 1) return { error: `the quotes make ${records.length} records of this line` };
    return { fields: records[0] };
  } catch (err) {
    const e = err as { message?: string; column?: number };
    return { error: (e.message ?? String(err)).replace(/^[A-Za-z ]+:\s*/, ''), column: typeof e.column === 'number' ? e.column + 1 : undefined };
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
  raw.on('data', (chunk) => hash.update(chunk as Buffer));
  let source: NodeJS.ReadableStream = raw;
  if (compressed) {
    const gunzip = createGunzip();
    raw.on('error', (e) => gunzip.destroy(e));
    source = raw.pipe(gunzip);
  }

  let delimiter: Delimiter | undefined = options.delimiter ?? delimiterFromName(path);
  const metadataLines: string[] = [];
  let headerFields: string[] = [];
  let headerCount = -1;
  let headerLine = 0;
  let lineNo = 0;
  let records = 0;
  let stop = false;
  let firstChunk = true;

  // A record whose quote is still open: its text so far, its first line, and its lines.
  let pending: string | null = null;
  let pendingLine = 0;
  let pendingLines: string[] = [];

  const emit = (fields: string[], line: number): void => {
    ledger.read++;
    records++;
    if (records >= maxRecords) stop = true;
    if (fields.length !== headerCount) {
      const column = fields.length < headerCount ? fields.length + 1 : headerCount + 1;
      ledger.reject(line, column, 'field_count', `expected ${headerCount} fields as in the header (line ${headerLine}), got ${fields.length}`,
        fields.length < headerCount ? 'add the missing fields (empty ones are allowed) or remove a stray delimiter' : 'quote values that contain the delimiter, or remove the extra fields');
      return;
    }
    sink.row(fields, line);
  };

  /** Checks on the whole record text; returns false (and rejects) on a problem. */
  const checkChars = (text: string, fields: string[] | null, line: number): boolean => {
    const nul = text.indexOf('\0');
    const bad = text.indexOf('\uFFFD');
    if (nul === -1 && bad === -1 && text.length <= maxField) return true;
    const fieldsOf = fields ?? text.split(delimiter!);
    const col = (pred: (f: string) => boolean) => Math.max(1, fieldsOf.findIndex(pred) + 1);
    ledger.read++;
    records++;
    if (nul !== -1) {
      ledger.reject(line, col((f) => f.includes('\0')), 'nul_byte', 'the row contains a NUL byte', 'remove NUL bytes; the file may be binary or UTF-16');
      return false;
    }
    if (bad !== -1) {
      ledger.reject(line, col((f) => f.includes('\uFFFD')), 'invalid_utf8', 'the row contains bytes that are not valid UTF-8 (shown as U+FFFD)', 'convert the file to UTF-8 (e.g. from Windows-1252 with iconv)');
      return false;
    }
    const long = fieldsOf.findIndex((f) => f.length > maxField);
    if (long === -1) {
      // The line is long but each field fits: undo the count and go on.
      ledger.read--;
      records--;
      return true;
    }
    ledger.reject(line, long + 1, 'field_too_long', `a field of ${fieldsOf[long].length} characters exceeds the limit of ${maxField}`, 'check the file for a missing line break or an unclosed quote');
    return false;
  };

  const handleHeader = (line: string): void => {
    if (delimiter === undefined) delimiter = line.split('\t').length >= line.split(',').length ? '\t' : ',';
    let fields: string[];
    if (line.indexOf('"') === -1) fields = line.split(delimiter);
    else {
      const parsed = parseQuoted(line, delimiter);
      fields = parsed.fields ?? line.split(delimiter);
    }
    headerFields = fields.map((f) => f.trim());
    headerCount = fields.length;
    headerLine = lineNo;
    sink.header(headerFields, lineNo, metadataLines);
  };

  const handleRecordLine = (line: string, literalQuotes: boolean): void => {
    const d = delimiter!;
    const quoted = !literalQuotes && line.indexOf('"') !== -1 && (d === ',' || tsvUsesQuotes(line));
    if (!quoted) {
      if (!checkChars(line, null, lineNo)) return;
      emit(line.split(d), lineNo);
      return;
    }
    if ((countQuotes(line) & 1) === 1) {
      pending = line;
      pendingLine = lineNo;
      pendingLines = [line];
      return;
    }
    finishQuoted(line, lineNo);
  };

  const finishQuoted = (text: string, line: number): void => {
    if (!checkChars(text, null, line)) return;
    const parsed = parseQuoted(text, delimiter!);
    if (parsed.fields) {
      emit(parsed.fields, line);
      return;
    }
    if (delimiter === '\t' && text.indexOf('\n') === -1) {
      // In TSV an odd quote is most often a literal character.
      emit(text.split('\t'), line);
      return;
    }
    ledger.read++;
    records++;
    ledger.reject(line, parsed.column ?? 1, 'unbalanced_quote', `the quoting of this row is malformed: ${parsed.error}`, 'double every quote inside a quoted field ("") and close each quoted field');
  };

  /** The pending quote never closed: reject its first line, read the rest again as rows. */
  const abandonPending = (): void => {
    const lines = pendingLines;
    const start = pendingLine;
    pending = null;
    ledger.read++;
    records++;
    ledger.reject(start, 1, 'unbalanced_quote', `a quote opened on this line is not closed within ${Math.min(lines.length, MAX_RECORD_LINES)} lines`, 'close the quoted field or double the quote ("") if it is part of the value');
    const saved = lineNo;
    for (let k = 1; k < lines.length; k++) {
      lineNo = start + k;
      if (lines[k] === '') ledger.blankLines++;
      else handleRecordLine(lines[k], true);
    }
    lineNo = saved;
  };

  const handleLine = (rawLine: string): void => {
    lineNo++;
    const line = rawLine.charCodeAt(rawLine.length - 1) === 13 ? rawLine.slice(0, -1) : rawLine;
    if (pending !== null) {
      pendingLines.push(line);
      pending += '\n' + line;
      if ((countQuotes(line) & 1) === 1) {
        const text = pending;
        pending = null;
        finishQuoted(text, pendingLine);
      } else if (pendingLines.length >= MAX_RECORD_LINES || pending.length > MAX_RECORD_CHARS) {
        abandonPending();
      }
      return;
    }
    if (headerCount < 0) {
      if (options.metadata && line.charCodeAt(0) === 35 /* # */) {
        metadataLines.push(line);
        return;
      }
      if (line.trim() === '') {
        ledger.blankLines++;
        return;
      }
      handleHeader(line);
      return;
    }
    if (line === '') {
      ledger.blankLines++;
      return;
    }
    handleRecordLine(line, false);
  };

  const decoder = new StringDecoder('utf8');
  let carry = '';
  const consume = (text: string): void => {
    if (firstChunk) {
      firstChunk = false;
      if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
    }
    let s = carry.length > 0 ? carry + text : text;
    let pos = 0;
    let nl = s.indexOf('\n', pos);
    while (nl !== -1 && !stop) {
      handleLine(s.slice(pos, nl));
      pos = nl + 1;
      nl = s.indexOf('\n', pos);
    }
    carry = stop ? '' : s.slice(pos);
    s = '';
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
      if (stop) break;
    }
  } catch (err) {
    if (err instanceof InputError) throw err;
    const e = err as NodeJS.ErrnoException;
    throw new InputError('file_unreadable', `cannot read the file: ${e.message}`, {
      location: { file: path, line: lineNo + 1 },
      fix: compressed ? 'the gzip data is damaged or truncated; download the file again' : 'check the file and its permissions',
    });
  } finally {
    raw.destroy();
  }
  if (!stop) {
    consume(decoder.end());
    if (carry.length > 0) {
      const last = carry;
      carry = '';
      handleLine(last);
    }
    if (pending !== null) abandonPending();
  }
  if (headerCount < 0) {
    throw new InputError('empty_file', metadataLines.length ? 'the file has a metadata block but no header row' : 'the file is empty: no header row', {
      location: { file: path, line: lineNo + 1, column: 1 },
      fix: 'the first row must name the columns',
    });
  }
  return { sha256: hash.digest('hex'), delimiter: delimiter!, compressed, metadataLines, headerLine, headerFields, lines: lineNo };
}
