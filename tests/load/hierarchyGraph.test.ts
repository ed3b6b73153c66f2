/**
 * The hierarchy as integers (load/hierarchyGraph.ts) and its loader (load/loadHierarchy.ts).
 *
 * The loader numbers ids from the bytes and finds duplicate edges after reading. These tests hold
 * it to a plain reference written here: rows read in order into a Map of child → parents, with the
 * same checks (empty value, self-loop, the first of two equal edges kept), as the loader did before
 * it built a graph. The walks of AncestorIndex over two graphs are held to the same walks over
 * string Maps (ancestors and their weighted Jaccard, rescore/features.ts).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { loadHierarchy } from '../../src/load/loadHierarchy.js';
import { HierarchyGraph, graphOf } from '../../src/load/hierarchyGraph.js';
import { clean } from '../../src/load/growable.js';
import { alignIds, hashBytes } from '../../src/load/releaseBytes.js';
import { quoteValue } from '../../src/load/ledger.js';
import { AncestorIndex, ancestorSetSimilarity, ancestorSimilarity } from '../../src/rescore/features.js';
import type { Hierarchy } from '../../src/load/types.js';
import { tempDir, writeFile } from '../helpers/files.js';

/** The rows as the loader reads them, by the reference rules: parents in id order, and [line, column, code, message] of each rejected row. */
function reference(rows: [string, string][]): { parents: Map<string, string[]>; rejected: [number, number, string, string][] } {
  const parents = new Map<string, string[]>();
  const lineOf = new Map<string, number>();
  const rejected: [number, number, string, string][] = [];
  rows.forEach(([c0, p0], i) => {
    const line = i + 2;
    const c = clean(c0);
    const p = clean(p0);
    if (c === '') return void rejected.push([line, 1, 'empty_required', 'concept_id is empty']);
    if (p === '') return void rejected.push([line, 2, 'empty_required', `parent_id is empty for ${quoteValue(c)}`]);
    if (c === p) return void rejected.push([line, 2, 'bad_value', `${quoteValue(c)} is given as its own parent`]);
    const key = `${c}\u0000${p}`;
    const first = lineOf.get(key);
    if (first !== undefined) return void rejected.push([line, 1, 'duplicate_row', `duplicate of line ${first}: ${quoteValue(c)} → ${quoteValue(p)}`]);
    lineOf.set(key, line);
    parents.set(c, [...(parents.get(c) ?? []), p]);
  });
  const sorted = new Map<string, string[]>();
  for (const c of [...parents.keys()].sort()) sorted.set(c, parents.get(c)!.sort());
  return { parents: sorted, rejected };
}

/**
 * Ids with the white space, case and non-ASCII letters a real file has (no tab, quote or line
 * end), and ids of 8 bytes and longer, which the loader keeps differently (in its hash slot up to 8).
 */
const ID = fc.constantFrom('A', 'B', 'C9', 'C10', ' A', 'B ', '\u000bA', '\u0001A', 'a', '', 'Ä1', 'é', 'B\u00a0', ' \u00a0B', 'x y', 'Z', 'ABCDEFGH', 'ABCDEFGX', 'ABCDEFGHI', 'ABCDEFGHJ', '1234567890123456');

function hierarchyFile(rows: [string, string][], csv: boolean): string {
  const sep = csv ? ',' : '\t';
  const text = ['concept_id', 'parent_id'].join(sep) + '\n' + rows.map((r) => r.join(sep)).join('\n') + '\n';
  return writeFile(tempDir(), csv ? 'h.csv' : 'h.tsv', text);
}

describe('loadHierarchy builds the graph the reference rules give', () => {
  for (const csv of [false, true]) {
    it(`${csv ? 'CSV (string path)' : 'TSV (bytes, and strings for non-ASCII records)'}: parents, rejected rows and their messages`, async () => {
      await fc.assert(
        fc.asyncProperty(fc.array(fc.tuple(ID, ID), { maxLength: 40 }), async (drawn) => {
          // Plain rows first: a file of a few control characters only is refused as binary.
          const rows: [string, string][] = [['K1', 'K0'], ['K2', 'K0'], ['K3', 'K1'], ['K4', 'K1'], ...drawn];
          const h = await loadHierarchy(hierarchyFile(rows, csv));
          const ref = reference(rows);
          expect([...h.parents]).toEqual([...ref.parents]);
          expect(h.diagnostics.map((d) => [d.line, d.column, d.code, d.message])).toEqual(ref.rejected);
          expect(h.accounting).toMatchObject({ read: rows.length, rejected: ref.rejected.length, used: rows.length - ref.rejected.length });
          expect(h.edgeCount).toBe([...ref.parents.values()].reduce((n, l) => n + l.length, 0));
          // The loader's graph is the graph of the reference Map, array for array.
          const g = graphOf(h);
          const want = HierarchyGraph.fromParents(ref.parents);
          expect(g.ids).toEqual(want.ids);
          expect(Array.from(g.parentStart)).toEqual(Array.from(want.parentStart));
          expect(Array.from(g.parentNodes)).toEqual(Array.from(want.parentNodes));
        }),
        { numRuns: 60, seed: 20261203 },
      );
    });
  }

  it('numbers the ids in id order and keeps each parent list ascending', async () => {
    const h = await loadHierarchy(hierarchyFile([['C3', 'C2'], ['C3', 'C1'], ['C2', 'C1'], ['C10', 'C3'], ['C3', 'C2']], false));
    const g = graphOf(h);
    expect(g.ids).toEqual(['C1', 'C10', 'C2', 'C3']);
    expect(g.parentIds(g.nodeOf('C3'))).toEqual(['C1', 'C2']);
    expect(g.parentsOf('C1')).toBeUndefined();
    expect(g.parentsOf('NONE')).toBeUndefined();
    expect(g.toMap().size).toBe(3); // the children: nodes with a parent
    expect(h.diagnostics.map((d) => d.message)).toEqual(['duplicate of line 2: "C3" → "C2"']);
  });
});

