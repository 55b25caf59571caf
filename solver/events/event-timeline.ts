/**
 * Exact unavailability q(t) and dangerous failure frequency w(t) of one basic event under its own test
 * and repair policy.
 *
 * The event's failure modes are independent of each other (as in the textbook formulas, Rausand &
 * Hoyland, System Reliability Theory, 2nd ed., section 8.3-8.4 and IEC 61508-6:2010 B.3):
 * - dangerous detected (DD): revealed at once and repaired at rate mu = 1/MTTR, a two-state Markov chain
 *   with q(t) = lambda/(lambda+mu) (1 - exp(-(lambda+mu) t));
 * - each group of dangerous undetected (DU) failures revealed at a set of test times: a three-state chain
 *   (working, failed hidden, under repair) whose hidden failures move to repair at each test, solved in
 *   closed form between tests;
 * - DU failures never revealed before the mission ends: q(t) = 1 - exp(-lambda t).
 * The event is failed when any mode is failed: q = 1 - prod(1 - q_mode). During a test with the event
 * taken out of service it is failed (q = 1).
 */
export interface RevealedModeSpec {
  /** Rate of the DU failures this group covers, per hour. */
  readonly lambda: number;
  /** Test times (hours, increasing, > 0) at which these failures are found. */
  readonly revealTimes: readonly number[];
}

export interface EventTimelineSpec {
  /** A constant probability on demand; when set, every rate below is ignored. */
  readonly probability?: number;
  readonly lambdaDD: number;
  /** Mean time to restoration (hours) of a revealed failure; 0 means restored at once. */
  readonly mttrHours: number;
  readonly revealed: readonly RevealedModeSpec[];
  /** Rate of DU failures that stay hidden to the end of the mission. */
  readonly lambdaNeverRevealed: number;
  /** Intervals [start, end) during which the event is out of service for a test. */
  readonly downWindows: readonly (readonly [number, number])[];
}

interface CompiledMode {
  readonly lambda: number;
  /** Phase starts: 0 then each reveal time. */
  readonly starts: Float64Array;
  /** 1 - P(working) at each phase start, after the test's jump. */
  readonly notWorking: Float64Array;
  /**
   * P(under repair) at the phase start times mu / (mu - lambda), the factor of the repaired share
   * (e^{-lambda s} - e^{-mu s}) in q(t); precomputed so that no division is left per time point.
   */
  readonly repairFactor: Float64Array;
  /** Whether mu and lambda are equal to 1e-12 relative, where the repaired share is mu s e^{-lambda s}. */
  readonly equalRates: boolean;
}

/** A compiled event, ready to be evaluated at many times. */
export interface EventTimeline {
  readonly constant: number | undefined;
  readonly lambdaDD: number;
  /** Repair rate; Infinity when MTTR is 0. */
  readonly mu: number;
  readonly modes: readonly CompiledMode[];
  readonly lambdaNeverRevealed: number;
  /** Rate of DU failures, the failures that count in the failure frequency w(t). */
  readonly lambdaDU: number;
  readonly windowStarts: Float64Array;
  readonly windowEnds: Float64Array;
  /** Times where q(t) jumps, increasing. */
  readonly breakpoints: Float64Array;
}

/** Beyond exp(-40) a repair transient is below 5e-18 of its size and is dropped. */
const NEGLIGIBLE_EXPONENT = 40;

const INVERSE_FACTORIALS = [1, 1 / 2, 1 / 6, 1 / 24, 1 / 120, 1 / 720, 1 / 5040, 1 / 40320, 1 / 362880, 1 / 3628800, 1 / 39916800, 1 / 479001600];
const [F1, F2, F3, F4, F5, F6, F7, F8, F9, F10, F11, F12] = INVERSE_FACTORIALS;

/**
 * e^y - 1, as Math.expm1, but for |y| <= 1/4 (DU failures over a test interval, lambda s << 1) from its
 * Taylor series: through y^7/7! for |y| <= 1/64 (truncation below |y| (1/64)^7/8! < 1e-17 |y|), else
 * through y^12/12! (below |y| 0.25^12/13! < 1e-17 |y|). A few multiply-adds in place of a library call,
 * on the hot path of every event at every time point.
 */
export function expm1Small(y: number): number {
  const size = Math.abs(y);
  if (size <= 0.015625) return y * (F1 + y * (F2 + y * (F3 + y * (F4 + y * (F5 + y * (F6 + y * F7))))));
  if (!(size <= 0.25)) return Math.expm1(y);
  return y * (F1 + y * (F2 + y * (F3 + y * (F4 + y * (F5 + y * (F6 + y * (F7 + y * (F8 + y * (F9 + y * (F10 + y * (F11 + y * F12)))))))))));
}

