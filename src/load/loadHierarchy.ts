/**
 * loadHierarchy: read `concept_id,parent_id` rows into a HierarchyGraph (hierarchyGraph.ts).
 * Empty values and duplicate edges are rejected rows; a self-loop is rejected too (a concept
 * cannot be its own parent). Longer cycles are found later, where the hierarchy is walked.
 *
 * The ids of a plain TSV record are taken as bytes: each distinct id is copied once into an id
 * table (a hash over its bytes gives its number), and each edge is two integers and a line; a
 * duplicate edge is found when each child's parents are sorted (buildGraph). No string is made
 * per row; one per distinct id at the end, when the ids are sorted into the graph's node order. (A Map from child id to a
 * list of parent ids took 1.7 s of a 1.25 M-row hierarchy's load; measured in docs/BENCHMARKS.md.)
 * `parents`, the Map form, is built from the graph on first use only.
 */
import { RowLedger, quoteValue } from './ledger.js';
import { delimiterFromName, readTable, type ProgressCallback } from './readTable.js';
import { readTsvBytes, type ByteTableSink } from './readTsvBytes.js';
import { resolveColumns, type ColumnRenames } from './columns.js';
import { GrowableInt32, clean } from './growable.js';
import { bytesEqual, hashBytes } from './releaseBytes.js';
import { HierarchyGraph } from './hierarchyGraph.js';
import type { Diagnostic, Hierarchy, RowAccounting } from './types.js';

export const HIERARCHY_COLUMNS = [
  { name: 'concept_id', required: true },
  { name: 'parent_id', required: true },
] as const;

/**
 * Distinct ids as bytes, numbered in first-seen order. An id of up to 8 bytes is also kept in its
 * hash slot, as two words, so that finding it reads one slot and nothing else (ids hold no NUL
 * byte, so the zero padding is unambiguous; a longer id has words -1, which no short id has as
 * its bytes are below 0xff, and is compared in the byte store).
 */
class IdTable {
  bytes = new Uint8Array(1 << 16);
  used = 0;
  /** Byte offsets: id n is bytes[start[n] .. start[n + 1]). */
  private readonly start = new GrowableInt32(1 << 12);
  /** Open addressing, four ints per slot: the id's hash, id + 1 (0: empty), and its two words. */
  private table = new Int32Array(1 << 15);
  count = 0;
  /** True while every id byte is below 0x80. */
  ascii = true;

  constructor() {
    this.start.push(0);
  }

  /** The number of the id buf[s..e), added when new. */
  intern(buf: Uint8Array, s: number, e: number): number {
    const len = e - s;
    let h = 0x811c9dc5; // FNV-1a, as hashBytes
    let w0 = 0;
    let w1 = 0;
    if (len <= 8) {
      for (let i = 0; i < len; i++) {
        const b = buf[s + i];
        h = Math.imul(h ^ b, 0x01000193);
        if (i < 4) w0 |= b << (8 * i);
        else w1 |= b << (8 * (i - 4));
      }
    } else {
      h = hashBytes(buf, s, e);
      w0 = w1 = -1;
    }
    const table = this.table;
    const mask = (table.length >> 2) - 1;
    let p = h & mask;
    for (;;) {
      const q = 4 * p;
      const v = table[q + 1];
      if (v === 0) break;
      if (table[q] === h && table[q + 2] === w0 && table[q + 3] === w1) {
        if (w0 !== -1) return v - 1;
        const starts = this.start.data;
        const n = v - 1;
        const at = starts[n];
        if (starts[n + 1] - at === len && bytesEqual(this.bytes, at, buf, s, len)) return n;
      }
      p = (p + 1) & mask;
    }
    const n = this.count++;
    if (this.used + len > this.bytes.length) {
      let size = this.bytes.length * 2;
      while (size < this.used + len) size *= 2;
      const next = new Uint8Array(size);
      next.set(this.bytes.subarray(0, this.used));
      this.bytes = next;
    }
    for (let i = s; i < e; i++) {
      const b = buf[i];
      if (b >= 0x80) this.ascii = false;
      this.bytes[this.used++] = b;
    }
    this.start.push(this.used);
    const q = 4 * p;
    table[q] = h;
    table[q + 1] = n + 1;
    table[q + 2] = w0;
    table[q + 3] = w1;
    if (this.count * 8 > table.length) this.rehash();
    return n;
  }

  /** Make room for about `ids` ids without growing the hash table while reading. */
  reserve(ids: number): void {
    let slots = this.table.length >> 2;
    while (slots < ids * 2) slots *= 2;
    if (slots > this.table.length >> 2) this.rehash(slots * 4);
  }

