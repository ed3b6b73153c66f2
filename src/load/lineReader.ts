/**
 * LineReader: the line-level state machine behind every table reader.
 *
 * It is fed one physical line at a time (the text between two `\n`, a trailing `\r` included)
 * and decides what the line is: a `#` metadata line, a blank line, the header, a record, or part
 * of a quoted record that spans lines. Records are checked (NUL, invalid UTF-8 shown as U+FFFD,
 * field length, field count) and passed to the sink or rejected on the ledger with line and
 * column. Quoting follows RFC 4180: a line whose fields contain no `"` is split directly; a
 * record that uses quotes is handed to csv-parse, the reference parser for quoted CSV. In TSV a
 * quote counts as quoting only when a field starts with it; elsewhere it is a literal character,
 * as is common in terminology exports. A quote that never closes, or that spans lines and is not
 * closed where a field ends, rejects its first line and the lines after it are read again as rows
 * of their own.
 *
 * readTable (strings decoded from a stream) and readTsvBytes (its fallback for lines that are not
 * plain) both drive this one machine, so diagnostics and row accounting do not depend on the path.
 */
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

export interface LineReaderOptions {
  /** The delimiter if known; otherwise sniffed from the header line. */
  delimiter?: Delimiter;
  /** Accept a `#`-prefixed metadata block before the header (SSSOM). */
  metadata?: boolean;
  /** Longest field accepted, in characters. */
  maxFieldLength: number;
  /** Stop after this many records. */
  maxRecords: number;
}

/** A quoted record may span at most this many lines before its quote is judged unbalanced. */
export const MAX_RECORD_LINES = 100;
export const MAX_RECORD_CHARS = 1 << 20;

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

/**
 * Parse one quoted record with csv-parse; `error` (and maybe `column`) when csv-parse rejects it.
 * `strict`: a quote inside an unquoted field, or a closing quote not followed by the delimiter or
 * the end of the record, is an error (csv-parse without relax_quotes), not a literal character.
 */
function parseQuoted(text: string, delimiter: Delimiter, strict = false): { fields?: string[]; error?: string; column?: number } {
  try {
    const records = parseCsvSync(text, { delimiter, relax_column_count: true, relax_quotes: !strict, record_delimiter: ['\n'] }) as string[][];
    if (records.length !== 1) return { error: `the quotes make ${records.length} records of this line` };
    return { fields: records[0] };
  } catch (err) {
    const e = err as { message?: string; column?: number };
    return { error: (e.message ?? String(err)).replace(/^[A-Za-z ]+:\s*/, ''), column: typeof e.column === 'number' ? e.column + 1 : undefined };
  }
}

export class LineReader {
  /** Physical lines seen so far; the number of the last line given to `line()`. */
  lineNo = 0;
  /** Records read (passed or rejected). */
  records = 0;
  /** Set when `maxRecords` records have been read; the caller stops feeding lines. */
  stop = false;
  delimiter: Delimiter | undefined;
  readonly metadataLines: string[] = [];
  headerFields: string[] = [];
  /** Field count of the header; -1 until the header is read. */
  headerCount = -1;
  headerLine = 0;

  private readonly ledger: RowLedger;
  private readonly sink: TableSink;
  private readonly options: LineReaderOptions;
  // A record whose quote is still open: its text so far, its first line, and its lines.
  private pendingText: string | null = null;
  private pendingLine = 0;
  private pendingLines: string[] = [];

  constructor(ledger: RowLedger, sink: TableSink, options: LineReaderOptions) {
    this.ledger = ledger;
    this.sink = sink;
    this.options = options;
    this.delimiter = options.delimiter;
  }

  /** True while a quoted record is open: the next lines belong to it. */
  get pending(): boolean {
    return this.pendingText !== null;
  }

