/**
 * The PDS method (SINTEF, "Reliability Prediction Method for Safety Instrumented Systems, PDS Method
 * Handbook", 2013 edition): the modification factors C_MooN of the beta factor for M-out-of-N voting
 * (M channels must act for the function to act), and the general MooN approximation of PFDavg.
 */

/**
 * C_MooN of the PDS method handbook 2013, Table 3.2 as recalled (from memory, not re-read for this
 * build): keyed by "MooN" for 1 <= M < N <= 6.
 */
export const PDS_C_MOON: Readonly<Record<string, number>> = {
  '1oo2': 1.0,
  '1oo3': 0.5,
  '2oo3': 2.0,
  '1oo4': 0.3,
  '2oo4': 1.1,
  '3oo4': 2.8,
  '1oo5': 0.2,
  '2oo5': 0.8,
  '3oo5': 1.6,
  '4oo5': 3.6,
  '1oo6': 0.15,
  '2oo6': 0.6,
  '3oo6': 1.2,
  '4oo6': 1.9,
  '5oo6': 4.5,
};

/** C_MooN for M-out-of-N voting, or undefined when the table has no such cell (M = N or N > 6). */
export function pdsFactor(m: number, n: number): number | undefined {
  return PDS_C_MOON[`${m}oo${n}`];
}

function factorial(value: number): number {
  let product = 1;
  for (let i = 2; i <= value; i++) product *= i;
  return product;
}

export interface PdsParameters {
  readonly m: number;
  readonly n: number;
  readonly lambdaDU: number;
  readonly beta: number;
  /** C_MooN; default: the table value (1 when M = N, where the common-cause term does not apply). */
  readonly factor?: number;
  /** Proof test interval tau, hours. */
  readonly proofTestIntervalHours: number;
}

/**
 * PFDavg of MooN voting by the PDS method (handbook 2013, section 5.3, as recalled, from memory):
 * C_MooN beta lambdaDU tau / 2 + N! / ((N - M + 1)! (M - 1)!) (lambdaDU tau)^(N-M+1) / (N - M + 2).
 * For M = N the common-cause term is left out (any single failure already fails the function).
 * Repair and test down times are not in this term (the handbook adds them separately).
 */
export function pdsPfdAvg(p: PdsParameters): number {
  const failuresNeeded = p.n - p.m + 1;
  const x = p.lambdaDU * p.proofTestIntervalHours;
  const combinations = factorial(p.n) / (factorial(failuresNeeded) * factorial(p.m - 1));
  const independent = (combinations * x ** failuresNeeded) / (failuresNeeded + 1);
  if (p.m === p.n) return independent;
  const factor = p.factor ?? pdsFactor(p.m, p.n);
  if (factor === undefined) throw new RangeError(`no PDS C_MooN for ${p.m}oo${p.n}`);
  return (factor * p.beta * x) / 2 + independent;
}