  private rehash(size = this.table.length * 2): void {
    const old = this.table;
    const table = new Int32Array(size);
    const mask = (table.length >> 2) - 1;
    for (let q = 0; q < old.length; q += 4) {
      if (old[q + 1] === 0) continue;
      let p = old[q] & mask;
      while (table[4 * p + 1] !== 0) p = (p + 1) & mask;
      table.set(old.subarray(q, q + 4), 4 * p);
    }
    this.table = table;
  }

  /** Every id as a string, in number order. */
  strings(): string[] {
    const buf = Buffer.from(this.bytes.buffer, this.bytes.byteOffset, this.used);
    const enc = this.ascii ? 'latin1' : 'utf8';
    const starts = this.start.data;
    const out = new Array<string>(this.count);
    for (let n = 0; n < this.count; n++) out[n] = buf.toString(enc, starts[n], starts[n + 1]);
    return out;
  }
}

/** Is byte b white space for String.prototype.trim (the ASCII ones)? */
const isSpace = (b: number) => b === 32 || (b >= 9 && b <= 13);

/** An edge given again: its line, the line of the first one, and the two nodes (graph numbering). */
export interface DuplicateEdge {
  line: number;
  first: number;
  child: number;
  parent: number;
}

/**
 * The graph of the ids (strings in number order) and the edges between their numbers, in file
 * order. An edge given twice is kept once, from its first line; the others are returned.
 */
export function buildGraph(strings: string[], edges: { child: Int32Array; parent: Int32Array; line: Int32Array }): { graph: HierarchyGraph; duplicates: DuplicateEdge[] } {
  const count = strings.length;
  const order = new Int32Array(count);
  for (let n = 0; n < count; n++) order[n] = n;
  order.sort((a, b) => (strings[a] < strings[b] ? -1 : 1));
  const rank = new Int32Array(count);
  const ids = new Array<string>(count);
  for (let k = 0; k < count; k++) {
    rank[order[k]] = k;
    ids[k] = strings[order[k]];
  }
  const m = edges.child.length;
  const start = new Int32Array(count + 1);
  for (let e = 0; e < m; e++) start[rank[edges.child[e]] + 1]++;
  for (let k = 0; k < count; k++) start[k + 1] += start[k];
  const fill = start.slice(0, count);
  const nodes = new Int32Array(m);
  const lines = new Int32Array(m);
  for (let e = 0; e < m; e++) {
    const at = fill[rank[edges.child[e]]]++;
    nodes[at] = rank[edges.parent[e]];
    lines[at] = edges.line[e];
  }
  // Each child's parents ascending, by (parent, line), so a parent given twice sits next to its
  // first line; the later ones are dropped. An insertion sort for the usual few parents, a merge
  // sort above 16 (a child with thousands of parents must not cost their square).
  const duplicates: DuplicateEdge[] = [];
  const parentStart = new Int32Array(count + 1);
  let out = 0;
  for (let k = 0; k < count; k++) {
    const s = start[k];
    const end = start[k + 1];
    if (end - s > 16) {
      const idx = Array.from({ length: end - s }, (_, i) => s + i).sort((a, b) => nodes[a] - nodes[b] || lines[a] - lines[b]);
      const sortedNodes = idx.map((i) => nodes[i]);
      const sortedLines = idx.map((i) => lines[i]);
      nodes.set(sortedNodes, s);
      lines.set(sortedLines, s);
    } else for (let i = s + 1; i < end; i++) {
      const v = nodes[i];
      const l = lines[i];
      let j = i - 1;
      while (j >= s && nodes[j] > v) {
        nodes[j + 1] = nodes[j];
        lines[j + 1] = lines[j];
        j--;
      }
      nodes[j + 1] = v;
      lines[j + 1] = l;
    }
    for (let i = s; i < end; i++) {
      if (out > parentStart[k] && nodes[out - 1] === nodes[i]) {
        duplicates.push({ line: lines[i], first: lines[out - 1], child: k, parent: nodes[i] });
        continue;
      }
      nodes[out] = nodes[i];
      lines[out] = lines[i];
      out++;
    }
    parentStart[k + 1] = out;
  }
  return { graph: new HierarchyGraph(ids, parentStart, out === m ? nodes : nodes.slice(0, out)), duplicates };
}

/** A loaded hierarchy: its graph, and `parents` (the Map form) made from it when first read. */
export function hierarchyOf(meta: { path: string; sha256: string; accounting: RowAccounting; diagnostics: Diagnostic[] }, graph: HierarchyGraph): Hierarchy {
  let parents: Map<string, string[]> | undefined;
  const h = { ...meta, graph, edgeCount: graph.parentNodes.length } as Hierarchy;
  Object.defineProperty(h, 'parents', {
    enumerable: true,
    configurable: true,
    get: () => (parents ??= graph.toMap()),
    set: (v: Map<string, string[]>) => void (parents = v),
  });
  return h;
}

