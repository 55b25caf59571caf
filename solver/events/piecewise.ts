import { expm1Small } from './series.js';

/**
 * An unavailability q(t) as a sum of exponentials on pieces of the mission: on the piece
 * [starts[k], starts[k + 1]), with s = t - starts[k],
 *   1 - q(t) = constant[k] + sum_m c_m e^{-nu_m s}   (m over the piece's terms, every nu_m > 0),
 * and q(t) is evaluated as startQ[k] - sum_m c_m expm1(-nu_m s), which keeps its relative precision
 * when q is small (startQ comes from the closed forms, not from 1 - the coefficients). The failure modes
 * of an event and the events of an OR gate combine by multiplying their forms (1 - q of independent
 * items multiply), so a whole OR module is evaluated with one or two series exponentials per time.
 * An exponent may be split as nu = muPower mu + rest with the form's repair rate mu (muPower -1 when it
 * is not): on a repair transient the times then share one e^{-mu s} between the terms.
 */
export interface PiecewiseForm {
  readonly starts: Float64Array;
  /** q at each piece start, the value from there on. */
  readonly startQ: Float64Array;
  /** Coefficient of e^{0} in 1 - q on each piece. */
  readonly constant: Float64Array;
  /** Piece k's terms are termFirst[k] .. termFirst[k + 1] - 1. */
  readonly termFirst: Int32Array;
  readonly c: Float64Array;
  readonly nu: Float64Array;
  readonly muPower: Int8Array;
  readonly rest: Float64Array;
  /** The repair rate the exponents are split by (Infinity when none is). */
  readonly mu: number;
  /**
   * 1 where q is not a sum of exponentials (a repair rate equal to the failure rate gives mu s e^{-mu s});
   * those pieces are evaluated by exactAt.
   */
  readonly direct: Uint8Array;
  readonly exactAt: ((t: number, fromLeft: boolean) => number) | undefined;
}

/**
 * One piece while a form is being built: q at its start, and 1 - q as constant + sum_m c_m e^{-nu_m s}
 * with each exponent's split (muPower, rest). Reused from piece to piece, so building allocates little.
 */
export class Terms {
  q = 0;
  constant = 1;
  count = 0;
  direct = false;
  c = new Float64Array(8);
  nu = new Float64Array(8);
  muPower = new Int32Array(8);
  rest = new Float64Array(8);
  private spare = { c: new Float64Array(8), nu: new Float64Array(8), muPower: new Int32Array(8), rest: new Float64Array(8) };

  /** Back to q = 0, 1 - q = 1. */
  reset(): this {
    this.q = 0;
    this.constant = 1;
    this.count = 0;
    this.direct = false;
    return this;
  }

  /** Sets the terms to those given (a factor of one or two terms). */
  set(constant: number, c: readonly number[], nu: readonly number[], muPower: readonly number[], rest: readonly number[]): this {
    this.constant = constant;
    this.count = 0;
    for (let m = 0; m < c.length; m++) this.push(this, c[m], nu[m], muPower[m], rest[m]);
    return this;
  }

  /**
   * Multiplies the sum by another (1 - q of independent items on the same piece multiply), merging equal
   * exponents. Exponents split by the same repair rate stay split (sameMu); a factor split by another
   * rate keeps its exponents unsplit (muPower -1).
   */
  multiply(factor: Terms, sameMu: boolean): void {
    const { c, nu, muPower, rest, count } = this;
    const spare = this.spare;
    this.spare = { c, nu, muPower, rest };
    this.c = spare.c;
    this.nu = spare.nu;
    this.muPower = spare.muPower;
    this.rest = spare.rest;
    this.count = 0;
    const constant = this.constant;
    this.constant = constant * factor.constant;
    for (let m = 0; m < factor.count; m++) {
      const power = factor.muPower[m];
      this.push(this, constant * factor.c[m], factor.nu[m], sameMu || power <= 0 ? power : -1, factor.rest[m]);
    }
    for (let i = 0; i < count; i++) {
      this.push(this, c[i] * factor.constant, nu[i], muPower[i], rest[i]);
      for (let m = 0; m < factor.count; m++) {
        const power = sameMu || factor.muPower[m] <= 0 ? factor.muPower[m] : -1;
        const split = muPower[i] >= 0 && power >= 0;
        this.push(this, c[i] * factor.c[m], nu[i] + factor.nu[m], split ? muPower[i] + power : -1, split ? rest[i] + factor.rest[m] : 0);
      }
    }
  }

