/**
 * ReleaseBuilder: turns release rows into the columnar `Release`, from bytes or from strings.
 *
 * Hot path. `rowBytes` takes a plain TSV record as byte ranges in one of the file's blocks and
 * stores integers only: the term's block and the byte ranges of its text and term_id; the concept
 * found by comparing the id bytes with the previous row's (rows are usually grouped by concept),
 * and on a change with the last concept's (ids usually come in increasing order, so a greater id
 * is a new concept) — only a release whose ids are out of order gets a hash table over id bytes
 * (releaseBytes.ts); term_type, status, term_status, category and language through small caches
 * of byte sequences already seen. A concept id is decoded to a string once, when the concept is
 * first seen; no `Map` keyed by id strings is built while loading (measured in
 * docs/BENCHMARKS.md, "Loading": on two releases of 4.1 M rows such a Map cost 3.5 to 5.8 s of
 * CPU, a hash table over the bytes 1.2 to 2.6 s, the order check 0.15 s in a CPU profile).
 *
 * `row` is the string path (CSV, and any TSV line the byte reader does not take). `rowBytes`
 * hands a record to `row` whenever it is not the common case — an empty or padded value, an
 * unknown status, a term_type, category or language not seen before — so every check,
 * diagnostic and first-seen order is made by one piece of code. Concept-level values (status,
 * category) given on several rows of a concept must agree: the first stated value wins and each
 * disagreeing row gets a warning.
 */
import { quoteValue, type RowLedger } from './ledger.js';
import { resolveColumns, type ColumnRenames, type ColumnSpec } from './columns.js';
import { Interner, clean } from './growable.js';
import { ACTIVE, INACTIVE, PREFERRED, SYNONYM } from './types.js';
import { compareBytes, hashBytes, hashConceptIds, probeConcept, rehashConcepts, viewOf, viewsEqual, type ConceptTable } from './releaseBytes.js';

export const RELEASE_COLUMNS: readonly ColumnSpec[] = [
  { name: 'concept_id', required: true },
  { name: 'term', required: true },
  { name: 'term_type', required: false },
  { name: 'status', required: false },
  { name: 'category', required: false },
  { name: 'term_id', required: false },
  { name: 'language', required: false },
  { name: 'term_status', required: false },
];

/** A concept status not given on any of its rows so far. */
export const UNSTATED = 255;

const STATUS_FIX = 'use active or inactive (retired, deprecated and obsolete are read as inactive)';

/** Status words → ACTIVE/INACTIVE; undefined for a word we do not know. */
export function parseStatus(value: string): number | undefined {
  switch (value) {
    case 'active':
    case 'Active':
    case 'ACTIVE':
    case '1':
      return ACTIVE;
    case 'inactive':
    case 'retired':
    case 'deprecated':
    case 'obsolete':
    case '0':
      return INACTIVE;
  }
  switch (value.toLowerCase()) {
    case 'active':
    case 'current':
    case 'true':
      return ACTIVE;
    case 'inactive':
    case 'retired':
    case 'deprecated':
    case 'obsolete':
    case 'false':
      return INACTIVE;
  }
  return undefined;
}

/** Does buf[s..e) start or end with a byte ≤ 32 (what `clean` would trim)? */
function padded(buf: Uint8Array, s: number, e: number): boolean {
  return buf[s] <= 32 || buf[e - 1] <= 32;
}

/**
 * Byte sequences already resolved to a code (a status, an interned index): a few entries,
 * the last one hit tried first. Entries point into the file's blocks; nothing is copied.
 */
class ByteCodes {
  private readonly views: DataView[] = [];
  private readonly starts: number[] = [];
  private readonly lens: number[] = [];
  private readonly codes: number[] = [];
  private last = 0;
  private next = 0;
  private static readonly SIZE = 8;

  /** The code of buf[s..e), or -1 when not cached. */
  get(view: DataView, s: number, e: number): number {
    const len = e - s;
    const j = this.last;
    // Most rows repeat the previous row's value: one comparison.
    if (this.lens[j] === len && viewsEqual(this.views[j], this.starts[j], view, s, len)) return this.codes[j];
    return this.search(view, s, len);
  }

  private search(view: DataView, s: number, len: number): number {
    const n = this.codes.length;
    for (let j = 0; j < n; j++) {
      if (this.lens[j] === len && viewsEqual(this.views[j], this.starts[j], view, s, len)) {
        this.last = j;
        return this.codes[j];
      }
    }
    return -1;
  }