/**
 * mu (e^{-lambda s} - e^{-mu s}) / (mu - lambda): the probability mass that was under repair at the
 * phase start and is working again at s (the working state's share of the repair flow), per unit mass.
 */
function repairedShare(lambda: number, mu: number, s: number): number {
  if (mu === Infinity) return Math.exp(-lambda * s);
  const decayMu = mu * s > NEGLIGIBLE_EXPONENT ? 0 : Math.exp(-mu * s);
  const decayLambda = Math.exp(-lambda * s);
  if (Math.abs(mu - lambda) <= 1e-12 * mu) return mu * s * decayLambda;
  return (mu * (decayLambda - decayMu)) / (mu - lambda);
}

function sortedUnique(values: Float64Array): Float64Array {
  values.sort();
  let length = 0;
  for (let i = 0; i < values.length; i++) if (i === 0 || values[i] !== values[length - 1]) values[length++] = values[i];
  return values.slice(0, length);
}

/** Compiles an event spec; throws RangeError on rates or times that are not finite and non-negative. */
export function compileEventTimeline(spec: EventTimelineSpec): EventTimeline {
  const mu = spec.mttrHours > 0 ? 1 / spec.mttrHours : Infinity;
  const modes: CompiledMode[] = [];
  let lambdaDU = spec.lambdaNeverRevealed;
  const breakpoints: number[] = [];
  for (const mode of spec.revealed) {
    if (!(mode.lambda >= 0) || !Number.isFinite(mode.lambda)) throw new RangeError(`rate ${mode.lambda} is not a finite non-negative number`);
    lambdaDU += mode.lambda;
    const times = sortedUnique(Float64Array.from(mode.revealTimes));
    const starts = new Float64Array(times.length + 1);
    starts.set(times, 1);
    const notWorking = new Float64Array(starts.length);
    const repairing = new Float64Array(starts.length);
    for (let phase = 1; phase < starts.length; phase++) {
      const span = starts[phase] - starts[phase - 1];
      const working = 1 - notWorking[phase - 1];
      const before = notWorking[phase - 1] + working * -Math.expm1(-mode.lambda * span) - repairing[phase - 1] * repairedShare(mode.lambda, mu, span);
      // The test moves hidden failures into repair: the non-working mass is unchanged and is all under
      // repair afterwards (or working again at once when MTTR is 0).
      notWorking[phase] = mu === Infinity ? 0 : before;
      repairing[phase] = notWorking[phase];
      breakpoints.push(starts[phase]);
    }
    const equalRates = mu !== Infinity && Math.abs(mu - mode.lambda) <= 1e-12 * mu;
    const repairFactor = repairing.map((value) => (mu === Infinity || value === 0 ? 0 : equalRates ? value : (value * mu) / (mu - mode.lambda)));
    modes.push({ lambda: mode.lambda, starts, notWorking, repairFactor, equalRates });
  }
  const windowStarts = new Float64Array(spec.downWindows.map((window) => window[0]));
  const windowEnds = new Float64Array(spec.downWindows.map((window) => window[1]));
  for (const [start, end] of spec.downWindows) breakpoints.push(start, end);
  return {
    constant: spec.probability,
    lambdaDD: spec.lambdaDD,
    mu,
    modes,
    lambdaNeverRevealed: spec.lambdaNeverRevealed,
    lambdaDU,
    windowStarts,
    windowEnds,
    breakpoints: sortedUnique(Float64Array.from(breakpoints)),
  };
}

/** Index of the last entry of a sorted array that is <= t (or < t when fromLeft), at least 0. */
function phaseIndex(starts: Float64Array, t: number, fromLeft: boolean): number {
  let low = 0;
  let high = starts.length - 1;
  while (low < high) {
    const middle = (low + high + 1) >> 1;
    const start = starts[middle];
    if (start < t || (!fromLeft && start === t)) low = middle;
    else high = middle - 1;
  }
  return low;
}

/** Whether the phase after `phase` has begun at t (strictly before t for a left limit). */
function begun(start: number, t: number, fromLeft: boolean): boolean {
  return start < t || (!fromLeft && start === t);
}

/**
 * Adds one revealed DU mode's unavailability to q at each time: q <- q + q_m - q q_m (the event is failed
 * when any of its independent modes is). Between reveal times, with s the time since the phase start,
 * q_m = 1 - (1 - notWorking) e^{-lambda s} - factor (e^{-lambda s} - e^{-mu s}) (the three-state chain's
 * closed form, see repairedShare). One loop per mode over every time keeps the loop small for the JIT;
 * the phase moves forward with the (usually sorted) times and is searched only when they step back.
 */
