import type { GateType } from '../../../shared/model-file.js';

/**
 * Gate logic in words, and the MooN voting the user types. A voting gate stores k, the number of failed
 * inputs that fail it (shared/model-file.ts); "M out of N to trip" fails when N - M + 1 inputs have failed
 * (IEC 61508-6 Annex B, the MooN architectures; common practice).
 */
export function kFromMooN(m: number, n: number): number {
  return n - m + 1;
}

/** The M of "M out of N to trip" for a gate storing k with n inputs. */
export function mFromK(k: number, n: number): number {
  return n - k + 1;
}

/** What the card says: "fails when 2 of 3 inputs fail". */
export function gateLogicInWords(type: GateType, inputCount: number, k: number | undefined): string {
  if (inputCount === 0) return 'no inputs yet: connect events or gates';
  switch (type) {
    case 'or':
      return inputCount === 1 ? 'fails when its input fails' : `fails when any of ${inputCount} inputs fails`;
    case 'and':
      return inputCount === 1 ? 'fails when its input fails' : `fails when all ${inputCount} inputs fail`;
    case 'atLeast':
      return k === undefined ? `voting over ${inputCount} inputs: k not set` : `fails when ${k} of ${inputCount} inputs fail`;
  }
}

/** The voting as engineers say it, "2oo3 to trip", when k fits the inputs. */
export function votingLabel(k: number | undefined, inputCount: number): string | null {
  if (k === undefined || k < 1 || k > inputCount) return null;
  return `${mFromK(k, inputCount)}oo${inputCount} to trip`;
}
