/**
 * ConceptIndex, the nearest-concept search: how candidates are chosen when every word of a query
 * is common, and that a plain search finds the concept holding the query's words.
 */
import { describe, expect, it } from 'vitest';
import { loadRelease } from '../../src/load/index.js';
import { ConceptIndex, buildIndexParts, indexSource, termStems } from '../../src/rescore/conceptIndex.js';
import { termTextAt } from '../../src/load/releaseBytes.js';
import { lexicalKey } from '../../src/text/normalize.js';
import { generateDataset } from '../../src/gen/dataset.js';
import { writeDataset } from '../../src/gen/writeDataset.js';
import { ACTIVE } from '../../src/load/types.js';
import { CLAIM_CHUNK, searchClaimed } from '../../src/rescore/indexServer.js';
import { tempDir, tsv, writeFile } from '../helpers/files.js';

async function release(rows: string[][]) {
  return loadRelease(writeFile(tempDir(), 'r.tsv', tsv([['concept_id', 'term', 'term_type'], ...rows])), { order: 'canonical' });
}

const id = (k: number) => `C${String(k).padStart(4, '0')}`;

describe('ConceptIndex.search', () => {
  it('finds the concept whose term holds the query words', async () => {
    const r = await release([[id(1), 'Fracture of femur', 'preferred'], [id(2), 'Fracture of tibia', 'preferred'], [id(3), 'Femoral neck', 'preferred']]);
    const [hit] = new ConceptIndex(r).search(['femur fracture'], 3);
    expect(r.conceptIds[hit.concept]).toBe(id(1));
    expect(hit.score).toBe(1);
  });

  it('a query of common words only: candidates are the terms holding all of them, not the first 500 terms of its rarest word', async () => {
    // 2,000 concepts; every word is on more than maxPosting (2) terms. "beta" is on concepts
    // 0–1199, "gamma" on 800–1999, "omega" on all but the target; the target, the last to hold
    // both, is concept 1199 with exactly "beta gamma". The postings of "beta" alone hold 1,200
    // terms, of which the first 500 (concepts 0–499) have no "gamma" at all.
    const rows: string[][] = [];
    for (let k = 0; k < 2000; k++) {
      const words = [k === 1199 ? '' : 'omega', k < 1200 ? 'beta' : '', k >= 800 ? 'gamma' : ''].filter(Boolean);
      rows.push([id(k), words.join(' '), 'preferred']);
    }
    const r = await release(rows);
    const hits = new ConceptIndex(r, { maxPosting: 2 }).search(['beta gamma'], 5);
    expect(r.conceptIds[hits[0].concept]).toBe(id(1199));
    expect(hits[0].score).toBe(1);
    // The rest share both words too (the intersection), none only one of them.
    for (const h of hits.slice(1)) expect(Number(r.conceptIds[h.concept].slice(1))).toBeGreaterThanOrEqual(800);
  });
});