export async function loadHierarchy(path: string, options: { columns?: ColumnRenames; onProgress?: ProgressCallback } = {}): Promise<Hierarchy> {
  const ledger = new RowLedger(path);
  const ids = new IdTable();
  const edges = { child: new GrowableInt32(1 << 12), parent: new GrowableInt32(1 << 12), line: new GrowableInt32(1 << 12) };
  let ci = -1;
  let pi = -1;
  let scratch = Buffer.alloc(256);
  /** The number of the id given as a string (the string path, and records that are not ASCII). */
  const internString = (s: string): number => {
    const need = Buffer.byteLength(s, 'utf8');
    if (need > scratch.length) scratch = Buffer.alloc(need * 2);
    const len = scratch.write(s, 0, 'utf8');
    return ids.intern(scratch, 0, len);
  };
  /** The edge of a row that passed the checks (duplicates are found in buildGraph). */
  const edge = (c: number, p: number, line: number): void => {
    edges.child.push(c);
    edges.parent.push(p);
    edges.line.push(line);
  };
  const row = (child: string, parent: string, line: number): void => {
    if (child === '') return void ledger.reject(line, ci + 1, 'empty_required', 'concept_id is empty', 'give the child concept');
    if (parent === '') return void ledger.reject(line, pi + 1, 'empty_required', `parent_id is empty for ${quoteValue(child)}`, 'give the parent concept, or drop the row for a top concept');
    if (child === parent) return void ledger.reject(line, pi + 1, 'bad_value', `${quoteValue(child)} is given as its own parent`, 'remove the self-loop');
    edge(internString(child), internString(parent), line);
  };
  const sink: ByteTableSink = {
    // A hierarchy names about as many distinct ids as it has rows (a child, and parents that are
    // mostly children too): the id table is sized once (growing it cost 0.1 s at 1.25 M rows).
    expectRecords(records) {
      ids.reserve(Math.min(records, 1 << 24));
    },
    header(fields, line) {
      const r = resolveColumns(path, fields, line, HIERARCHY_COLUMNS, options.columns);
      ci = r.index.concept_id;
      pi = r.index.parent_id;
    },
    row(f, line) {
      row(clean(f[ci]), clean(f[pi]), line);
    },
    // Plain TSV records (readTsvBytes): an ASCII record's two ids are trimmed and numbered from
    // the bytes (the same white space as String.prototype.trim for ASCII); others go as strings.
    rowBytes(buf, _block, start, end, line, ascii) {
      if (!ascii) return void row(clean(buf.toString('utf8', start[ci], end[ci])), clean(buf.toString('utf8', start[pi], end[pi])), line);
      let cs = start[ci];
      let ce = end[ci];
      while (cs < ce && isSpace(buf[cs])) cs++;
      while (ce > cs && isSpace(buf[ce - 1])) ce--;
      let ps = start[pi];
      let pe = end[pi];
      while (ps < pe && isSpace(buf[ps])) ps++;
      while (pe > ps && isSpace(buf[pe - 1])) pe--;
      if (cs === ce) return void ledger.reject(line, ci + 1, 'empty_required', 'concept_id is empty', 'give the child concept');
      if (ps === pe) return void ledger.reject(line, pi + 1, 'empty_required', `parent_id is empty for ${quoteValue(buf.toString('latin1', cs, ce))}`, 'give the parent concept, or drop the row for a top concept');
      // A self-loop is rejected before its id is numbered (as on the string path): the graph
      // holds the ids of kept edges only.
      if (ce - cs === pe - ps && bytesEqual(buf, cs, buf, ps, ce - cs)) return void ledger.reject(line, pi + 1, 'bad_value', `${quoteValue(buf.toString('latin1', cs, ce))} is given as its own parent`, 'remove the self-loop');
      edge(ids.intern(buf, cs, ce), ids.intern(buf, ps, pe), line);
    },
  };
  const info = delimiterFromName(path) === ','
    ? await readTable(path, ledger, sink, { onProgress: options.onProgress })
    : await readTsvBytes(path, ledger, sink, { blocks: [], onProgress: options.onProgress });
  const { graph, duplicates } = buildGraph(ids.strings(), { child: edges.child.finish(), parent: edges.parent.finish(), line: edges.line.finish() });
  for (const d of duplicates) ledger.reject(d.line, 1, 'duplicate_row', `duplicate of line ${d.first}: ${quoteValue(graph.ids[d.child])} → ${quoteValue(graph.ids[d.parent])}`, 'remove the duplicate row');
  return hierarchyOf({ path, sha256: info.sha256, accounting: ledger.finish(), diagnostics: ledger.diagnostics }, graph);
}
