/**
 * The simplified equations of IEC 61508-6:2010 Annex B for identical channels tested together: average
 * probability of failure on demand (B.3.2.2, low demand) and average frequency of dangerous failure
 * (B.3.3.2, high demand or continuous) of the 1oo1, 1oo2, 2oo2, 1oo2D, 2oo3 and 1oo3 architectures.
 * Valid when lambda T1 << 1 (the standard's own assumption, B.3.1).
 */
export interface ChannelParameters {
  /** Dangerous undetected failure rate of one channel, per hour. */
  readonly lambdaDU: number;
  /** Dangerous detected failure rate of one channel, per hour. */
  readonly lambdaDD: number;
  /** Safe detected failure rate, per hour (used by 1oo2D only). Default 0. */
  readonly lambdaSD?: number;
  /** Common-cause factor of undetected failures. Default 0. */
  readonly beta?: number;
  /** Common-cause factor of detected failures. Default 0. */
  readonly betaD?: number;
  /** Proof test interval T1, hours. */
  readonly proofTestIntervalHours: number;
  /** Mean time to restoration (detected failures), hours. */
  readonly mttrHours: number;
  /** Mean repair time of a failure found by the proof test, hours. Default: mttrHours. */
  readonly mrtHours?: number;
}

export const ANNEX_B_ARCHITECTURES = ['1oo1', '1oo2', '2oo2', '1oo2D', '2oo3', '1oo3'] as const;
export type AnnexBArchitecture = (typeof ANNEX_B_ARCHITECTURES)[number];

function parts(p: ChannelParameters) {
  const lambdaD = p.lambdaDU + p.lambdaDD;
  return {
    lambdaD,
    shareDU: lambdaD > 0 ? p.lambdaDU / lambdaD : 0,
    shareDD: lambdaD > 0 ? p.lambdaDD / lambdaD : 0,
    beta: p.beta ?? 0,
    betaD: p.betaD ?? 0,
    mrt: p.mrtHours ?? p.mttrHours,
    t1: p.proofTestIntervalHours,
  };
}

/** Channel equivalent mean down time tCE, IEC 61508-6:2010 B.3.2.2.1 (also B.3.3.2.1). */
export function channelDownTime(p: ChannelParameters): number {
  const { shareDU, shareDD, mrt, t1 } = parts(p);
  return shareDU * (t1 / 2 + mrt) + shareDD * p.mttrHours;
}

/** Voted group equivalent mean down time tGE, IEC 61508-6:2010 B.3.2.2.2. */
export function groupDownTime(p: ChannelParameters): number {
  const { shareDU, shareDD, mrt, t1 } = parts(p);
  return shareDU * (t1 / 3 + mrt) + shareDD * p.mttrHours;
}

/** Second group equivalent mean down time tG2E of 1oo3, IEC 61508-6:2010 B.3.2.2.6. */
export function secondGroupDownTime(p: ChannelParameters): number {
  const { shareDU, shareDD, mrt, t1 } = parts(p);
  return shareDU * (t1 / 4 + mrt) + shareDD * p.mttrHours;
}

/** tCE' and tGE' of 1oo2D, IEC 61508-6:2010 B.3.2.2.4. */
function diagnosedDownTimes(p: ChannelParameters): { channel: number; group: number } {
  const { mrt, t1 } = parts(p);
  const lambdaSD = p.lambdaSD ?? 0;
  const denominator = p.lambdaDU + p.lambdaDD + lambdaSD;
  const channel = denominator > 0 ? (p.lambdaDU * (t1 / 2 + mrt) + (p.lambdaDD + lambdaSD) * p.mttrHours) / denominator : 0;
  return { channel, group: t1 / 3 + mrt };
}

