import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { expectedCalibrationError, rocAuc } from '../../src/rescore/metrics.js';

/** AUC by counting pairs: P(score of a positive > score of a negative) + ½ P(tie). */
function pairwiseAuc(scores: number[], labels: number[]): number {
  let wins = 0;
  let pairs = 0;
  for (let i = 0; i < scores.length; i++) {
    if (labels[i] !== 1) continue;
    for (let j = 0; j < scores.length; j++) {
      if (labels[j] !== 0) continue;
      pairs++;
      wins += scores[i] > scores[j] ? 1 : scores[i] === scores[j] ? 0.5 : 0;
    }
  }
  return wins / pairs;
}

describe('rocAuc (Mann–Whitney form)', () => {
  it('hand-checked example with a tie', () => {
    // Positives 0.9, 0.8, 0.4; negatives 0.8, 0.3. Pairs (pos, neg): (0.9,0.8) 1, (0.9,0.3) 1,
    // (0.8,0.8) ½, (0.8,0.3) 1, (0.4,0.8) 0, (0.4,0.3) 1 → 4.5 / 6 = 0.75.
    // Ranks: 0.3→1, 0.4→2, 0.8,0.8→3.5 each, 0.9→5; R₊ = 5 + 3.5 + 2 = 10.5;
    // U = 10.5 − 3·4/2 = 4.5; AUC = U / (3·2) = 0.75.
    expect(rocAuc([0.9, 0.8, 0.4, 0.8, 0.3], [1, 1, 1, 0, 0])).toBe(0.75);
  });

  it('is 1 for a perfect ranking, 0 for a reversed one, ½ when all scores tie', () => {
    expect(rocAuc([0.1, 0.2, 0.8, 0.9], [0, 0, 1, 1])).toBe(1);
    expect(rocAuc([0.9, 0.8, 0.2, 0.1], [0, 0, 1, 1])).toBe(0);
    expect(rocAuc([0.5, 0.5, 0.5], [1, 0, 1])).toBe(0.5);
  });

  it('equals the pairwise count on random inputs', () => {
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.integer({ min: 0, max: 10 }), fc.boolean()), { minLength: 2, maxLength: 40 }), (rows) => {
        const scores = rows.map((r) => r[0] / 10);
        const labels = rows.map((r) => (r[1] ? 1 : 0));
        if (!labels.includes(1) || !labels.includes(0)) return;
        expect(rocAuc(scores, labels)).toBeCloseTo(pairwiseAuc(scores, labels), 12);
      }),
    );
  });

  it('is NaN with one class, and rejects bad labels', () => {
    expect(rocAuc([0.1, 0.2], [1, 1])).toBeNaN();
    expect(() => rocAuc([0.1, 0.2], [1, 2])).toThrow(/expected 0 or 1/);
    expect(() => rocAuc([0.1], [1, 0])).toThrow(RangeError);
  });
});

describe('expectedCalibrationError (10 equal-width bins)', () => {
  it('hand-checked example', () => {
    // Bin [0.1, 0.2): 0.15, 0.15 with labels 0, 1 → mean 0.15, rate 0.5, gap 0.35, weight 2/5.
    // Bin [0.9, 1.0]: 0.95, 0.95, 1.0 with labels 1, 1, 1 → mean 0.9667, rate 1, gap 0.0333, weight 3/5.
    // ECE = 0.4 · 0.35 + 0.6 · 0.03333 = 0.16.
    expect(expectedCalibrationError([0.15, 0.15, 0.95, 0.95, 1], [0, 1, 1, 1, 1])).toBeCloseTo(0.16, 10);
  });

  it('is 0 when every bin is calibrated', () => {
    expect(expectedCalibrationError([0.25, 0.25, 0.25, 0.25], [1, 0, 0, 0])).toBeCloseTo(0, 12);
  });

  it('rejects probabilities outside [0, 1]', () => {
    expect(() => expectedCalibrationError([1.5], [1])).toThrow(/probability/);
  });
});