  add(view: DataView, s: number, e: number, code: number): void {
    let j = this.codes.length;
    if (j >= ByteCodes.SIZE) {
      j = this.next;
      this.next = (this.next + 1) % ByteCodes.SIZE;
    }
    this.views[j] = view;
    this.starts[j] = s;
    this.lens[j] = e - s;
    this.codes[j] = code;
    this.last = j;
  }
}

function grow<T extends Int32Array | Uint8Array>(a: T, size: number): T {
  const next = new (a.constructor as new (n: number) => T)(size);
  next.set(a);
  return next;
}

/** The first n values: a view when little would be wasted, else a trimmed copy. */
function fit<T extends Int32Array | Uint8Array>(a: T, n: number): T {
  return (n >= a.length - (a.length >> 3) ? a.subarray(0, n) : a.slice(0, n)) as T;
}

/** The columns and tables a finished build hands to loadRelease. */
export interface BuiltRelease {
  conceptCount: number;
  conceptIds: string[];
  conceptStatus: Uint8Array;
  conceptCategory: Int32Array;
  conceptLine: Int32Array;
  concepts: ConceptTable;
  categories: string[];
  termCount: number;
  termConcept: Int32Array;
  termType: Uint8Array;
  termTypes: string[];
  termLanguage: Int32Array;
  languages: string[];
  termStatus: Uint8Array;
  termLine: Int32Array;
  termBlock: Int32Array;
  textStart: Int32Array;
  textEnd: Int32Array;
  idStart: Int32Array;
  idEnd: Int32Array;
  hasColumn: { term_type: boolean; status: boolean; category: boolean; term_id: boolean; language: boolean; term_status: boolean };
  /** Field positions (1-based) of term_type and term, for later diagnostics. */
  typeColumn: number;
  termColumn: number;
}

export class ReleaseBuilder {
  /** The file's blocks and the side blocks holding values that came as strings. */
  readonly blocks: Buffer[];
  private readonly path: string;
  private readonly ledger: RowLedger;
  private readonly renames: ColumnRenames | undefined;

  private ci = -1; private ti = -1; private tti = -1; private si = -1;
  private cati = -1; private tidi = -1; private li = -1; private tsi = -1;
  private readonly has = { term_type: false, status: false, category: false, term_id: false, language: false, term_status: false };

  private readonly categories = new Interner();
  private readonly termTypes = new Interner(['preferred', 'synonym']);
  private readonly languages = new Interner();
  private readonly typeCodes = new ByteCodes();
  private readonly statusCodes = new ByteCodes();
  private readonly categoryCodes = new ByteCodes();
  private readonly languageCodes = new ByteCodes();

  // Concepts.
  private conceptCount = 0;
  private conceptCap = 1 << 14;
  private readonly conceptIds: string[] = [];
  private conceptStatus = new Uint8Array(this.conceptCap);
  private conceptCategory = new Int32Array(this.conceptCap);
  private conceptLine = new Int32Array(this.conceptCap);
  private readonly concepts: ConceptTable;
  // Hash and table slot of the id `locate` last found to be new (hash-table layout).
  private newHash = 0;
  private newSlot = 0;
  // The previous row's concept: its id bytes (byte path) or string (string path).
  private prevView: DataView | null = null;
  private prevStart = 0;
  private prevEnd = 0;
  private prevConcept = -1;
  private lastId = '';
  private lastConcept = -1;

  // Terms.
  private termCount = 0;
  private termCap = 1 << 16;
  private termConcept = new Int32Array(this.termCap);
  private termType = new Uint8Array(this.termCap);
  private termLanguage = new Int32Array(this.termCap);
  private termStatus = new Uint8Array(this.termCap);
  private termLine = new Int32Array(this.termCap);
  private termBlock = new Int32Array(this.termCap);
  private textStart = new Int32Array(this.termCap);
  private textEnd = new Int32Array(this.termCap);
  private idStart = new Int32Array(this.termCap);
  private idEnd = new Int32Array(this.termCap);

  // A DataView of the block of the current record.
  private view: DataView = new DataView(new ArrayBuffer(0));
  private viewBlock = -1;
  private viewBuf: Buffer | null = null;

  // Side blocks for values that came as strings.
  private side: Buffer | null = null;
  private sideNo = -1;
  private sidePos = 0;
  private sideSize = 1 << 16;
  private scratch = Buffer.allocUnsafe(256);

