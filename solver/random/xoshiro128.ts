/**
 * A seeded pseudo-random stream: xoshiro128** (Blackman and Vigna, "Scrambled linear pseudorandom number
 * generators", ACM TOMS 47(4), 2021), its 128-bit state filled from the seed by splitmix32 as the authors
 * recommend. 32-bit integer arithmetic only, so the stream is the same on every JavaScript engine.
 */
export interface RandomStream {
  /** A uniform double in [0, 1) with 53 random bits. */
  next(): number;
  /** An exponential variate with the given rate (per hour); Infinity for a zero rate. */
  exponential(rate: number): number;
}

function splitmix32(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x9e3779b9) >>> 0;
    let z = state;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    return (z ^ (z >>> 16)) >>> 0;
  };
}

/**
 * Creates a stream from an integer seed (any safe integer; the high and low 32 bits both feed the state).
 * Two streams made with the same seed give the same numbers.
 */
export function createRandomStream(seed: number): RandomStream {
  if (!Number.isSafeInteger(seed)) throw new Error(`the random seed must be a safe integer, got ${seed}`);
  const mix = splitmix32((seed ^ Math.floor(seed / 0x100000000)) >>> 0);
  const state = new Uint32Array([mix(), mix(), mix(), mix()]);
  if ((state[0] | state[1] | state[2] | state[3]) === 0) state[0] = 1;

  const nextUint32 = xoshiro128StarStar(state);

  const next = (): number => {
    const high = nextUint32() >>> 5;
    const low = nextUint32() >>> 6;
    return (high * 67108864 + low) / 9007199254740992;
  };

  return {
    next,
    exponential(rate: number): number {
      if (rate <= 0) return Infinity;
      return -Math.log1p(-next()) / rate;
    },
  };
}

/**
 * The raw xoshiro128** step on a caller-owned state of four 32-bit words (not all zero): returns a function
 * giving the next 32-bit output and advancing the state in place.
 */
export function xoshiro128StarStar(state: Uint32Array): () => number {
  return () => {
    const result = Math.imul(rotateLeft(Math.imul(state[1], 5) >>> 0, 7), 9) >>> 0;
    const shifted = (state[1] << 9) >>> 0;
    state[2] ^= state[0];
    state[3] ^= state[1];
    state[1] ^= state[2];
    state[0] ^= state[3];
    state[2] ^= shifted;
    state[3] = rotateLeft(state[3], 11);
    return result;
  };
}

function rotateLeft(value: number, bits: number): number {
  return ((value << bits) | (value >>> (32 - bits))) >>> 0;
}
