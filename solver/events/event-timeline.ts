import { evaluateForm, FormBuilder, pieceIndex, Terms, type PiecewiseForm } from './piecewise.js';
import { expm1Small } from './series.js';

export { expm1Small } from './series.js';

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
  /** q(t) as a sum of exponentials on pieces of the mission, the form it is evaluated from. */
  readonly form: PiecewiseForm;
}

/** Beyond exp(-40) a repair transient is below 5e-18 of its size and is dropped. */
const NEGLIGIBLE_EXPONENT = 40;

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
  const timeline = {
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
  return { ...timeline, form: compileForm(timeline) };
}

/** Whether a phase starting at `start` has begun at t (strictly before t for a left limit). */
function begun(start: number, t: number, fromLeft: boolean): boolean {
  return start < t || (!fromLeft && start === t);
}

/** The DD chain's unavailability: lambda/(lambda+mu) (1 - e^{-(lambda+mu) t}), its steady state beyond exp(-40). */
function ddUnavailability(timeline: Omit<EventTimeline, 'form'>, t: number): number {
  if (timeline.mu === Infinity || timeline.lambdaDD === 0) return 0;
  const sumRate = timeline.lambdaDD + timeline.mu;
  const level = timeline.lambdaDD / sumRate;
  return t >= NEGLIGIBLE_EXPONENT / sumRate ? level : level * -Math.expm1(-sumRate * t);
}

/**
 * q(t) of one event from the per-mode closed forms (the left limit q(t-) when fromLeft). Between reveal
 * times, with s the time since the phase start, a revealed DU mode has
 * q_m = 1 - (1 - notWorking) e^{-lambda s} - factor (e^{-lambda s} - e^{-mu s}) (the three-state chain's
 * closed form, see repairedShare); the modes combine as q <- q + q_m - q q_m (the event is failed when any
 * of its independent modes is); a test window with the event out of service gives 1.
 */
export function unavailabilityAt(timeline: Omit<EventTimeline, 'form'>, t: number, fromLeft = false): number {
  if (timeline.constant !== undefined) return timeline.constant;
  const { windowStarts, windowEnds, mu } = timeline;
  if (windowStarts.length > 0 && begun(windowStarts[0], t, fromLeft)) {
    const window = pieceIndex(windowStarts, t, fromLeft);
    if (fromLeft ? t <= windowEnds[window] : t < windowEnds[window]) return 1;
  }
  let q = ddUnavailability(timeline, t);
  const repairHorizon = mu === Infinity ? 0 : NEGLIGIBLE_EXPONENT / mu;
  for (const { starts, notWorking, repairFactor, lambda, equalRates } of timeline.modes) {
    const phase = pieceIndex(starts, t, fromLeft);
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
    q = q + qm - q * qm;
  }
  if (timeline.lambdaNeverRevealed > 0) {
    const qn = -expm1Small(-timeline.lambdaNeverRevealed * t);
    q = q + qn - q * qn;
  }
  return q;
}

/**
 * The event's form (see PiecewiseForm). Pieces start at 0, at every test of any mode, at each test
 * window's start and end, where a repair transient falls below e^{-40} and where the DD chain settles.
 * On a piece from a, a revealed mode in the phase that began at p, with e = a - p, has
 * 1 - q_m = (1 - notWorking + factor) e^{-lambda e} e^{-lambda s} - factor e^{-mu e} e^{-mu s}
 * (s = t - a; the second term only while the repair transient lasts), the DD chain
 * 1 - q_DD = mu/(lambda+mu) + lambda/(lambda+mu) e^{-(lambda+mu) a} e^{-(lambda+mu) s} until it settles,
 * the never-revealed mode e^{-lambda t}; the piece's sum is their product.
 */
