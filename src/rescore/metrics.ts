/**
 * Held-out quality of the scorer: area under the ROC curve and expected calibration error.
 *
 * AUC is computed in its Mann–Whitney form: the probability that a random positive scores
 * above a random negative, ties counting one half, i.e. (R₊ − n₊(n₊+1)/2) / (n₊·n₋) where R₊ is
 * the sum of the positives' ranks among all scores, tied scores sharing their mean rank.
 *
 * ECE (equal-width bins, as in Naeini, Cooper & Hauskrecht 2015 and Guo et al. 2017): split
 * [0, 1] into `bins` intervals [k/B, (k+1)/B) (the last one closed), and sum over bins
 * |mean predicted − observed positive rate| weighted by the bin's share of the pairs.
 */

function checkInputs(scores: ArrayLike<number>, labels: ArrayLike<number>, what: string): void {
  if (scores.length !== labels.length) throw new RangeError(`${what}: ${scores.length} scores but ${labels.length} labels`);
  for (let i = 0; i < labels.length; i++) {
    if (labels[i] !== 0 && labels[i] !== 1) throw new RangeError(`${what}: label ${i} is ${labels[i]}, expected 0 or 1`);
    if (!Number.isFinite(scores[i])) throw new RangeError(`${what}: score ${i} is ${scores[i]}, expected a finite number`);
  }
}

/** Rank-based AUC with tied scores at their mean rank; NaN when one class is empty. */
export function rocAuc(scores: ArrayLike<number>, labels: ArrayLike<number>): number {
  checkInputs(scores, labels, 'rocAuc');
  const n = scores.length;
  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => scores[a] - scores[b]);
  let rankSumPositives = 0;
  let positives = 0;
  for (let i = 0; i < n; ) {
    let j = i;
    while (j + 1 < n && scores[order[j + 1]] === scores[order[i]]) j++;
    const meanRank = (i + j + 2) / 2; // ranks are 1-based: positions i..j hold ranks i+1..j+1
    for (let k = i; k <= j; k++) {
      if (labels[order[k]] === 1) {
        rankSumPositives += meanRank;
        positives++;
      }
    }
    i = j + 1;
  }
  const negatives = n - positives;
  if (positives === 0 || negatives === 0) return NaN;
  return (rankSumPositives - (positives * (positives + 1)) / 2) / (positives * negatives);
}

/** Expected calibration error over `bins` equal-width bins of the predicted probability. */
export function expectedCalibrationError(scores: ArrayLike<number>, labels: ArrayLike<number>, bins = 10): number {
  checkInputs(scores, labels, 'expectedCalibrationError');
  if (!Number.isInteger(bins) || bins < 1) throw new RangeError(`expectedCalibrationError: bins must be an integer >= 1, got ${bins}`);
  const n = scores.length;
  if (n === 0) return NaN;
  const count = new Float64Array(bins);
  const sumScore = new Float64Array(bins);
  const sumLabel = new Float64Array(bins);
  for (let i = 0; i < n; i++) {
    const s = scores[i];
    if (s < 0 || s > 1) throw new RangeError(`expectedCalibrationError: score ${i} is ${s}, expected a probability in [0, 1]`);
    const b = Math.min(bins - 1, Math.floor(s * bins));
    count[b]++;
    sumScore[b] += s;
    sumLabel[b] += labels[i];
  }
  let ece = 0;
  for (let b = 0; b < bins; b++) {
    if (count[b] === 0) continue;
    ece += (count[b] / n) * Math.abs(sumScore[b] / count[b] - sumLabel[b] / count[b]);
  }
  return ece;
}
