/**
 * ConceptIndex, the nearest-concept search: how candidates are chosen when every word of a query
 * is common, and that a plain search finds the concept holding the query's words.
 */
import { describe, expect, it } from 'vitest';
import { loadRelease } from '../../src/load/index.js';
import { ConceptIndex } from '../../src/rescore/conceptIndex.js';
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