  constructor(path: string, ledger: RowLedger, renames: ColumnRenames | undefined, blocks: Buffer[]) {
    this.path = path;
    this.ledger = ledger;
    this.renames = renames;
    this.blocks = blocks;
    this.concepts = {
      blocks,
      block: new Int32Array(this.conceptCap),
      start: new Int32Array(this.conceptCap),
      end: new Int32Array(this.conceptCap),
      sorted: true,
      hash: new Int32Array(this.conceptCap),
      table: new Int32Array(0),
    };
  }

  header(fields: string[], line: number): void {
    const r = resolveColumns(this.path, fields, line, RELEASE_COLUMNS, this.renames);
    const x = r.index;
    this.ci = x.concept_id; this.ti = x.term; this.tti = x.term_type; this.si = x.status;
    this.cati = x.category; this.tidi = x.term_id; this.li = x.language; this.tsi = x.term_status;
    const has = this.has;
    has.term_type = this.tti >= 0; has.status = this.si >= 0; has.category = this.cati >= 0;
    has.term_id = this.tidi >= 0; has.language = this.li >= 0; has.term_status = this.tsi >= 0;
  }

  /** One record as strings (the string path). */
  row(f: string[], line: number): void {
    const ledger = this.ledger;
    const id = clean(f[this.ci]);
    if (id === '') {
      ledger.reject(line, this.ci + 1, 'empty_required', 'concept_id is empty', 'give every row its concept identifier');
      return;
    }
    const text = clean(f[this.ti]);
    if (text === '') {
      ledger.reject(line, this.ti + 1, 'empty_required', `term is empty for concept ${quoteValue(id)}`, 'give the term text, or remove the row');
      return;
    }
    let type = SYNONYM;
    if (this.tti >= 0) {
      const t = clean(f[this.tti]);
      if (t === 'preferred') type = PREFERRED;
      else if (t === '' || t === 'synonym') type = SYNONYM;
      else {
        const low = t.toLowerCase();
        type = low === 'preferred' ? PREFERRED : low === 'synonym' ? SYNONYM : this.termTypes.id(t);
        if (type > 250) {
          ledger.reject(line, this.tti + 1, 'bad_value', `too many distinct term_type values (${quoteValue(t)} is the 251st)`, 'use preferred or synonym');
          return;
        }
      }
    }
    let status = UNSTATED;
    if (this.si >= 0) {
      const s = clean(f[this.si]);
      if (s !== '') {
        const parsed = parseStatus(s);
        if (parsed === undefined) {
          ledger.reject(line, this.si + 1, 'bad_value', `unknown status ${quoteValue(s)}`, STATUS_FIX);
          return;
        }
        status = parsed;
      }
    }
    let tStatus = ACTIVE;
    if (this.tsi >= 0) {
      const s = clean(f[this.tsi]);
      if (s !== '') {
        const parsed = parseStatus(s);
        if (parsed === undefined) {
          ledger.reject(line, this.tsi + 1, 'bad_value', `unknown term_status ${quoteValue(s)}`, STATUS_FIX);
          return;
        }
        tStatus = parsed;
      }
    }
    let category = -1;
    if (this.cati >= 0) {
      const c = clean(f[this.cati]);
      if (c !== '') category = this.categories.id(c);
    }
    let c: number;
    if (id === this.lastId) c = this.lastConcept;
    else {
      const need = id.length * 3;
      if (this.scratch.length < need) this.scratch = Buffer.allocUnsafe(Math.max(need, this.scratch.length * 2));
      const len = this.scratch.write(id, 0, 'utf8');
      c = this.locate(this.scratch, 0, len);
      if (c < 0) {
        const at = this.reserveSide(len);
        this.scratch.copy(this.side!, at, 0, len);
        this.sidePos += len;
        c = this.addConcept(this.sideNo, at, at + len, id, status, category, line);
      }
      this.lastId = id;
      this.lastConcept = c;
    }
    this.prevView = null;
    this.conceptValues(c, status, category, line);

    const termId = this.tidi >= 0 ? clean(f[this.tidi]) : '';
    const at = this.reserveSide((text.length + termId.length) * 3);
    const side = this.side!;
    const textEnd = at + side.write(text, at, 'utf8');
    const idEnd = textEnd + (termId === '' ? 0 : side.write(termId, textEnd, 'utf8'));
    this.sidePos = idEnd;
    const language = this.li >= 0 ? (f[this.li] === '' ? -1 : this.languages.id(clean(f[this.li]))) : -1;
    this.addTerm(c, type, language, tStatus, line, this.sideNo, at, textEnd, textEnd, idEnd);
  }

