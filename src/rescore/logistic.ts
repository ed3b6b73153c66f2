/**
 * Binary logistic regression with an L2 penalty, fitted by Newton's method (iteratively
 * reweighted least squares). The scorer has about a dozen features and a few thousand
 * training pairs, so each Newton step is one small (d+1)×(d+1) solve: the fit converges in a
 * handful of steps, is exactly deterministic (no learning rate, no shuffling), and needs no
 * dependency. The npm packages for logistic regression fit by gradient descent with a fixed
 * learning rate and iteration count, which leaves the result depending on those knobs; see
 * docs/SCORER.md.
 *
 * Objective (minimised): −Σ [yᵢ log pᵢ + (1 − yᵢ) log(1 − pᵢ)] + (λ/2)‖w‖², with
 * pᵢ = σ(b + w·xᵢ). The intercept b is not penalised. With λ > 0 the objective is strictly
 * convex, so a minimum exists even when the classes are separable.
 */

export interface LogisticModel {
  intercept: number;
  weights: Float64Array;
}

export interface LogisticFit extends LogisticModel {
  iterations: number;
  converged: boolean;
  /** Penalised negative log-likelihood at the solution. */
  loss: number;
}

export interface LogisticOptions {
  /** L2 penalty λ on the weights (not the intercept). Default 1. */
  l2?: number;
  /** Newton steps at most. Default 50. */
  maxIterations?: number;
  /** Stop when the largest change of a coefficient is below this. Default 1e-9. */
  tolerance?: number;
}

export const sigmoid = (z: number): number => (z >= 0 ? 1 / (1 + Math.exp(-z)) : Math.exp(z) / (1 + Math.exp(z)));

/** σ(b + w·x) for a feature vector x (read from `x` at `offset`). */
export function predictProbability(model: LogisticModel, x: ArrayLike<number>, offset = 0): number {
  let z = model.intercept;
  const w = model.weights;
  for (let j = 0; j < w.length; j++) z += w[j] * x[offset + j];
  return sigmoid(z);
}

function penalisedLoss(x: Float64Array, y: Uint8Array, n: number, d: number, beta: Float64Array, l2: number): number {
  let loss = 0;
  for (let i = 0; i < n; i++) {
    let z = beta[0];
    for (let j = 0; j < d; j++) z += beta[j + 1] * x[i * d + j];
    // log(1 + e^z) computed stably; the loss of one row is log(1 + e^z) − y·z.
    const softplus = z > 0 ? z + Math.log1p(Math.exp(-z)) : Math.log1p(Math.exp(z));
    loss += softplus - (y[i] ? z : 0);
  }
  for (let j = 1; j <= d; j++) loss += 0.5 * l2 * beta[j] * beta[j];
  return loss;
}

/** Solve A·s = g for symmetric positive definite A (k×k, row-major) by Cholesky; A is overwritten. */
function choleskySolve(a: Float64Array, g: Float64Array, k: number): Float64Array {
  for (let j = 0; j < k; j++) {
    let diag = a[j * k + j];
    for (let m = 0; m < j; m++) diag -= a[j * k + m] * a[j * k + m];
    if (!(diag > 0)) throw new RangeError('logistic regression: the Hessian is not positive definite (give l2 > 0, or check for constant features)');
    const l = Math.sqrt(diag);
    a[j * k + j] = l;
    for (let i = j + 1; i < k; i++) {
      let v = a[i * k + j];
      for (let m = 0; m < j; m++) v -= a[i * k + m] * a[j * k + m];
      a[i * k + j] = v / l;
    }
  }
  const s = new Float64Array(k);
  for (let i = 0; i < k; i++) {
    let v = g[i];
    for (let m = 0; m < i; m++) v -= a[i * k + m] * s[m];
    s[i] = v / a[i * k + i];
  }
  for (let i = k - 1; i >= 0; i--) {
    let v = s[i];
    for (let m = i + 1; m < k; m++) v -= a[m * k + i] * s[m];
    s[i] = v / a[i * k + i];
  }
  return s;
}

/**
 * Fit on `n` rows of `d` features, `x` row-major (x[i·d + j]), labels `y` (0 or 1).
 * Newton steps are halved while they do not lower the objective, so every step is a descent.
 */
export function fitLogistic(x: Float64Array, y: Uint8Array, d: number, options: LogisticOptions = {}): LogisticFit {
  const l2 = options.l2 ?? 1;
  const maxIterations = options.maxIterations ?? 50;
  const tolerance = options.tolerance ?? 1e-9;
  if (!Number.isInteger(d) || d < 0) throw new RangeError(`fitLogistic: d must be an integer >= 0, got ${d}`);
  if (x.length % Math.max(1, d) !== 0 && d > 0) throw new RangeError(`fitLogistic: x has ${x.length} values, not a multiple of d = ${d}`);
  const n = d > 0 ? x.length / d : y.length;
  if (y.length !== n) throw new RangeError(`fitLogistic: ${n} rows of features but ${y.length} labels`);
  if (n === 0) throw new RangeError('fitLogistic: no rows to fit');
  if (!(l2 >= 0)) throw new RangeError(`fitLogistic: l2 must be >= 0, got ${l2}`);
  const k = d + 1;
  const beta = new Float64Array(k);
  let loss = penalisedLoss(x, y, n, d, beta, l2);
  const grad = new Float64Array(k);
  const hess = new Float64Array(k * k);
  let iterations = 0;
  let converged = false;
  while (iterations < maxIterations) {
    iterations++;
    grad.fill(0);
    hess.fill(0);
    for (let i = 0; i < n; i++) {
      let z = beta[0];
      const row = i * d;
      for (let j = 0; j < d; j++) z += beta[j + 1] * x[row + j];
      const p = sigmoid(z);
      const r = p - y[i];
      const w = p * (1 - p);
      grad[0] += r;
      hess[0] += w;
      for (let j = 0; j < d; j++) {
        const xj = x[row + j];
        grad[j + 1] += r * xj;
        hess[j + 1] += w * xj;
        for (let m = 0; m <= j; m++) hess[(j + 1) * k + (m + 1)] += w * xj * x[row + m];
      }
    }
    for (let j = 1; j < k; j++) {
      hess[j * k] = hess[j];
      grad[j] += l2 * beta[j];
      hess[j * k + j] += l2;
      for (let m = 1; m < j; m++) hess[m * k + j] = hess[j * k + m];
    }
    // A tiny ridge on the intercept keeps the solve defined when every label is the same.
    hess[0] += 1e-12;
    const step = choleskySolve(hess, grad, k);
    let t = 1;
    const trial = new Float64Array(k);
    let trialLoss = Infinity;
    for (let halvings = 0; halvings < 40; halvings++) {
      for (let j = 0; j < k; j++) trial[j] = beta[j] - t * step[j];
      trialLoss = penalisedLoss(x, y, n, d, trial, l2);
      if (trialLoss <= loss) break;
      t /= 2;
    }
    let change = 0;
    for (let j = 0; j < k; j++) change = Math.max(change, Math.abs(trial[j] - beta[j]));
    if (trialLoss <= loss) {
      beta.set(trial);
      loss = trialLoss;
    }
    if (change < tolerance || trialLoss > loss) {
      converged = change < tolerance;
      break;
    }
  }
  return { intercept: beta[0], weights: beta.slice(1), iterations, converged, loss };
}