function addRevealedMode(mode: CompiledMode, mu: number, times: Float64Array, q: Float64Array, offset: number, fromLeft: Uint8Array | undefined): void {
  const { starts, notWorking, repairFactor, lambda, equalRates } = mode;
  const last = starts.length - 1;
  const repairHorizon = mu === Infinity ? 0 : NEGLIGIBLE_EXPONENT / mu;
  let phase = 0;
  let previous = -Infinity;
  for (let j = 0; j < times.length; j++) {
    const t = times[j];
    const left = fromLeft !== undefined && fromLeft[j] === 1;
    if (t < previous) phase = phaseIndex(starts, t, left);
    previous = t;
    while (phase < last && begun(starts[phase + 1], t, left)) phase++;
    while (phase > 0 && !begun(starts[phase], t, left)) phase--;
    const s = t - starts[phase];
    const down = notWorking[phase];
    const lambdaTerm = expm1Small(-lambda * s);
    let qm = down - (1 - down) * lambdaTerm;
    const factor = repairFactor[phase];
    if (factor !== 0) {
      const decayLambda = 1 + lambdaTerm;
      if (equalRates) qm -= factor * mu * s * decayLambda;
      else qm -= factor * (s < repairHorizon ? decayLambda - Math.exp(-mu * s) : decayLambda);
    }
    const at = offset + j;
    const value = q[at];
    q[at] = value + qm - value * qm;
  }
}

/**
 * Writes q(t) (and, when wanted, w(t), the frequency of DU failures = lambdaDU (1 - q(t)) outside test
 * windows) of one event at each time into out arrays at the given offsets.
 * @param fromLeft when given, a 1 at index j asks for the left limit q(t-) at times[j].
 * @param wOffset where the event's row starts in wOut (default: offset).
 */
export function evaluateEventTimeline(
  timeline: EventTimeline,
  times: Float64Array,
  qOut: Float64Array,
  offset: number,
  wOut?: Float64Array,
  fromLeft?: Uint8Array,
  wOffset = offset,
): void {
  const count = times.length;
  if (timeline.constant !== undefined) {
    qOut.fill(timeline.constant, offset, offset + count);
    if (wOut) wOut.fill(0, wOffset, wOffset + count);
    return;
  }
  const sumRate = timeline.lambdaDD + timeline.mu;
  const ddLevel = timeline.mu === Infinity ? 0 : timeline.lambdaDD / sumRate;
  if (ddLevel > 0) {
    // The DD chain has reached its steady state within rounding beyond exp(-40).
    const settled = NEGLIGIBLE_EXPONENT / sumRate;
    for (let j = 0; j < count; j++) {
      const t = times[j];
      qOut[offset + j] = t >= settled ? ddLevel : ddLevel * -Math.expm1(-sumRate * t);
    }
  } else {
    qOut.fill(0, offset, offset + count);
  }
  for (const mode of timeline.modes) addRevealedMode(mode, timeline.mu, times, qOut, offset, fromLeft);
  const hidden = timeline.lambdaNeverRevealed;
  if (hidden > 0) {
    for (let j = 0; j < count; j++) {
      const qn = -expm1Small(-hidden * times[j]);
      const value = qOut[offset + j];
      qOut[offset + j] = value + qn - value * qn;
    }
  }
  if (wOut) {
    const lambdaDU = timeline.lambdaDU;
    for (let j = 0; j < count; j++) wOut[wOffset + j] = lambdaDU * (1 - qOut[offset + j]);
  }
  const windowStarts = timeline.windowStarts;
  if (windowStarts.length === 0) return;
  const windowEnds = timeline.windowEnds;
  let window = -1;
  let previous = -Infinity;
  for (let j = 0; j < count; j++) {
    const t = times[j];
    const left = fromLeft !== undefined && fromLeft[j] === 1;
    if (t < previous) window = phaseIndex(windowStarts, t, left) - (begun(windowStarts[0], t, left) ? 0 : 1);
    previous = t;
    while (window + 1 < windowStarts.length && begun(windowStarts[window + 1], t, left)) window++;
    while (window >= 0 && !begun(windowStarts[window], t, left)) window--;
    if (window >= 0 && (left ? t <= windowEnds[window] : t < windowEnds[window])) {
      qOut[offset + j] = 1;
      if (wOut) wOut[wOffset + j] = 0;
    }
  }
}