  /** One physical line without its `\n` (a trailing `\r` is removed here). */
  line(rawLine: string): void {
    this.lineNo++;
    const line = rawLine.charCodeAt(rawLine.length - 1) === 13 ? rawLine.slice(0, -1) : rawLine;
    if (this.pendingText !== null) {
      this.pendingLines.push(line);
      this.pendingText += '\n' + line;
      if ((countQuotes(line) & 1) === 1) {
        const text = this.pendingText;
        // A record spanning lines is taken only when its quoting is well-formed (RFC 4180): an
        // odd quote in the middle of a later field is a literal character, not the end of the
        // quote opened above. Taken as the end, it would swallow the rows in between into one
        // field; instead the first line is rejected and the lines after it are read again.
        const strict = parseQuoted(text, this.delimiter!, true);
        if (strict.error !== undefined) {
          this.rejectAndReread(`the quoted field opened on this line is malformed by line ${this.lineNo} (a quote inside a field that is not quoted, or a closing quote not followed by the delimiter); the lines after this one are read as rows of their own`);
          return;
        }
        this.pendingText = null;
        this.finishQuoted(text, this.pendingLine);
      } else if (this.pendingLines.length >= MAX_RECORD_LINES || this.pendingText.length > MAX_RECORD_CHARS) {
        this.abandonPending();
      }
      return;
    }
    if (this.headerCount < 0) {
      if (this.options.metadata && line.charCodeAt(0) === 35 /* # */) {
        this.metadataLines.push(line);
        return;
      }
      if (line.trim() === '') {
        this.ledger.blankLines++;
        return;
      }
      this.handleHeader(line);
      return;
    }
    if (line === '') {
      this.ledger.blankLines++;
      return;
    }
    this.handleRecordLine(line, false);
  }

  /**
   * Longest physical line, in UTF-8 bytes (its `\r` included), that is read as text. A longer
   * line cannot be a good record — it has more characters than the header's fields can hold at
   * the field limit (UTF-8 takes at most 4 bytes a character), or than a quoted record may —
   * so the readers skip its bytes and count it with `longLine` instead of making a string of
   * it: a line of hundreds of megabytes (a file without line breaks) would otherwise take time
   * quadratic in its length to cut and end in an exception for a string too long.
   */
  get lineLimit(): number {
    const fields = this.headerCount < 0 ? 1 : this.headerCount;
    return 4 * Math.max(MAX_RECORD_CHARS, fields * (this.options.maxFieldLength + 1));
  }

  /**
   * One physical line longer than `lineLimit` (`bytes` long), not given as text: it is counted
   * and rejected. Before the header, the file is not a table: an InputError.
   */
  longLine(bytes: number): void {
    this.lineNo++;
    const limit = this.lineLimit;
    if (this.pendingText !== null) this.abandonPending();
    if (this.headerCount < 0) {
      throw new InputError('input_too_large', `line ${this.lineNo} is ${bytes} bytes long without a line break, before any header row; this is not a CSV or TSV table`, {
        location: { file: this.ledger.file, line: this.lineNo, column: 1 },
        fix: 'give a table with one row per line and a header row first',
      });
    }
    this.ledger.read++;
    if (++this.records >= this.options.maxRecords) this.stop = true;
    this.ledger.reject(this.lineNo, 1, 'field_too_long', `the line is ${bytes} bytes long, more than a record of ${this.headerCount} fields of at most ${this.options.maxFieldLength} characters can be (${limit} bytes); it was skipped unread`,
      'check the file for a missing line break or an unclosed quote');
  }

  /** The input ended: a quote still open is judged unbalanced. Not called after `stop`. */
  end(): void {
    if (this.pendingText !== null) this.abandonPending();
  }

  /**
   * Count one record that a faster reader checked itself (same checks as `line()` makes on a
   * line without quotes): advances the line number and the counts; returns the line number.
   */
  takeRecord(): number {
    this.ledger.read++;
    if (++this.records >= this.options.maxRecords) this.stop = true;
    return ++this.lineNo;
  }

  private emit(fields: string[], line: number): void {
    this.ledger.read++;
    this.records++;
    if (this.records >= this.options.maxRecords) this.stop = true;
    const headerCount = this.headerCount;
    if (fields.length !== headerCount) {
      const column = fields.length < headerCount ? fields.length + 1 : headerCount + 1;
      this.ledger.reject(line, column, 'field_count', `expected ${headerCount} fields as in the header (line ${this.headerLine}), got ${fields.length}`,
        fields.length < headerCount ? 'add the missing fields (empty ones are allowed) or remove a stray delimiter' : 'quote values that contain the delimiter, or remove the extra fields');
      return;
    }
    this.sink.row(fields, line);
  }

