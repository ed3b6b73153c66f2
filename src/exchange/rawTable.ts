/**
 * readRawTable: the fields of every record of a table exactly as given, by source line, with its
 * header, `#` metadata lines and line ending. Writers use it to write a mapping set back in its own
 * format with every cell that did not change left as it was.
 */
import { readFileSync } from 'node:fs';
import { gunzipSync } from 'node:zlib';
import { RowLedger } from '../load/ledger.js';
import { readTable, type Delimiter } from '../load/readTable.js';

export interface RawTable {
  header: string[];
  headerLine: number;
  metadataLines: string[];
  delimiter: Delimiter;
  /** '\r\n' when the first line of the file ends so, else '\n'. */
  eol: '\n' | '\r\n';
  /** Source line of a record → its fields. */
  records: Map<number, string[]>;
}

export async function readRawTable(path: string): Promise<RawTable> {
  const records = new Map<number, string[]>();
  let header: string[] = [];
  const info = await readTable(path, new RowLedger(path), {
    header(fields) {
      header = fields;
    },
    row(fields, line) {
      records.set(line, fields);
    },
  }, { metadata: true });
  let bytes = readFileSync(path);
  if (bytes.length >= 2 && bytes[0] === 0x1f && bytes[1] === 0x8b) bytes = gunzipSync(bytes);
  const nl = bytes.indexOf(0x0a);
  const eol = nl > 0 && bytes[nl - 1] === 0x0d ? '\r\n' : '\n';
  return { header, headerLine: info.headerLine, metadataLines: info.metadataLines, delimiter: info.delimiter, eol, records };
}
