/**
 * parseRecordJar: read the "record-jar" text format used by the IANA Language Subtag
 * Registry (RFC 5646, section 3.1.1).
 *
 * The grammar, from RFC 5646 section 3.1.1:
 *
 *     registry   = record *("%%" CRLF record)
 *     record     = 1*field
 *     field      = ( field-name field-sep field-body CRLF )
 *     field-name = (ALPHA / DIGIT) [*(ALPHA / DIGIT / "-") (ALPHA / DIGIT)]
 *     field-sep  = *SP ":" *SP
 *     field-body = *([[*SP CRLF] 1*SP] 1*CHARS)
 *
 * so a line that begins with white space continues the body of the field before it
 * ("folding"). We unfold by joining the pieces with one space: in the grammar the folding
 * white space only separates runs of CHARS, and the registry's own JSON derivatives carry
 * no doubled spaces. Line ends may be CRLF, LF or CR (the file is not always served with
 * CRLF). Blank lines are tolerated and counted.
 *
 * Every physical line is accounted for: lines = fieldLines + continuationLines +
 * separatorLines + blankLines + rejectedLines. A line that fits none of these is rejected
 * with a diagnostic naming file, line and column; parsing goes on with the next line.
 */
import type { ImportDiagnostic } from './types.js';

/** One unfolded field. `line`/`column` locate the field name (1-based). */
export interface JarField {
  name: string;
  value: string;
  line: number;
  column: number;
}

/** One record: its fields in file order. `line` is the line of its first field. */
export interface JarRecord {
  line: number;
  fields: JarField[];
}

export interface JarAccounting {
  lines: number;
  fieldLines: number;
  continuationLines: number;
  separatorLines: number;
  blankLines: number;
  rejectedLines: number;
}

export interface JarParse {
  records: JarRecord[];
  diagnostics: ImportDiagnostic[];
  accounting: JarAccounting;
}

const FIELD = /^([A-Za-z0-9](?:[A-Za-z0-9-]*[A-Za-z0-9])?) *: *(.*)$/;

/** Parse record-jar text. `file` names the source in diagnostics. */
export function parseRecordJar(text: string, options: { file?: string } = {}): JarParse {
  const file = options.file ?? '<text>';
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const lines = body.split(/\r\n|\n|\r/);
  // A final line end does not start another line.
  if (lines.length > 0 && lines[lines.length - 1] === '') lines.pop();

  const records: JarRecord[] = [];
  const diagnostics: ImportDiagnostic[] = [];
  const acc: JarAccounting = { lines: lines.length, fieldLines: 0, continuationLines: 0, separatorLines: 0, blankLines: 0, rejectedLines: 0 };
  let current: JarRecord | null = null;
  let last: JarField | null = null;

  const reject = (line: number, column: number, message: string, fix: string) => {
    acc.rejectedLines++;
    diagnostics.push({ file, line, column, severity: 'error', code: 'bad_value', message, fix, rejected: true });
  };

  for (let i = 0; i < lines.length; i++) {
    const raw = lines[i];
    const line = i + 1;
    if (raw.trimEnd() === '%%') {
      acc.separatorLines++;
      current = null;
      last = null;
      continue;
    }
    if (raw.trim() === '') {
      acc.blankLines++;
      continue;
    }
    const first = raw.charCodeAt(0);
    if (first === 32 || first === 9) {
      if (last === null) {
        reject(line, 1, 'continuation line (it begins with white space) with no field before it in this record', 'start the record with a "Name: value" line, or remove the leading white space');
        continue;
      }
      acc.continuationLines++;
      const piece = raw.trim();
      const head = last.value.trimEnd();
      last.value = head === '' ? piece : `${head} ${piece}`;
      continue;
    }
    const m = FIELD.exec(raw);
    if (m === null) {
      const colon = raw.indexOf(':');
      const column = colon < 0 ? raw.length + 1 : 1;
      const what = colon < 0 ? 'has no ":" after a field name' : `has a field name ${JSON.stringify(raw.slice(0, colon).trimEnd())} that is not letters, digits and inner hyphens`;
      reject(line, column, `line ${what}; expected "Name: value", a continuation line starting with white space, or "%%"`, 'fix the line, or indent it if it continues the field above');
      continue;
    }
    acc.fieldLines++;
    if (current === null) {
      current = { line, fields: [] };
      records.push(current);
    }
    last = { name: m[1], value: m[2].trimEnd(), line, column: 1 };
    current.fields.push(last);
  }
  return { records, diagnostics, accounting: acc };
}