  /** Checks on the whole record text; returns false (and rejects) on a problem. */
  private checkChars(text: string, line: number): boolean {
    const maxField = this.options.maxFieldLength;
    const nul = text.indexOf('\0');
    const bad = text.indexOf('\uFFFD');
    if (nul === -1 && bad === -1 && text.length <= maxField) return true;
    const fieldsOf = text.split(this.delimiter!);
    const col = (pred: (f: string) => boolean) => Math.max(1, fieldsOf.findIndex(pred) + 1);
    this.ledger.read++;
    this.records++;
    if (nul !== -1) {
      this.ledger.reject(line, col((f) => f.includes('\0')), 'nul_byte', 'the row contains a NUL byte', 'remove NUL bytes; the file may be binary or UTF-16');
      return false;
    }
    if (bad !== -1) {
      this.ledger.reject(line, col((f) => f.includes('\uFFFD')), 'invalid_utf8', 'the row contains bytes that are not valid UTF-8 (shown as U+FFFD)', 'convert the file to UTF-8 (e.g. from Windows-1252 with iconv)');
      return false;
    }
    const long = fieldsOf.findIndex((f) => f.length > maxField);
    if (long === -1) {
      // The line is long but each field fits: undo the count and go on.
      this.ledger.read--;
      this.records--;
      return true;
    }
    this.ledger.reject(line, long + 1, 'field_too_long', `a field of ${fieldsOf[long].length} characters exceeds the limit of ${maxField}`, 'check the file for a missing line break or an unclosed quote');
    return false;
  }

  private handleHeader(line: string): void {
    if (this.delimiter === undefined) this.delimiter = line.split('\t').length >= line.split(',').length ? '\t' : ',';
    const delimiter = this.delimiter;
    let fields: string[];
    if (line.indexOf('"') === -1) fields = line.split(delimiter);
    else {
      const parsed = parseQuoted(line, delimiter);
      fields = parsed.fields ?? line.split(delimiter);
    }
    this.headerFields = fields.map((f) => f.trim());
    this.headerCount = fields.length;
    this.headerLine = this.lineNo;
    this.sink.header(this.headerFields, this.lineNo, this.metadataLines);
  }

  private handleRecordLine(line: string, literalQuotes: boolean): void {
    const d = this.delimiter!;
    const quoted = !literalQuotes && line.indexOf('"') !== -1 && (d === ',' || tsvUsesQuotes(line));
    if (!quoted) {
      if (!this.checkChars(line, this.lineNo)) return;
      this.emit(line.split(d), this.lineNo);
      return;
    }
    if ((countQuotes(line) & 1) === 1) {
      this.pendingText = line;
      this.pendingLine = this.lineNo;
      this.pendingLines = [line];
      return;
    }
    this.finishQuoted(line, this.lineNo);
  }

  private finishQuoted(text: string, line: number): void {
    if (!this.checkChars(text, line)) return;
    const parsed = parseQuoted(text, this.delimiter!);
    if (parsed.fields) {
      this.emit(parsed.fields, line);
      return;
    }
    if (this.delimiter === '\t' && text.indexOf('\n') === -1) {
      // In TSV an odd quote is most often a literal character.
      this.emit(text.split('\t'), line);
      return;
    }
    this.ledger.read++;
    this.records++;
    this.ledger.reject(line, parsed.column ?? 1, 'unbalanced_quote', `the quoting of this row is malformed: ${parsed.error}`, 'double every quote inside a quoted field ("") and close each quoted field');
  }

  /** The pending quote never closed: reject its first line, read the rest again as rows. */
  private abandonPending(): void {
    this.rejectAndReread(`a quote opened on this line is not closed within ${Math.min(this.pendingLines.length, MAX_RECORD_LINES)} lines`);
  }

  /** Reject the first line of the pending record and read its other lines again as rows. */
  private rejectAndReread(message: string): void {
    const lines = this.pendingLines;
    const start = this.pendingLine;
    this.pendingText = null;
    this.ledger.read++;
    this.records++;
    this.ledger.reject(start, 1, 'unbalanced_quote', message, 'close the quoted field or double the quote ("") if it is part of the value');
    const saved = this.lineNo;
    for (let k = 1; k < lines.length; k++) {
      this.lineNo = start + k;
      if (lines[k] === '') this.ledger.blankLines++;
      else this.handleRecordLine(lines[k], true);
    }
    this.lineNo = saved;
  }
}
