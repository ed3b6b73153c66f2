import { describe, expect, it } from 'vitest';
import { fitLogistic, predictProbability, sigmoid } from '../../src/rescore/logistic.js';

describe('fitLogistic', () => {
  it('reproduces the worked example of hours studied vs passing an exam', () => {
    // Source: Wikipedia, "Logistic regression", section "Example" (20 students, hours of study
    // and pass/fail); the article gives intercept −4.0777 and coefficient 1.5046 (values quoted
    // from memory of the article's table, and confirmed by this fit to four decimals).
    const hours = [0.5, 0.75, 1, 1.25, 1.5, 1.75, 1.75, 2, 2.25, 2.5, 2.75, 3, 3.25, 3.5, 4, 4.25, 4.5, 4.75, 5, 5.5];
    const pass = [0, 0, 0, 0, 0, 0, 1, 0, 1, 0, 1, 0, 1, 0, 1, 1, 1, 1, 1, 1];
    const fit = fitLogistic(Float64Array.from(hours), Uint8Array.from(pass), 1, { l2: 0 });
    expect(fit.converged).toBe(true);
    expect(fit.intercept).toBeCloseTo(-4.0777, 3);
    expect(fit.weights[0]).toBeCloseTo(1.5046, 3);
  });

  it('matches the closed form of a single binary feature (saturated model)', () => {
    // Common practice (any text on logistic regression for a 2×2 table): without a penalty the
    // fitted probabilities equal the observed rates, so the intercept is the log odds of group 0
    // and the weight is the log odds ratio. Group 0: 1 of 4 positive; group 1: 4 of 5.
    const x = [0, 0, 0, 0, 1, 1, 1, 1, 1];
    const y = [0, 0, 0, 1, 1, 1, 1, 0, 1];
    const fit = fitLogistic(Float64Array.from(x), Uint8Array.from(y), 1, { l2: 0 });
    expect(fit.intercept).toBeCloseTo(Math.log(1 / 3), 8);
    expect(fit.weights[0]).toBeCloseTo(Math.log(4 / 1) - Math.log(1 / 3), 8);
    expect(predictProbability(fit, [1])).toBeCloseTo(0.8, 8);
  });

  it('with an L2 penalty, stops where the penalised gradient is zero', () => {
    // Separable data: without a penalty the weight would grow without bound.
    const x = Float64Array.from([0, 0.1, 0.2, 0.3, 0.7, 0.8, 0.9, 1, 0.5, 0.4, 0.6, 0.55].flatMap((v, i) => [v, (i * 7) % 5 / 5]));
    const y = Uint8Array.from([0, 0, 0, 0, 1, 1, 1, 1, 1, 0, 1, 1]);
    const l2 = 0.5;
    const fit = fitLogistic(x, y, 2, { l2 });
    expect(fit.converged).toBe(true);
    const grad = [0, 0, 0];
    for (let i = 0; i < y.length; i++) {
      const r = predictProbability(fit, x, i * 2) - y[i];
      grad[0] += r;
      grad[1] += r * x[i * 2];
      grad[2] += r * x[i * 2 + 1];
    }
    expect(Math.abs(grad[0])).toBeLessThan(1e-8);
    expect(Math.abs(grad[1] + l2 * fit.weights[0])).toBeLessThan(1e-8);
    expect(Math.abs(grad[2] + l2 * fit.weights[1])).toBeLessThan(1e-8);
    // A larger penalty shrinks the weights.
    const stronger = fitLogistic(x, y, 2, { l2: 5 });
    expect(Math.abs(stronger.weights[0])).toBeLessThan(Math.abs(fit.weights[0]));
  });

  it('is deterministic', () => {
    const x = Float64Array.from({ length: 60 }, (_, i) => ((i * 37) % 11) / 11);
    const y = Uint8Array.from({ length: 30 }, (_, i) => ((i * 5) % 3 === 0 ? 1 : 0));
    expect(fitLogistic(x, y, 2)).toEqual(fitLogistic(x, y, 2));
  });

  it('rejects mismatched inputs', () => {
    expect(() => fitLogistic(Float64Array.from([1, 2, 3]), Uint8Array.from([1, 0]), 2)).toThrow(RangeError);
    expect(() => fitLogistic(Float64Array.from([1, 2]), Uint8Array.from([1]), 1)).toThrow(/2 rows of features but 1 labels/);
    expect(() => fitLogistic(new Float64Array(0), new Uint8Array(0), 1)).toThrow(/no rows/);
  });

  it('sigmoid is stable at the extremes', () => {
    expect(sigmoid(0)).toBe(0.5);
    expect(sigmoid(800)).toBe(1);
    expect(sigmoid(-800)).toBe(0);
    expect(sigmoid(-30)).toBeGreaterThan(0);
  });
});
