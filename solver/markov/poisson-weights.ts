/**
 * Poisson probabilities for uniformization, computed from the mode outwards and normalised over a window
 * (the idea of B. L. Fox and P. W. Glynn, "Computing Poisson probabilities", CACM 31(4), 1988), so large
 * means neither underflow nor overflow.
 */
export interface PoissonWindow {
  readonly left: number;
  readonly right: number;
  /** weights[k - left] = P(N = k), k in [left, right]. */
  readonly weights: Float64Array;
  /** Bound on the probability mass outside [left, right]. */
  readonly truncation: number;
}

/** Half-width in standard deviations of the window first computed, and a constant for small means. */
const WIDTH_SIGMAS = 8.5;
const WIDTH_EXTRA = 15;
/**
 * The computed window is then trimmed on each side while the mass cut off stays at or below this: the
 * Chernoff bound of the wide window is far below it, and every term trimmed saves a sparse product.
 */
export const TRIMMED_MASS = 4e-16;

export function poissonWindow(mean: number): PoissonWindow {
  if (mean === 0) return { left: 0, right: 0, weights: Float64Array.of(1), truncation: 0 };
  const spread = WIDTH_SIGMAS * Math.sqrt(mean) + WIDTH_EXTRA;
  const mode = Math.floor(mean);
  const left = Math.max(0, Math.floor(mean - spread));
  const right = Math.ceil(mean + spread);
  const weights = new Float64Array(right - left + 1);
  weights[mode - left] = 1;
  for (let k = mode + 1; k <= right; k += 1) weights[k - left] = (weights[k - 1 - left] * mean) / k;
  for (let k = mode - 1; k >= left; k -= 1) weights[k - left] = (weights[k + 1 - left] * (k + 1)) / mean;
  let total = 0;
  for (const weight of weights) total += weight;
  for (let index = 0; index < weights.length; index += 1) weights[index] /= total;
  let first = 0;
  let last = weights.length - 1;
  let cutBelow = 0;
  let cutAbove = 0;
  while (last > first && cutAbove + weights[last] <= TRIMMED_MASS) cutAbove += weights[last--];
  while (first < last && cutBelow + weights[first] <= TRIMMED_MASS) cutBelow += weights[first++];
  return {
    left: left + first,
    right: left + last,
    weights: weights.slice(first, last + 1),
    truncation: chernoffTails(mean, right, left) + cutBelow + cutAbove,
  };
}

/**
 * Chernoff bounds of the Poisson tails P(N > right) + P(N < left): exp(-mean) (e mean / x)^x for x above
 * the mean, the same form below it (M. Mitzenmacher and E. Upfal, "Probability and Computing", Thm 5.4).
 */
function chernoffTails(mean: number, right: number, left: number): number {
  const tail = (x: number) => Math.exp(-mean + x * (1 + Math.log(mean / x)));
  const upper = tail(right + 1);
  const lower = left > 0 ? tail(left - 1 > 0 ? left - 1 : 1e-300) : 0;
  return upper + lower;
}