  /**
   * One plain TSV record as byte ranges: field k is buf[start[k]..end[k]) in block `blockNo`;
   * the reader has checked the field count, quotes, NUL, UTF-8 and length. `ascii` says the
   * record has no byte ≥ 0x80.
   */
  rowBytes(buf: Buffer, blockNo: number, start: Int32Array, end: Int32Array, line: number, ascii: boolean): void {
    if (blockNo !== this.viewBlock || buf !== this.viewBuf) {
      this.viewBlock = blockNo;
      this.viewBuf = buf;
      this.view = viewOf(buf);
    }
    const view = this.view;
    const s0 = start[this.ci];
    const e0 = end[this.ci];
    if (s0 === e0 || padded(buf, s0, e0)) return this.rowFromBytes(buf, start, end, line);
    const s1 = start[this.ti];
    const e1 = end[this.ti];
    if (s1 === e1 || padded(buf, s1, e1)) return this.rowFromBytes(buf, start, end, line);

    let type = SYNONYM;
    if (this.tti >= 0) {
      const s = start[this.tti];
      const e = end[this.tti];
      if (s < e) {
        type = this.typeCodes.get(view, s, e);
        if (type < 0) {
          type = this.typeCode(buf, view, s, e);
          if (type < 0) return this.rowFromBytes(buf, start, end, line);
        }
      }
    }
    let status = UNSTATED;
    if (this.si >= 0) {
      const s = start[this.si];
      const e = end[this.si];
      if (s < e) {
        status = this.statusCodes.get(view, s, e);
        if (status < 0) {
          status = this.statusCode(buf, view, s, e);
          if (status < 0) return this.rowFromBytes(buf, start, end, line);
        }
      }
    }
    let tStatus = ACTIVE;
    if (this.tsi >= 0) {
      const s = start[this.tsi];
      const e = end[this.tsi];
      if (s < e) {
        tStatus = this.statusCodes.get(view, s, e);
        if (tStatus < 0) {
          tStatus = this.statusCode(buf, view, s, e);
          if (tStatus < 0) return this.rowFromBytes(buf, start, end, line);
        }
      }
    }
    let category = -1;
    if (this.cati >= 0) {
      const s = start[this.cati];
      const e = end[this.cati];
      if (s < e) {
        category = this.categoryCodes.get(view, s, e);
        if (category < 0) {
          category = this.internedCode(this.categories, this.categoryCodes, buf, view, s, e);
          if (category < 0) return this.rowFromBytes(buf, start, end, line);
        }
      }
    }
    let language = -1;
    if (this.li >= 0) {
      const s = start[this.li];
      const e = end[this.li];
      if (s < e) {
        language = this.languageCodes.get(view, s, e);
        if (language < 0) {
          language = this.internedCode(this.languages, this.languageCodes, buf, view, s, e);
          if (language < 0) return this.rowFromBytes(buf, start, end, line);
        }
      }
    }
    let is = 0;
    let ie = 0;
    if (this.tidi >= 0) {
      is = start[this.tidi];
      ie = end[this.tidi];
      if (is < ie && padded(buf, is, ie)) return this.rowFromBytes(buf, start, end, line);
    }

    // The concept: the previous row's when the id bytes are the same, else through the table.
    let c = this.prevConcept;
    const len = e0 - s0;
    const prev = this.prevView;
    if (prev === null || this.prevEnd - this.prevStart !== len || !viewsEqual(prev, this.prevStart, view, s0, len)) {
      c = this.locate(buf, s0, e0);
      if (c < 0) c = this.addConcept(blockNo, s0, e0, buf.toString(ascii ? 'latin1' : 'utf8', s0, e0), status, category, line);
      this.prevView = view;
      this.prevStart = s0;
      this.prevEnd = e0;
      this.prevConcept = c;
    }
    if (status !== UNSTATED || category !== -1) this.conceptValues(c, status, category, line);
    this.addTerm(c, type, language, tStatus, line, blockNo, s1, e1, is, ie);
  }

  /** The record's fields as strings, through the string path. */
  private rowFromBytes(buf: Buffer, start: Int32Array, end: Int32Array, line: number): void {
    const n = start.length;
    const fields = new Array<string>(n);
    for (let k = 0; k < n; k++) fields[k] = buf.toString('utf8', start[k], end[k]);
    this.row(fields, line);
  }

