/**
 * Exact results on small hand-built release pairs, one per change kind and for the tricky
 * cases. The expected kinds follow the definitions in docs/THRESHOLDS.md.
 */
import { describe, expect, it } from 'vitest';
import { diffReleases } from '../../src/pipeline.js';
import { loadPair, type PairSpec } from '../helpers/releases.js';

async function diff(spec: PairSpec) {
  const { report } = diffReleases(await loadPair(spec));
  return report.changes.map((c) => `${c.kind} ${c.from.join('+')} > ${c.to.join('+')}`);
}

const STABLE = `
S1 disorder: Asthma* | Bronchial asthma
S2 disorder: Gout* | Podagra
`;

describe('diff on hand-built pairs', () => {
  it('finds nothing between a release and itself', async () => {
    expect(await diff({ old: STABLE, new: STABLE })).toEqual([]);
  });

  it('addition', async () => {
    expect(await diff({ old: STABLE, new: STABLE + 'N1 disorder: Sarcoidosis* | Besnier-Boeck disease' })).toEqual(['addition  > N1']);
  });

  it('retirement: inactive with terms kept, and absent', async () => {
    expect(await diff({ old: STABLE + 'R1 disorder: Dropsy* | Oedema of old', new: STABLE + 'R1 disorder (inactive): Dropsy* | Oedema of old' })).toEqual(['retirement R1 > ']);
    expect(await diff({ old: STABLE + 'R1 disorder: Dropsy*', new: STABLE })).toEqual(['retirement R1 > ']);
  });

  it('replacement: an identifier change', async () => {
    expect(await diff({ old: STABLE + 'A1 disorder: Kidney stone* | Renal calculus | Nephrolithiasis', new: STABLE + 'A1 disorder (inactive): Kidney stone*\nB1 disorder: Kidney stone* | Renal calculus | Nephrolithiasis' })).toEqual(['replacement A1 > B1']);
  });

  it('merge into a survivor that keeps its identifier', async () => {
    const old = STABLE + 'M1 disorder: Heart attack* | Cardiac infarction\nM2 disorder: Myocardial infarction* | MI';
    const neu = STABLE + 'M1 disorder (inactive): Heart attack*\nM2 disorder: Myocardial infarction* | MI | Heart attack | Cardiac infarction';
    expect(await diff({ old, new: neu })).toEqual(['merge M1+M2 > M2']);
  });

  it('merge into a brand-new concept (two retirements whose terms land in one new concept)', async () => {
    const old = STABLE + 'M1 disorder: Chickenpox* | Varicella\nM2 disorder: Shingles* | Herpes zoster';
    const neu = STABLE + 'M3 disorder: Varicella-zoster infection* | Chickenpox | Varicella | Shingles | Herpes zoster';
    expect(await diff({ old, new: neu })).toEqual(['merge M1+M2 > M3']);
  });

  it('split where one part keeps the identifier', async () => {
    const old = STABLE + 'P1 disorder: Diabetes mellitus* | Type 1 diabetes | Juvenile diabetes | Type 2 diabetes | Adult-onset diabetes';
    const neu = STABLE + 'P1 disorder: Diabetes mellitus* | Type 1 diabetes | Juvenile diabetes\nP2 disorder: Type 2 diabetes* | Adult-onset diabetes';
    expect(await diff({ old, new: neu })).toEqual(['split P1 > P1+P2']);
  });

  it('split into two new concepts', async () => {
    const old = STABLE + 'P1 finding: Fever with rash* | Exanthem with fever | Rash and fever | Febrile rash';
    const neu = STABLE + 'P2 finding: Fever with rash* | Exanthem with fever\nP3 finding: Rash and fever* | Febrile rash';
    expect(await diff({ old, new: neu })).toEqual(['split P1 > P2+P3']);
  });

  it('moved synonym across categories (the identical string)', async () => {
    const old = STABLE + 'A disorder: Cholelithiasis* | Gallstones | Gall stones | Biliary colic\nB finding: Biliary pain* | Gallbladder pain';
    const neu = STABLE + 'A disorder: Cholelithiasis* | Gallstones | Gall stones\nB finding: Biliary pain* | Gallbladder pain | Biliary colic';
    expect(await diff({ old, new: neu })).toEqual(['moved_synonym A > B']);
  });

  it('moved synonym between two continuing concepts', async () => {
    const old = STABLE + 'A disorder: Migraine* | Sick headache | Hemicrania | Migraine headache\nB disorder: Tension headache* | Stress headache';
    const neu = STABLE + 'A disorder: Migraine* | Hemicrania | Migraine headache\nB disorder: Tension headache* | Stress headache | Sick headache';
    expect(await diff({ old, new: neu })).toEqual(['moved_synonym A > B']);
  });

  it('a synonym moved and the source concept then retired', async () => {
    const old = STABLE + 'A disorder: Catarrh* | Head cold | Rhinitis of old | Mucous discharge\nB disorder: Common cold* | Coryza';
    const neu = STABLE + 'A disorder (inactive): Catarrh* | Rhinitis of old | Mucous discharge\nB disorder: Common cold* | Coryza | Head cold';
    expect(await diff({ old, new: neu })).toEqual(['retirement A > ', 'moved_synonym A > B']);
  });

  it('preferred term change, synonym added and removed', async () => {
    const old = STABLE + 'A disorder: Mongolism* | Down syndrome | Trisomy 21 syndrome';
    const neu = STABLE + 'A disorder: Down syndrome* | Trisomy 21 | Trisomy 21 syndrome';
    // The dropped old preferred term is reported by the preferred_term_change (old_preferred_kept_as_synonym: false), not again as a removed synonym.
    expect(await diff({ old, new: neu })).toEqual(['preferred_term_change A > A', 'synonym_added A > A']);
  });

  it('a term that only changed case or punctuation is no change of synonyms', async () => {
    const old = STABLE + 'A disorder: Chronic kidney disease* | CKD - stage 3';
    const neu = STABLE + 'A disorder: chronic kidney disease* | CKD stage 3';
    expect(await diff({ old, new: neu })).toEqual([]);
  });

  it('identifier reused for a different meaning', async () => {
    const old = STABLE + 'X disorder: Appendicitis* | Inflamed appendix';
    const neu = STABLE + 'X procedure: Cataract extraction* | Lens removal';
    const { report } = diffReleases(await loadPair({ old, new: neu }));
    expect(report.changes.map((c) => c.kind)).toEqual(['id_reuse']);
  });

  it('category change and hierarchy change', async () => {
    const old = STABLE + 'A finding: Obesity* | Adiposity';
    const neu = STABLE + 'A disorder: Obesity* | Adiposity';
    expect(await diff({ old, new: neu, oldHierarchy: 'A < S1', newHierarchy: 'A < S2' })).toEqual(['category_change A > A', 'hierarchy_change A > A']);
  });

  it('reorganization: two old concepts redistributed over three', async () => {
    const old = STABLE + 'A disorder: Alpha one* | Alpha two | Alpha three | Alpha four\nB disorder: Beta one* | Beta two | Beta three | Beta four';
    const neu = STABLE + 'C disorder: Alpha one* | Alpha two\nD disorder: Alpha three* | Alpha four | Beta one | Beta two\nE disorder: Beta three* | Beta four';
    expect(await diff({ old, new: neu })).toEqual(['reorganization A+B > C+D+E']);
  });

  it('a retirement with a history row becomes a replacement or merge into the named successor', async () => {
    const old = STABLE + 'R disorder: Hebrew fever*';
    const neu = STABLE.replace('S2 disorder: Gout* | Podagra', 'S2 disorder: Gout* | Podagra') + 'R disorder (inactive): Hebrew fever*\nN disorder: Relapsing fever*';
    expect(await diff({ old, new: neu, history: 'R > N replaced_by' })).toEqual(['replacement R > N']);
    expect(await diff({ old, new: neu, history: 'R > S1 replaced_by' })).toEqual(['merge R+S1 > S1', 'addition  > N']);
  });

  it('flags a history row that disagrees with where the terms went', async () => {
    const old = STABLE + 'A disorder: Kidney stone* | Renal calculus';
    const neu = STABLE + 'C disorder: Kidney stone* | Renal calculus';
    const { report } = diffReleases(await loadPair({ old, new: neu, history: 'A > S1 replaced_by' }));
    const change = report.changes[0];
    expect(change.kind).toBe('replacement');
    expect(change.kind === 'replacement' && change.evidence.history_disagrees.map((h) => h.new_id)).toEqual(['S1']);
  });

  it('proposes a lexical neighbour for a retirement with no flow and no history', async () => {
    const old = STABLE + 'R disorder: Iron deficiency anaemia*';
    const neu = STABLE + 'N disorder: Anaemia due to iron deficiency*';
    const { report } = diffReleases(await loadPair({ old, new: neu }));
    const ret = report.changes.find((c) => c.kind === 'retirement');
    expect(ret?.kind === 'retirement' && ret.evidence.suggestions[0]?.concept_id).toBe('N');
  });

  it("keeps every successor the history's consider rows name, first, above closer lexical neighbours", async () => {
    // R's name is close to N's, but the publisher says "consider C1, C2, C3" (three rows, more
    // than maxSuggestions = 2): all three come first, the neighbour only fills a free place.
    const old = STABLE + 'R disorder: Iron deficiency anaemia*';
    const neu = STABLE + 'R disorder (inactive): Iron deficiency anaemia*\nN disorder: Anaemia due to iron deficiency*\nC1 disorder: Sideropenia*\nC2 disorder: Chlorosis*\nC3 disorder: Hypochromia*';
    const history = 'R > C1 consider\nR > C2 consider\nR > C3 consider';
    const suggestions = async (maxSuggestions: number) => {
      const { report } = diffReleases(await loadPair({ old, new: neu, history }), { thresholds: { maxSuggestions } });
      const ret = report.changes.find((c) => c.kind === 'retirement');
      return ret?.kind === 'retirement' ? ret.evidence.suggestions.map((s) => `${s.concept_id} ${s.reason}`) : [];
    };
    expect(await suggestions(2)).toEqual(['C1 history_consider', 'C2 history_consider', 'C3 history_consider']);
    expect(await suggestions(5)).toEqual(['C1 history_consider', 'C2 history_consider', 'C3 history_consider', 'N lexical_neighbour']);
  });

  it('does not match normalized terms across categories', async () => {
    const old = STABLE + 'A finding: Cold* | Feeling cold\nB disorder: Common cold*';
    const neu = STABLE + 'B disorder: Common cold* | COLD';
    const out = await diff({ old, new: neu });
    expect(out).toContain('retirement A > ');
    expect(out).not.toContain('moved_synonym A > B');
  });
});