  /** Adds a term (into the constant when its exponent is 0, into a term of the same exponent if any). */
  private push(into: Terms, coefficient: number, exponent: number, power: number, remainder: number): void {
    if (coefficient === 0) return;
    if (exponent === 0) {
      into.constant += coefficient;
      return;
    }
    for (let m = 0; m < into.count; m++) {
      if (into.nu[m] === exponent) {
        into.c[m] += coefficient;
        return;
      }
    }
    if (into.count === into.c.length) this.reserve(2 * into.count);
    into.c[into.count] = coefficient;
    into.nu[into.count] = exponent;
    into.muPower[into.count] = power;
    into.rest[into.count] = remainder;
    into.count++;
  }

  /** Room for at least this many terms. */
  reserve(size: number): void {
    if (size <= this.c.length) return;
    const larger = <T extends Float64Array | Int32Array>(array: T): T => {
      const next = new (array.constructor as new (length: number) => T)(size);
      next.set(array);
      return next;
    };
    this.c = larger(this.c);
    this.nu = larger(this.nu);
    this.muPower = larger(this.muPower);
    this.rest = larger(this.rest);
    this.spare = { c: larger(this.spare.c), nu: larger(this.spare.nu), muPower: larger(this.spare.muPower), rest: larger(this.spare.rest) };
  }
}