  /** term_type code of buf[s..e) when known without side effects, else -1. */
  private typeCode(buf: Buffer, view: DataView, s: number, e: number): number {
    if (padded(buf, s, e)) return -1;
    const t = buf.toString('utf8', s, e);
    let code: number | undefined;
    if (t === 'preferred') code = PREFERRED;
    else if (t === 'synonym') code = SYNONYM;
    else {
      const low = t.toLowerCase();
      code = low === 'preferred' ? PREFERRED : low === 'synonym' ? SYNONYM : this.termTypes.peek(t);
    }
    if (code === undefined || code > 250) return -1;
    this.typeCodes.add(view, s, e, code);
    return code;
  }

  private statusCode(buf: Buffer, view: DataView, s: number, e: number): number {
    if (padded(buf, s, e)) return -1;
    const code = parseStatus(buf.toString('utf8', s, e));
    if (code === undefined) return -1;
    this.statusCodes.add(view, s, e, code);
    return code;
  }

  /** Index of an already interned value, else -1 (the string path interns it, in file order). */
  private internedCode(interner: Interner, codes: ByteCodes, buf: Buffer, view: DataView, s: number, e: number): number {
    if (padded(buf, s, e)) return -1;
    const code = interner.peek(buf.toString('utf8', s, e));
    if (code === undefined) return -1;
    codes.add(view, s, e, code);
    return code;
  }

  /** Start of room for `bytes` bytes in the current side block. */
  private reserveSide(bytes: number): number {
    if (this.side === null || this.sidePos + bytes > this.side.length) {
      this.side = Buffer.allocUnsafeSlow(Math.max(this.sideSize, bytes));
      if (this.sideSize < 1 << 24) this.sideSize *= 2;
      this.sideNo = this.blocks.push(this.side) - 1;
      this.sidePos = 0;
    }
    return this.sidePos;
  }

  /**
   * The concept whose id is buf[s..e), or -1 when it is new. While ids come in increasing byte
   * order (the usual layout) one comparison with the last concept decides; the first id out of
   * order builds the hash table, which is used from then on.
   */
  private locate(buf: Uint8Array, s: number, e: number): number {
    const t = this.concepts;
    if (t.sorted) {
      const last = this.conceptCount - 1;
      if (last < 0) return -1;
      const cmp = compareBytes(t.blocks[t.block[last]], t.start[last], t.end[last], buf, s, e);
      if (cmp < 0) return -1;
      if (cmp === 0) return last;
      t.sorted = false;
      hashConceptIds(t, this.conceptCount);
      t.table = rehashConcepts(t.hash, this.conceptCount, Math.max(this.conceptCap * 2, 1 << 15));
    }
    const h = hashBytes(buf, s, e);
    const c = probeConcept(t, buf, s, e, h);
    this.newHash = h;
    this.newSlot = -1 - c;
    return c < 0 ? -1 : c;
  }

  /** Add the concept whose id is in `block` at s..e, just reported new by `locate`. */
  private addConcept(block: number, s: number, e: number, id: string, status: number, category: number, line: number): number {
    const c = this.conceptCount;
    if (c === this.conceptCap) this.growConcepts(c * 2);
    this.conceptIds.push(id);
    this.conceptStatus[c] = status;
    this.conceptCategory[c] = category;
    this.conceptLine[c] = line;
    const t = this.concepts;
    t.block[c] = block;
    t.start[c] = s;
    t.end[c] = e;
    this.conceptCount = c + 1;
    if (!t.sorted) {
      t.hash[c] = this.newHash;
      if (this.conceptCount * 2 > t.table.length) t.table = rehashConcepts(t.hash, this.conceptCount, t.table.length * 2);
      else t.table[this.newSlot] = c + 1;
    }
    return c;
  }

  private growConcepts(size: number): void {
    const cap = (this.conceptCap = size);
    this.conceptStatus = grow(this.conceptStatus, cap);
    this.conceptCategory = grow(this.conceptCategory, cap);
    this.conceptLine = grow(this.conceptLine, cap);
    const t = this.concepts;
    t.block = grow(t.block, cap);
    t.start = grow(t.start, cap);
    t.end = grow(t.end, cap);
    t.hash = grow(t.hash, cap);
  }