function compileForm(timeline: Omit<EventTimeline, 'form'>): PiecewiseForm {
  const { mu, modes, windowStarts, windowEnds } = timeline;
  const builder = new FormBuilder(mu, (t, fromLeft) => unavailabilityAt(timeline, t, fromLeft));
  if (timeline.constant !== undefined) {
    const piece = new Terms();
    piece.q = timeline.constant;
    piece.constant = 1 - timeline.constant;
    builder.add(0, piece);
    return builder.build();
  }
  const repairHorizon = mu === Infinity ? Infinity : NEGLIGIBLE_EXPONENT / mu;
  const bounds: number[] = [0];
  for (const mode of modes) {
    for (let phase = 0; phase < mode.starts.length; phase++) {
      bounds.push(mode.starts[phase]);
      if (mode.repairFactor[phase] !== 0 && !mode.equalRates) bounds.push(mode.starts[phase] + repairHorizon);
    }
  }
  for (let index = 0; index < windowStarts.length; index++) bounds.push(windowStarts[index], windowEnds[index]);
  const sumRate = timeline.lambdaDD + mu;
  const ddLevel = mu === Infinity ? 0 : timeline.lambdaDD / sumRate;
  const settled = NEGLIGIBLE_EXPONENT / sumRate;
  if (ddLevel > 0) bounds.push(settled);
  const starts = sortedUnique(Float64Array.from(bounds.filter((time) => time >= 0 && Number.isFinite(time))));
  const factor = new Terms();
  const piece = new Terms();
  for (const a of starts) {
    piece.reset();
    piece.q = unavailabilityAt(timeline, a);
    const window = windowStarts.length > 0 ? pieceIndex(windowStarts, a, false) : -1;
    if (window >= 0 && windowStarts[window] <= a && a < windowEnds[window]) {
      // Out of service for a test: 1 - q is 0 on the whole piece.
      piece.q = 1;
      piece.constant = 0;
      builder.add(a, piece);
      continue;
    }
    if (ddLevel > 0) {
      if (a < settled) factor.set(1 - ddLevel, [ddLevel * Math.exp(-sumRate * a)], [sumRate], [1], [timeline.lambdaDD]);
      else factor.set(1 - ddLevel, [], [], [], []);
      piece.multiply(factor, true);
    }
    for (const mode of modes) {
      const phase = pieceIndex(mode.starts, a, false);
      const begin = mode.starts[phase];
      const repair = mode.repairFactor[phase];
      const elapsed = a - begin;
      if (repair !== 0 && mode.equalRates) piece.direct = true;
      const kept = (1 - mode.notWorking[phase] + repair) * Math.exp(-mode.lambda * elapsed);
      // set() puts a term of exponent 0 (lambda 0) into the constant.
      if (repair !== 0 && !mode.equalRates && a < begin + repairHorizon) factor.set(0, [kept, -repair * Math.exp(-mu * elapsed)], [mode.lambda, mu], [0, 1], [mode.lambda, 0]);
      else factor.set(0, [kept], [mode.lambda], [0], [mode.lambda]);
      piece.multiply(factor, true);
    }
    const hidden = timeline.lambdaNeverRevealed;
    if (hidden > 0) {
      factor.set(0, [Math.exp(-hidden * a)], [hidden], [0], [hidden]);
      piece.multiply(factor, true);
    }
    builder.add(a, piece);
  }
  return builder.build();
}

/**
 * Writes q(t) (and, when wanted, w(t), the frequency of DU failures = lambdaDU (1 - q(t)), 0 in a test
 * window) of one event at each time into out arrays at the given offsets, from the event's form.
 * @param fromLeft when given, a 1 at index j asks for the left limit q(t-) at times[j].
 * @param wOffset where the event's row starts in wOut (default: offset).
 * @param ordered whether the times are in order (see inOrder; checked when not given).
 * @param steps the times' repair steps for the event's repair rate (see repairSteps), when shared.
 */
export function evaluateEventTimeline(
  timeline: EventTimeline,
  times: Float64Array,
  qOut: Float64Array,
  offset: number,
  wOut?: Float64Array,
  fromLeft?: Uint8Array,
  wOffset = offset,
  ordered?: boolean,
  steps?: Float64Array,
): void {
  evaluateForm(timeline.form, times, qOut, offset, timeline.lambdaDU, wOut, fromLeft, wOffset, ordered, steps);
}
