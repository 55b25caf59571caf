/**
 * e^y - 1, as Math.expm1, but for |y| <= 1/4 (DU failures over a test interval, lambda s << 1) from its
 * Taylor series: through y^7/7! for |y| <= 1/64 (truncation below |y| (1/64)^7/8! < 1e-17 |y|), else
 * through y^12/12! (below |y| 0.25^12/13! < 1e-17 |y|). A few multiply-adds in place of a library call,
 * on the hot path of every event at every time point. The coefficients are 1/n! written out, so that
 * the compiler sees constants.
 */
export function expm1Small(y: number): number {
  const size = Math.abs(y);
  if (size <= 0.015625) return y * (1 + y * (0.5 + y * (1 / 6 + y * (1 / 24 + y * (1 / 120 + y * (1 / 720 + y * (1 / 5040)))))));
  if (!(size <= 0.25)) return Math.expm1(y);
  const high = 1 / 5040 + y * (1 / 40320 + y * (1 / 362880 + y * (1 / 3628800 + y * (1 / 39916800 + y * (1 / 479001600)))));
  return y * (1 + y * (0.5 + y * (1 / 6 + y * (1 / 24 + y * (1 / 120 + y * (1 / 720 + y * high))))));
}