describe('a child with many parents', () => {
  it('has them sorted and its duplicate edges found past the insertion sort (over 16 parents)', async () => {
    // 30 parents in a scrambled order, five of them given twice: the reference rules decide.
    const parents = Array.from({ length: 30 }, (_, k) => `P${(k * 7) % 30}`);
    const rows: [string, string][] = [...parents.map((p) => ['X', p] as [string, string]), ...[3, 9, 12, 20, 27].map((k) => ['X', `P${k}`] as [string, string]), ['Y', 'P1']];
    const h = await loadHierarchy(hierarchyFile(rows, false));
    const ref = reference(rows);
    expect([...h.parents]).toEqual([...ref.parents]);
    expect(h.diagnostics.map((d) => [d.line, d.column, d.code, d.message])).toEqual(ref.rejected);
    expect(h.diagnostics).toHaveLength(5);
  });
});

describe('the id table of the loader', () => {
  it('keeps ids with the same hash apart, short (kept in the slot) and long (compared as bytes)', async () => {
    // Pairs with the same 32-bit FNV-1a hash, found by a search over numbered ids for this test.
    const pairs = [['C1000439599', 'C1000622382'], ['C1000439598', 'C1000622383'], ['S2412789', 'S2649192']];
    for (const [a, b] of pairs) {
      const bytes = (s: string) => Buffer.from(s, 'latin1');
      expect(hashBytes(bytes(a), 0, a.length)).toBe(hashBytes(bytes(b), 0, b.length));
    }
    const rows: [string, string][] = pairs.flatMap(([a, b]) => [[a, 'P'], [b, 'Q'], ['R', a]] as [string, string][]);
    const h = await loadHierarchy(hierarchyFile(rows, false));
    expect([...h.parents]).toEqual([...reference(rows).parents]);
    expect(h.graph!.nodeCount).toBe(9);
  });
});

describe('alignIds', () => {
  it('finds each id of one list in a sorted other, by merge or by search', () => {
    fc.assert(
      fc.property(fc.uniqueArray(fc.string({ maxLength: 3 }), { maxLength: 30 }), fc.uniqueArray(fc.string({ maxLength: 3 }), { maxLength: 30 }), fc.boolean(), (a0, b0, sortA) => {
        const a = sortA ? [...a0].sort() : a0;
        const b = [...b0].sort();
        const where = new Map(b.map((id, k) => [id, k]));
        expect(Array.from(alignIds(a, b))).toEqual(a.map((id) => where.get(id) ?? -1));
      }),
      { numRuns: 200, seed: 7 },
    );
  });
});

function mapHierarchy(edges: [string, string][]): Hierarchy {
  const parents = new Map<string, string[]>();
  for (const [c, p] of edges) {
    const list = parents.get(c) ?? [];
    if (!list.includes(p)) list.push(p);
    parents.set(c, list);
  }
  return { path: 'h', sha256: '', accounting: { file: 'h', read: 0, used: 0, rejected: 0, blankLines: 0 }, diagnostics: [], parents, edgeCount: edges.length };
}

describe('AncestorIndex over two graphs', () => {
  const NODE = fc.constantFrom('A', 'B', 'C', 'D', 'E', 'F', 'G', 'H');
  const EDGES = fc.array(fc.tuple(NODE, NODE).filter(([c, p]) => c !== p), { maxLength: 16 });
  it('compares an old concept with a new one as the string maps do, to the last bit', () => {
    fc.assert(
      fc.property(EDGES, EDGES, (before, after) => {
        const oldH = mapHierarchy(before);
        const newH = mapHierarchy(after);
        const newer = new AncestorIndex(newH);
        const older = new AncestorIndex(oldH, newer.graph);
        for (const x of ['A', 'B', 'C', 'D', 'E', 'F', 'G', 'H', 'NONE']) {
          const a = older.ofNode(older.graph.nodeOf(x));
          expect(a.nodes.length).toBe(older.ancestors(x).size);
          for (const y of ['A', 'C', 'E', 'G', 'NONE']) {
            const b = newer.ofNode(newer.graph.nodeOf(y));
            expect(ancestorSetSimilarity(a, b)).toBe(ancestorSimilarity(older.ancestors(x), newer.ancestors(y)));
          }
          // Same ancestors claimed only when the walks agree; and then the maps are equal.
          if (older.sameAncestors(newer, x)) expect([...newer.ancestors(x)]).toEqual([...older.ancestors(x)]);
          expect(older.sameParents(newer, x)).toBe((oldH.parents.get(x) ?? []).slice().sort().join() === (newH.parents.get(x) ?? []).slice().sort().join());
        }
      }),
      { numRuns: 300, seed: 11 },
    );
  });

  it('a concept with no parents before and some after has other ancestors', () => {
    const older = new AncestorIndex(mapHierarchy([['A', 'P']]));
    const newer = new AncestorIndex(mapHierarchy([['A', 'P'], ['N', 'P']]));
    expect(older.graph.nodeOf('N')).toBe(-1);
    expect(older.sameAncestorsNodes(newer, -1, newer.graph.nodeOf('N'))).toBe(false);
    expect(older.sameAncestorsNodes(newer, older.graph.nodeOf('A'), newer.graph.nodeOf('A'))).toBe(true);
    expect(older.sameAncestorsNodes(newer, -1, newer.graph.nodeOf('NONE'))).toBe(true);
  });
});