/** PFDavg of an architecture, IEC 61508-6:2010 B.3.2.2.1 to B.3.2.2.6. */
export function annexBPfdAvg(architecture: AnnexBArchitecture, p: ChannelParameters): number {
  const { lambdaD, beta, betaD, mrt, t1 } = parts(p);
  const independent = (1 - betaD) * p.lambdaDD + (1 - beta) * p.lambdaDU;
  const commonCause = betaD * p.lambdaDD * p.mttrHours + beta * p.lambdaDU * (t1 / 2 + mrt);
  const tCE = channelDownTime(p);
  switch (architecture) {
    case '1oo1':
      return lambdaD * tCE;
    case '2oo2':
      return 2 * lambdaD * tCE;
    case '1oo2':
      return 2 * independent ** 2 * tCE * groupDownTime(p) + commonCause;
    case '2oo3':
      return 6 * independent ** 2 * tCE * groupDownTime(p) + commonCause;
    case '1oo3':
      return 6 * independent ** 3 * tCE * groupDownTime(p) * secondGroupDownTime(p) + commonCause;
    case '1oo2D': {
      const times = diagnosedDownTimes(p);
      const lambdaSD = p.lambdaSD ?? 0;
      return 2 * (1 - beta) * p.lambdaDU * ((1 - beta) * p.lambdaDU + (1 - betaD) * p.lambdaDD + lambdaSD) * times.channel * times.group + commonCause;
    }
  }
}

/** PFH of an architecture, IEC 61508-6:2010 B.3.3.2.1 to B.3.3.2.6. */
export function annexBPfh(architecture: AnnexBArchitecture, p: ChannelParameters): number {
  const { beta, betaD } = parts(p);
  const independent = (1 - betaD) * p.lambdaDD + (1 - beta) * p.lambdaDU;
  const tCE = channelDownTime(p);
  switch (architecture) {
    case '1oo1':
      return p.lambdaDU;
    case '2oo2':
      return 2 * p.lambdaDU;
    case '1oo2':
      return 2 * independent * (1 - beta) * p.lambdaDU * tCE + beta * p.lambdaDU;
    case '2oo3':
      return 6 * independent * (1 - beta) * p.lambdaDU * tCE + beta * p.lambdaDU;
    case '1oo3':
      return 6 * independent ** 2 * (1 - beta) * p.lambdaDU * tCE * groupDownTime(p) + beta * p.lambdaDU;
    case '1oo2D': {
      const lambdaSD = p.lambdaSD ?? 0;
      return 2 * (1 - beta) * p.lambdaDU * ((1 - beta) * p.lambdaDU + (1 - betaD) * p.lambdaDD + lambdaSD) * diagnosedDownTimes(p).channel + beta * p.lambdaDU;
    }
  }
}

export interface ImperfectTestParameters {
  readonly lambdaDU: number;
  readonly lambdaDD: number;
  readonly mttrHours: number;
  /** Proof test interval T1 (hours) and the fraction of DU failures it reveals. */
  readonly proofTestIntervalHours: number;
  readonly proofTestCoverage: number;
  /** Partial test interval (hours) and the fraction of DU failures it reveals; omit when none. */
  readonly partialTestIntervalHours?: number;
  readonly partialTestCoverage?: number;
  /** Time to renewal of what no test reveals (the mission), hours. */
  readonly missionHours: number;
}

/**
 * 1oo1 PFDavg with partial and imperfect proof tests: each group of DU failures contributes
 * lambda_group (interval_group / 2 + MRT), the never-revealed group half the mission time. Common
 * practice (the usual linear approximation of imperfect and partial proof tests); reduces to IEC 61508-6
 * B.3.2.2.1 with full coverage and no partial test.
 */
export function imperfectTestPfdAvg(p: ImperfectTestParameters): number {
  const partial = p.partialTestIntervalHours !== undefined ? (p.partialTestCoverage ?? 0) : 0;
  const proof = Math.max(p.proofTestCoverage, partial);
  const partialInterval = p.partialTestIntervalHours ?? 0;
  return (
    p.lambdaDU * partial * (partialInterval / 2 + p.mttrHours) +
    p.lambdaDU * (proof - partial) * (p.proofTestIntervalHours / 2 + p.mttrHours) +
    p.lambdaDU * (1 - proof) * (p.missionHours / 2) +
    p.lambdaDD * p.mttrHours
  );
}