describe('an index in shared memory, searched by two threads', () => {
  it('buildIndexParts with shared arrays builds the same index, every array in a SharedArrayBuffer', async () => {
    const rows: string[][] = [];
    for (let k = 0; k < 300; k++) rows.push([id(k), `${['acute', 'chronic', 'renal', 'hepatic'][k % 4]} ${['failure', 'injury', 'cyst'][k % 3]} ${k % 7 === 0 ? 'of the left side' : `type ${k % 11}`}`, 'preferred']);
    const r = await release(rows);
    const plain = buildIndexParts(indexSource(r));
    const shared = buildIndexParts(indexSource(r), undefined, true);
    expect(shared.words).toEqual(plain.words);
    for (const key of ['start', 'terms', 'idfs', 'termNorm', 'termStart', 'termWords'] as const) {
      expect(shared[key].buffer).toBeInstanceOf(SharedArrayBuffer);
      expect(plain[key].buffer).toBeInstanceOf(ArrayBuffer);
      expect(Array.from(shared[key])).toEqual(Array.from(plain[key]));
    }
  });

  it('searchClaimed searches the queries not yet claimed, a chunk at a time, each once, with the hits of a plain search', async () => {
    const rows: string[][] = [];
    for (let k = 0; k < 200; k++) rows.push([id(k), `${['acute', 'chronic'][k % 2]} ${['failure', 'injury', 'cyst', 'mass', 'pain'][k % 5]} ${k}`, 'preferred']);
    const r = await release(rows);
    const index = new ConceptIndex(r, {}, buildIndexParts(indexSource(r), undefined, true));
    const queries = Array.from({ length: 45 }, (_, k) => ({ texts: [`${['acute', 'chronic'][k % 2]} ${['failure', 'injury', 'cyst'][k % 3]}`, `mass ${k}`], limit: 4, skipConcept: k % 3 === 0 ? k : -1 }));
    // Another thread took the first two chunks already.
    const claim = new Int32Array(new SharedArrayBuffer(4));
    claim[0] = 2 * CLAIM_CHUNK;
    const found = new Map<number, unknown>();
    const done = searchClaimed(index, queries, claim, (at, hits) => {
      expect(found.has(at)).toBe(false);
      found.set(at, hits);
    });
    expect(done).toBe(queries.length - 2 * CLAIM_CHUNK);
    expect([...found.keys()]).toEqual(Array.from({ length: done }, (_, k) => 2 * CLAIM_CHUNK + k));
    for (const [at, hits] of found) expect(hits).toEqual(new ConceptIndex(r).search(queries[at].texts, queries[at].limit, queries[at].skipConcept));
    expect(claim[0]).toBeGreaterThanOrEqual(queries.length);
    // Nothing is left for a second call.
    expect(searchClaimed(index, queries, claim, () => { throw new Error('searched twice'); })).toBe(0);
  });
});

describe('termStems: the lexical key read from the index', () => {
  // Re-scoring reads the stems of indexed terms from the forward lists instead of stemming their
  // texts again; the features are the same only if the sorted words are the key's tokens.
  it('the sorted words of every indexed term join to its lexical key (hand-made terms)', async () => {
    const texts = [
      'Fracture of femur', 'femur, fracture of', 'Blood blood pressure', 'Of the', 'and', 'Ménière’s disease', "Crohn's disease",
      'ΟΔΟΣ', 'Rh+ blood group', 'HIV-1 antibody', '0.5 mg tablet', 'Straße', 'Tests   with  spaces', 'Kidney; renal — chronic', 'x',
    ];
    const r = await release(texts.map((t, k) => [id(k), t, 'preferred']));
    const parts = buildIndexParts(indexSource(r));
    for (let t = 0; t < r.termCount; t++) expect(termStems(parts, t).join(' ')).toBe(lexicalKey(termTextAt(r, t)));
    // Not a tautology: repeats are dropped and the words sorted, as in the key.
    const t = texts.indexOf('Blood blood pressure');
    expect(termStems(parts, t)).toEqual(['blood', 'pressur']);
    expect(termStems(parts, texts.indexOf('Of the'))).toEqual(['of the']);
  });

  it('so do those of a generated release, built in shared memory from the loader bytes', async () => {
    const { paths } = await writeDataset(tempDir(), generateDataset({ concepts: 1200, seed: 5 }));
    const r = await loadRelease(paths.new, { order: 'canonical' });
    const src = indexSource(r);
    expect(src.bytes).toBeDefined(); // the byte tokenizer's path, as on large releases
    const parts = buildIndexParts(src, undefined, true);
    let indexed = 0;
    for (let t = 0; t < r.termCount; t++) {
      if (r.termStatus[t] !== ACTIVE || r.conceptStatus[r.termConcept[t]] !== ACTIVE) continue;
      indexed++;
      expect(termStems(parts, t).join(' ')).toBe(lexicalKey(termTextAt(r, t)));
    }
    expect(indexed).toBeGreaterThan(3000);
  });
});