  /** Concept-level values must agree across the concept's rows: the first stated one wins. */
  private conceptValues(c: number, status: number, category: number, line: number): void {
    if (status !== UNSTATED) {
      const had = this.conceptStatus[c];
      if (had === UNSTATED) this.conceptStatus[c] = status;
      else if (had !== status) {
        this.ledger.warn(line, this.si + 1, 'conflicting_status', `concept ${quoteValue(this.conceptIds[c])} is ${status === ACTIVE ? 'active' : 'inactive'} here but ${had === ACTIVE ? 'active' : 'inactive'} on line ${this.conceptLine[c]}; the first value is kept`, 'give one status per concept');
      }
    }
    if (category !== -1) {
      const had = this.conceptCategory[c];
      if (had === -1) this.conceptCategory[c] = category;
      else if (had !== category) {
        const names = this.categories.values;
        this.ledger.warn(line, this.cati + 1, 'conflicting_category', `concept ${quoteValue(this.conceptIds[c])} has category ${quoteValue(names[category])} here but ${quoteValue(names[had])} earlier (line ${this.conceptLine[c]}); the first value is kept`, 'give one category per concept');
      }
    }
  }

  private addTerm(c: number, type: number, language: number, tStatus: number, line: number, block: number, ts: number, te: number, is: number, ie: number): void {
    const t = this.termCount;
    if (t === this.termCap) this.growTerms();
    this.termConcept[t] = c;
    this.termType[t] = type;
    this.termLanguage[t] = language;
    this.termStatus[t] = tStatus;
    this.termLine[t] = line;
    this.termBlock[t] = block;
    this.textStart[t] = ts;
    this.textEnd[t] = te;
    this.idStart[t] = is;
    this.idEnd[t] = ie;
    this.termCount = t + 1;
  }

  /** Size the arrays for about `records` terms (concepts in the proportion seen so far). */
  expectRecords(records: number): void {
    if (records > this.termCap) this.growTerms(records);
    if (this.termCount >= 1000) {
      const concepts = Math.ceil((records * this.conceptCount) / this.termCount * 1.1);
      if (concepts > this.conceptCap) {
        this.growConcepts(concepts);
        const t = this.concepts;
        if (!t.sorted) t.table = rehashConcepts(t.hash, this.conceptCount, concepts * 2);
      }
    }
  }

  private growTerms(size = this.termCap * 2): void {
    const cap = (this.termCap = size);
    this.termConcept = grow(this.termConcept, cap);
    this.termType = grow(this.termType, cap);
    this.termLanguage = grow(this.termLanguage, cap);
    this.termStatus = grow(this.termStatus, cap);
    this.termLine = grow(this.termLine, cap);
    this.termBlock = grow(this.termBlock, cap);
    this.textStart = grow(this.textStart, cap);
    this.textEnd = grow(this.textEnd, cap);
    this.idStart = grow(this.idStart, cap);
    this.idEnd = grow(this.idEnd, cap);
  }

  /** The finished columns, trimmed to size; concepts never given a status are active. */
  finish(): BuiltRelease {
    const n = this.termCount;
    const k = this.conceptCount;
    const status = fit(this.conceptStatus, k);
    for (let c = 0; c < k; c++) if (status[c] === UNSTATED) status[c] = ACTIVE;
    const t = this.concepts;
    const concepts: ConceptTable = { blocks: this.blocks, block: fit(t.block, k), start: fit(t.start, k), end: fit(t.end, k), sorted: t.sorted, hash: fit(t.hash, k), table: t.table };
    return {
      conceptCount: k,
      conceptIds: this.conceptIds,
      conceptStatus: status,
      conceptCategory: fit(this.conceptCategory, k),
      conceptLine: fit(this.conceptLine, k),
      concepts,
      categories: this.categories.values,
      termCount: n,
      termConcept: fit(this.termConcept, n),
      termType: fit(this.termType, n),
      termTypes: this.termTypes.values,
      termLanguage: fit(this.termLanguage, n),
      languages: this.languages.values,
      termStatus: fit(this.termStatus, n),
      termLine: fit(this.termLine, n),
      termBlock: fit(this.termBlock, n),
      textStart: fit(this.textStart, n),
      textEnd: fit(this.textEnd, n),
      idStart: fit(this.idStart, n),
      idEnd: fit(this.idEnd, n),
      hasColumn: { ...this.has },
      typeColumn: this.tti + 1,
      termColumn: this.ti + 1,
    };
  }
}