/** Index of the last entry of a sorted array that is <= t (or < t when fromLeft), at least 0. */
export function pieceIndex(starts: Float64Array, t: number, fromLeft: boolean): number {
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

/** Collects pieces in increasing order of start into a form. */
export class FormBuilder {
  private readonly starts: number[] = [];
  private readonly startQ: number[] = [];
  private readonly constant: number[] = [];
  private readonly termFirst: number[] = [];
  private readonly c: number[] = [];
  private readonly nu: number[] = [];
  private readonly muPower: number[] = [];
  private readonly rest: number[] = [];
  private readonly direct: number[] = [];

  constructor(
    private readonly mu: number,
    private readonly exactAt?: (t: number, fromLeft: boolean) => number,
  ) {}

  add(start: number, piece: Terms): void {
    this.starts.push(start);
    this.startQ.push(piece.q);
    this.constant.push(piece.constant);
    this.termFirst.push(this.c.length);
    this.direct.push(piece.direct ? 1 : 0);
    if (piece.direct) return;
    for (let m = 0; m < piece.count; m++) {
      this.c.push(piece.c[m]);
      this.nu.push(piece.nu[m]);
      this.muPower.push(piece.muPower[m]);
      this.rest.push(piece.rest[m]);
    }
  }

  build(): PiecewiseForm {
    return {
      starts: Float64Array.from(this.starts),
      startQ: Float64Array.from(this.startQ),
      constant: Float64Array.from(this.constant),
      termFirst: Int32Array.from([...this.termFirst, this.c.length]),
      c: Float64Array.from(this.c),
      nu: Float64Array.from(this.nu),
      muPower: Int8Array.from(this.muPower),
      rest: Float64Array.from(this.rest),
      mu: this.mu,
      direct: Uint8Array.from(this.direct),
      exactAt: this.direct.some((flag) => flag === 1) ? this.exactAt : undefined,
    };
  }
}

/** q at time t (from the right, or the left limit) of a form: its piece's sum, or exactAt on a direct piece. */
export function formAt(form: PiecewiseForm, t: number, fromLeft = false): number {
  const piece = pieceIndex(form.starts, t, fromLeft);
  if (form.direct[piece] === 1) return (form.exactAt as (t: number, fromLeft: boolean) => number)(t, fromLeft);
  const s = t - form.starts[piece];
  let value = form.startQ[piece];
  for (let m = form.termFirst[piece]; m < form.termFirst[piece + 1]; m++) value -= form.c[m] * expm1Small(-form.nu[m] * s);
  return value;
}

/**
 * The terms of piece k of a form moved to a later anchor a inside the piece: c e^{-nu s} with s measured
 * from a has coefficient c e^{-nu (a - start)}.
 */
function shiftedTerms(form: PiecewiseForm, piece: number, a: number, out: Terms): void {
  const elapsed = a - form.starts[piece];
  out.reset();
  out.constant = form.constant[piece];
  const first = form.termFirst[piece];
  const count = form.termFirst[piece + 1] - first;
  out.reserve(count);
  out.count = count;
  for (let m = 0; m < count; m++) {
    out.c[m] = elapsed === 0 ? form.c[first + m] : form.c[first + m] * Math.exp(-form.nu[first + m] * elapsed);
    out.nu[m] = form.nu[first + m];
    out.muPower[m] = form.muPower[first + m];
    out.rest[m] = form.rest[first + m];
  }
}

/**
 * The OR of independent items given by their forms: 1 - q = prod (1 - q_i) on the union of their
 * pieces, q at each start combined as q <- q + q_i - q q_i from the items' own values (so it keeps their
 * relative precision). Items with a repair rate other than `mu` keep their exponents unsplit.
 * @param exactAt evaluates the OR directly, for pieces where an item has no sum of exponentials.
 */
export function orForms(forms: readonly PiecewiseForm[], mu: number, exactAt?: (t: number, fromLeft: boolean) => number): PiecewiseForm {
  const all: number[] = [];
  for (const form of forms) for (const start of form.starts) all.push(start);
  all.sort((a, b) => a - b);
  const builder = new FormBuilder(mu, exactAt);
  const at = new Int32Array(forms.length);
  const piece = new Terms();
  const scratch = new Terms();
  let previous = NaN;
  for (const a of all) {
    if (a === previous) continue;
    previous = a;
    piece.reset();
    let down = false;
    for (let index = 0; index < forms.length; index++) {
      const form = forms[index];
      while (at[index] + 1 < form.starts.length && form.starts[at[index] + 1] <= a) at[index]++;
      const k = at[index];
      // An item out of service on this piece (1 - q is 0 throughout) puts the OR out of service.
      if (form.direct[k] === 0 && form.constant[k] === 0 && form.termFirst[k + 1] === form.termFirst[k]) down = true;
      if (form.direct[k] === 1) piece.direct = true;
      if (down || piece.direct) continue;
      const qi = evaluatePiece(form, k, a);
      piece.q = piece.q + qi - piece.q * qi;
      shiftedTerms(form, k, a, scratch);
      piece.multiply(scratch, form.mu === mu);
    }
    if (down) {
      piece.reset();
      piece.q = 1;
      piece.constant = 0;
    }
    builder.add(a, piece);
  }
  return builder.build();
}

/** q at t inside piece k (or at its end). */
function evaluatePiece(form: PiecewiseForm, piece: number, t: number): number {
  const s = t - form.starts[piece];
  let value = form.startQ[piece];
  for (let m = form.termFirst[piece]; m < form.termFirst[piece + 1]; m++) value -= form.c[m] * expm1Small(-form.nu[m] * s);
  return value;
}

/** Whether times increase, a left limit coming before the value at the same time. */
export function inOrder(times: Float64Array, fromLeft?: Uint8Array): boolean {
  for (let j = 1; j < times.length; j++) {
    if (times[j] < times[j - 1]) return false;
    if (fromLeft !== undefined && times[j] === times[j - 1] && fromLeft[j] === 1 && fromLeft[j - 1] === 0) return false;
  }
  return true;
}

/**
 * Writes q(t) of a form at each time into qOut from offset (and, when wanted, rate (1 - q(t)) into wOut
 * from wOffset: the DU failure frequency of an event, or of an OR module with the members' summed rate).
 * When the times are in order (see inOrder; the curve and the quadrature give them so), each piece's
 * run of times is found by bisection and evaluated in one loop; otherwise each time on its own.
 * @param fromLeft when given, a 1 at index j asks for the left limit q(t-) at times[j].
 * @param ordered whether inOrder(times, fromLeft) holds (checked here when not given).
 * @param steps e^{-mu (t_j - t_{j-1})} at each j >= 1 for the form's mu (see repairSteps), when the
 *   caller shares them between forms; without them each time of a repair transient costs an exponential.
 */
export function evaluateForm(
  form: PiecewiseForm,
  times: Float64Array,
  qOut: Float64Array,
  offset: number,
  rate: number,
  wOut?: Float64Array,
  fromLeft?: Uint8Array,
  wOffset = offset,
  ordered = inOrder(times, fromLeft),
  steps?: Float64Array,
): void {
  const count = times.length;
  const { starts, startQ, termFirst, c, nu, direct } = form;
  const last = starts.length - 1;
  let j = 0;
  let piece = -1;
  while (j < count) {
    const t = times[j];
    const left = fromLeft !== undefined && fromLeft[j] === 1;
    if (ordered && piece >= 0 && piece < last && (starts[piece + 1] < t || (!left && starts[piece + 1] === t)) && (piece + 1 === last || starts[piece + 2] > t || (left && starts[piece + 2] === t))) {
      // In order, the next run is usually in the next piece.
      piece++;
    } else {
      piece = pieceIndex(starts, t, left);
    }
    const low = starts[piece];
    const high = piece < last ? starts[piece + 1] : Infinity;
    // The run: times up to the next piece start (a left limit at it still belongs here), in order; found
    // by doubling steps from j, then bisection.
    let end = j + 1;
    if (ordered) {
      let step = 1;
      let lo = end;
      let hi = count;
      while (lo + step < count) {
        const u = times[lo + step - 1];
        if (!(u < high || (u === high && fromLeft !== undefined && fromLeft[lo + step - 1] === 1))) {
          hi = lo + step - 1;
          break;
        }
        lo += step;
        step *= 2;
      }
      while (lo < hi) {
        const middle = (lo + hi) >> 1;
        const u = times[middle];
        if (u < high || (u === high && fromLeft !== undefined && fromLeft[middle] === 1)) lo = middle + 1;
        else hi = middle;
      }
      end = lo;
    }
    const q0 = startQ[piece];
    const first = termFirst[piece];
    const terms = termFirst[piece + 1] - first;
    if (direct[piece] === 1) {
      const exactAt = form.exactAt as (t: number, fromLeft: boolean) => number;
      for (let i = j; i < end; i++) qOut[offset + i] = exactAt(times[i], fromLeft !== undefined && fromLeft[i] === 1);
    } else if (terms === 0) {
      for (let i = j; i < end; i++) qOut[offset + i] = q0;
    } else if (terms === 1 && nu[first] * (times[end - 1] - low) <= 0.015625) {
      // |nu s| <= 1/64 on the whole run: expm1 from its series through s^7 (see expm1Small), or through
      // s^5 when |nu s| <= 2^-10 (truncation below 2^-50 / 6! < 1e-18 relative).
      const c0 = c[first];
      const nu0 = nu[first];
      if (nu0 * (times[end - 1] - low) <= 0.0009765625) singleTerm5(times, j, end, qOut, offset, q0, c0, nu0, low);
      else singleTerm7(times, j, end, qOut, offset, q0, c0, nu0, low);
    } else if (terms === 1) {
      const c0 = c[first];
      const nu0 = nu[first];
      for (let i = j; i < end; i++) qOut[offset + i] = q0 - c0 * expm1Small(-nu0 * (times[i] - low));
    } else {
      evaluateTerms(form, piece, times, j, end, qOut, offset, steps);
    }
    if (wOut) for (let i = j; i < end; i++) wOut[wOffset + i] = rate * (1 - qOut[offset + i]);
    j = end;
  }
}

/** e^{-mu (t_j - t_{j-1})} for j >= 1 (index 0 unused): the step of a repair transient's decay. */
export function repairSteps(times: Float64Array, mu: number, out = new Float64Array(times.length)): Float64Array {
  for (let j = 1; j < times.length; j++) out[j] = Math.exp(-mu * (times[j] - times[j - 1]));
  return out;
}

/**
 * A repair transient's e^{-mu s} is recomputed after this many steps of its product (each step one
 * rounding of the product and one of the step, so the drift stays below ~1e-14 relative; an exponential
 * costs as much as some thirty steps).
 */
const REANCHOR_STEPS = 64;

/**
 * Piece k's sum of several terms at times[j..end-1]. Where mu s > 1/4 and every term's small exponent
 * stays within the series' range, each split term e^{-(p mu + x) s} - 1 is (e^{-mu s})^p e^{-x s} - 1
 * (at least 0.22 in size, so computed without cancellation), with e^{-mu s} carried from time to time by
 * the shared steps and recomputed every REANCHOR_STEPS times; elsewhere each term is its own expm1.
 */
function evaluateTerms(form: PiecewiseForm, piece: number, times: Float64Array, j: number, end: number, qOut: Float64Array, offset: number, steps: Float64Array | undefined): void {
  const { starts, startQ, termFirst, c, nu, muPower, rest, mu } = form;
  const low = starts[piece];
  const q0 = startQ[piece];
  const first = termFirst[piece];
  const stop = termFirst[piece + 1];
  let series = steps !== undefined && mu !== Infinity;
  const longest = times[end - 1] - low;
  for (let m = first; m < stop && series; m++) if (muPower[m] < 0 || rest[m] * longest > 0.015625) series = false;
  if (!series) {
    for (let i = j; i < end; i++) {
      const s = times[i] - low;
      let value = q0;
      for (let m = first; m < stop; m++) value -= c[m] * expm1Small(-nu[m] * s);
      qOut[offset + i] = value;
    }
    return;
  }
  // Through s^5 when every small exponent stays within 2^-10 on the run, else through s^7.
  let quick = true;
  for (let m = first; m < stop; m++) if (rest[m] * longest > 0.0009765625) quick = false;
  // Within the first quarter of a repair time each term is its own expm1 (there e^{-nu s} - 1 is small
  // and the split would cancel); the times are in order, so those come first in the run.
  const early = low + 0.25 / mu;
  let split = j;
  while (split < end && times[split] <= early) {
    const s = times[split] - low;
    let value = q0;
    for (let m = first; m < stop; m++) value -= c[m] * expm1Small(-nu[m] * s);
    qOut[offset + split] = value;
    split++;
  }
  if (split === end) return;
  const shared = steps as Float64Array;
  let decay = Math.exp(-mu * (times[split] - low));
  let taken = 0;
  if (stop - first === 2 && muPower[first] === 0 && muPower[first + 1] === 1) {
    // One repair transient (the usual case): the steady term and the transient term.
    const c0 = c[first];
    const x0 = rest[first];
    const c1 = c[first + 1];
    const x1 = rest[first + 1];
    // In blocks of REANCHOR_STEPS times: e^{-mu s} computed at the block's first time, then carried.
    for (let block = split; block < end; block += REANCHOR_STEPS) {
      const stopAt = Math.min(end, block + REANCHOR_STEPS);
      let carried = Math.exp(-mu * (times[block] - low));
      if (quick) {
        for (let i = block; i < stopAt; i++) {
          if (i > block) carried *= shared[i];
          const s = times[i] - low;
          const y0 = -x0 * s;
          const y1 = -x1 * s;
          const steady = y0 * (1 + y0 * (0.5 + y0 * (1 / 6 + y0 * (1 / 24 + y0 * (1 / 120)))));
          const own = y1 * (1 + y1 * (0.5 + y1 * (1 / 6 + y1 * (1 / 24 + y1 * (1 / 120)))));
          qOut[offset + i] = q0 - c0 * steady - c1 * (carried * (1 + own) - 1);
        }
      } else {
        for (let i = block; i < stopAt; i++) {
          if (i > block) carried *= shared[i];
          const s = times[i] - low;
          qOut[offset + i] = q0 - c0 * series7(-x0 * s) - c1 * (carried * (1 + series7(-x1 * s)) - 1);
        }
      }
    }
    return;
  }
  if (stop - first === 4 && muPower[first] === 0 && muPower[first + 1] === 1 && muPower[first + 2] === 1 && muPower[first + 3] === 2) {
    // Two repair transients at once (two items tested together): the steady term, one term per
    // transient, and their product.
    const c0 = c[first];
    const c1 = c[first + 1];
    const c2 = c[first + 2];
    const c3 = c[first + 3];
    const x0 = rest[first];
    const x1 = rest[first + 1];
    const x2 = rest[first + 2];
    const x3 = rest[first + 3];
    for (let block = split; block < end; block += REANCHOR_STEPS) {
      const stopAt = Math.min(end, block + REANCHOR_STEPS);
      let carried = Math.exp(-mu * (times[block] - low));
      for (let i = block; i < stopAt; i++) {
        if (i > block) carried *= shared[i];
        const s = times[i] - low;
        const e0 = quick ? series5(-x0 * s) : series7(-x0 * s);
        const e1 = quick ? series5(-x1 * s) : series7(-x1 * s);
        const e2 = quick ? series5(-x2 * s) : series7(-x2 * s);
        const e3 = quick ? series5(-x3 * s) : series7(-x3 * s);
        qOut[offset + i] = q0 - c0 * e0 - c1 * (carried * (1 + e1) - 1) - c2 * (carried * (1 + e2) - 1) - c3 * (carried * carried * (1 + e3) - 1);
      }
    }
    return;
  }
  for (let i = split; i < end; i++) {
    const s = times[i] - low;
    if (i > split) {
      if (++taken === REANCHOR_STEPS) {
        decay = Math.exp(-mu * s);
        taken = 0;
      } else {
        decay *= shared[i];
      }
    }
    // Powers of e^{-mu s} up to the fourth (two or more repair transients at once give the higher ones).
    const decay2 = decay * decay;
    const decay3 = decay2 * decay;
    const decay4 = decay2 * decay2;
    let value = q0;
    for (let m = first; m < stop; m++) {
      const small = quick ? series5(-rest[m] * s) : series7(-rest[m] * s);
      const power = muPower[m];
      if (power === 0) value -= c[m] * small;
      else value -= c[m] * ((power === 1 ? decay : power === 2 ? decay2 : power === 3 ? decay3 : power === 4 ? decay4 : decay ** power) * (1 + small) - 1);
    }
    qOut[offset + i] = value;
  }
}

/** e^y - 1 through y^5/5! (truncation below 1e-18 relative for |y| <= 2^-10). */
function series5(y: number): number {
  return y * (1 + y * (0.5 + y * (1 / 6 + y * (1 / 24 + y * (1 / 120)))));
}

/** e^y - 1 through y^7/7! (truncation below 1e-17 relative for |y| <= 1/64, see expm1Small). */
function series7(y: number): number {
  return y * (1 + y * (0.5 + y * (1 / 6 + y * (1 / 24 + y * (1 / 120 + y * (1 / 720 + y * (1 / 5040)))))));
}

/**
 * q0 - c0 expm1(-nu0 (t - low)) at times[j..end-1] through the series to s^5 (|nu0 s| <= 2^-10 on the run).
 * The loops live in small functions of their own, where the compiler keeps them tight, and take two
 * times per step.
 */
function singleTerm5(times: Float64Array, j: number, end: number, qOut: Float64Array, offset: number, q0: number, c0: number, nu0: number, low: number): void {
  let i = j;
  for (const pairs = j + ((end - j) & ~1); i < pairs; i += 2) {
    qOut[offset + i] = q0 - c0 * series5(-nu0 * (times[i] - low));
    qOut[offset + i + 1] = q0 - c0 * series5(-nu0 * (times[i + 1] - low));
  }
  if (i < end) qOut[offset + i] = q0 - c0 * series5(-nu0 * (times[i] - low));
}

/** As singleTerm5, through s^7 (|nu0 s| <= 1/64 on the run). */
function singleTerm7(times: Float64Array, j: number, end: number, qOut: Float64Array, offset: number, q0: number, c0: number, nu0: number, low: number): void {
  let i = j;
  for (const pairs = j + ((end - j) & ~1); i < pairs; i += 2) {
    qOut[offset + i] = q0 - c0 * series7(-nu0 * (times[i] - low));
    qOut[offset + i + 1] = q0 - c0 * series7(-nu0 * (times[i + 1] - low));
  }
  if (i < end) qOut[offset + i] = q0 - c0 * series7(-nu0 * (times[i] - low));
}
