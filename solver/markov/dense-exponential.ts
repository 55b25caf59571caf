/**
 * Dense matrix exponential by Pade-13 scaling and squaring (N. J. Higham, "The scaling and squaring method
 * for the matrix exponential revisited", SIAM J. Matrix Anal. Appl. 26(4), 2005, Algorithm 2.3 with
 * m = 13 only). Matrices are square, row-major Float64Arrays of size n * n.
 */

const PADE_13 = [
  64764752532480000, 32382376266240000, 7771770303897600, 1187353796428800, 129060195264000, 10559470521600,
  670442572800, 33522128640, 1323241920, 40840800, 960960, 16380, 182, 1,
];
/** theta_13 of Higham (2005), Table 2.3: the largest 1-norm for which Pade-13 needs no scaling. */
const THETA_13 = 5.371920351148152;

/**
 * C = A B for n x n row-major matrices, i-k-j order with two rows of B per pass, so the inner loop runs
 * along rows and each pass over a row of C does two multiply-adds.
 */
export function multiply(a: Float64Array, b: Float64Array, n: number, out = new Float64Array(n * n)): Float64Array {
  out.fill(0);
  for (let i = 0; i < n; i += 1) {
    const rowOffset = i * n;
    let k = 0;
    for (; k + 1 < n; k += 2) {
      const first = a[rowOffset + k];
      const second = a[rowOffset + k + 1];
      if (first === 0 && second === 0) continue;
      const firstOffset = k * n;
      const secondOffset = firstOffset + n;
      for (let j = 0; j < n; j += 1) out[rowOffset + j] += first * b[firstOffset + j] + second * b[secondOffset + j];
    }
    if (k < n) {
      const factor = a[rowOffset + k];
      const bOffset = k * n;
      if (factor !== 0) for (let j = 0; j < n; j += 1) out[rowOffset + j] += factor * b[bOffset + j];
    }
  }
  return out;
}

function oneNorm(a: Float64Array, n: number): number {
  let best = 0;
  for (let j = 0; j < n; j += 1) {
    let sum = 0;
    for (let i = 0; i < n; i += 1) sum += Math.abs(a[i * n + j]);
    if (sum > best) best = sum;
  }
  return best;
}

/** Solves A X = B in place of B (n x n each) by LU with partial pivoting; A is overwritten. */
function solveInPlace(a: Float64Array, b: Float64Array, n: number): void {
  for (let column = 0; column < n; column += 1) {
    let pivotRow = column;
    let pivotValue = Math.abs(a[column * n + column]);
    for (let row = column + 1; row < n; row += 1) {
      const value = Math.abs(a[row * n + column]);
      if (value > pivotValue) {
        pivotValue = value;
        pivotRow = row;
      }
    }
    if (pivotValue === 0) throw new Error('matrix exponential: the Pade denominator is singular');
    if (pivotRow !== column) {
      for (let j = 0; j < n; j += 1) {
        const swapA = a[column * n + j];
        a[column * n + j] = a[pivotRow * n + j];
        a[pivotRow * n + j] = swapA;
        const swapB = b[column * n + j];
        b[column * n + j] = b[pivotRow * n + j];
        b[pivotRow * n + j] = swapB;
      }
    }
    const pivot = a[column * n + column];
    for (let row = column + 1; row < n; row += 1) {
      const factor = a[row * n + column] / pivot;
      if (factor === 0) continue;
      a[row * n + column] = 0;
      for (let j = column + 1; j < n; j += 1) a[row * n + j] -= factor * a[column * n + j];
      for (let j = 0; j < n; j += 1) b[row * n + j] -= factor * b[column * n + j];
    }
  }
  for (let column = n - 1; column >= 0; column -= 1) {
    const pivot = a[column * n + column];
    for (let j = 0; j < n; j += 1) b[column * n + j] /= pivot;
    for (let row = 0; row < column; row += 1) {
      const factor = a[row * n + column];
      if (factor === 0) continue;
      for (let j = 0; j < n; j += 1) b[row * n + j] -= factor * b[column * n + j];
    }
  }
}

/** Number of squarings Pade-13 needs for a matrix of the given 1-norm (Higham 2005, Algorithm 2.3). */
export function squaringsFor(norm: number): number {
  return norm > THETA_13 ? Math.max(0, Math.ceil(Math.log2(norm / THETA_13))) : 0;
}

/** exp(A) of an n x n row-major matrix. A is not modified. */
export function expm(input: Float64Array, n: number): Float64Array {
  const squarings = squaringsFor(oneNorm(input, n));
  const scale = 2 ** -squarings;
  const a = new Float64Array(n * n);
  for (let index = 0; index < a.length; index += 1) a[index] = input[index] * scale;
  const b = PADE_13;
  const a2 = multiply(a, a, n);
  const a4 = multiply(a2, a2, n);
  const a6 = multiply(a4, a2, n);

  const innerU = new Float64Array(n * n);
  const innerV = new Float64Array(n * n);
  for (let index = 0; index < innerU.length; index += 1) {
    innerU[index] = b[13] * a6[index] + b[11] * a4[index] + b[9] * a2[index];
    innerV[index] = b[12] * a6[index] + b[10] * a4[index] + b[8] * a2[index];
  }
  const u6 = multiply(a6, innerU, n);
  const v6 = multiply(a6, innerV, n);
  for (let index = 0; index < u6.length; index += 1) {
    u6[index] += b[7] * a6[index] + b[5] * a4[index] + b[3] * a2[index];
    v6[index] += b[6] * a6[index] + b[4] * a4[index] + b[2] * a2[index];
  }
  for (let i = 0; i < n; i += 1) {
    u6[i * n + i] += b[1];
    v6[i * n + i] += b[0];
  }
  const u = multiply(a, u6, n);
  const denominator = new Float64Array(n * n);
  const numerator = new Float64Array(n * n);
  for (let index = 0; index < u.length; index += 1) {
    denominator[index] = v6[index] - u[index];
    numerator[index] = v6[index] + u[index];
  }
  solveInPlace(denominator, numerator, n);
  let result = numerator;
  let spare = new Float64Array(n * n);
  for (let step = 0; step < squarings; step += 1) {
    multiply(result, result, n, spare);
    [result, spare] = [spare, result];
  }
  return result;
}

/**
 * Propagator of a constant generator over a step and its integral applied to some column vectors, from one
 * exponential of the augmented matrix [[Q h, B h], [0, 0]] (C. F. Van Loan, "Computing integrals involving
 * the matrix exponential", IEEE Trans. Automatic Control 23(3), 1978): the top-left block is exp(Q h), the
 * top-right block is the integral over [0, h] of exp(Q s) ds times B.
 *
 * @param generator n x n row-major generator Q (rows sum to zero).
 * @param columns the columns of B, each of length n.
 */
export function propagatorWithIntegral(
  generator: Float64Array,
  n: number,
  hours: number,
  columns: readonly Float64Array[],
): { propagator: Float64Array; integrals: Float64Array[] } {
  const size = n + columns.length;
  // The block B h is scaled by a power of two c so its column sums do not exceed the 1-norm of Q h:
  // exp([[Q h, c B h], [0, 0]]) has c times the integral in its top-right block, and a large B (many down
  // states times a long step) would otherwise raise the norm and with it the number of squarings.
  let generatorNorm = 0;
  for (let j = 0; j < n; j += 1) {
    let sum = 0;
    for (let i = 0; i < n; i += 1) sum += Math.abs(generator[i * n + j]);
    generatorNorm = Math.max(generatorNorm, sum * hours);
  }
  const columnNorm = columns.reduce((best, column) => Math.max(best, column.reduce((sum, value) => sum + Math.abs(value), 0) * hours), 0);
  const scale = columnNorm > generatorNorm && generatorNorm > 0 ? 2 ** Math.floor(Math.log2(generatorNorm / columnNorm)) : 1;
  const augmented = new Float64Array(size * size);
  for (let i = 0; i < n; i += 1) {
    for (let j = 0; j < n; j += 1) augmented[i * size + j] = generator[i * n + j] * hours;
    columns.forEach((column, c) => {
      augmented[i * size + n + c] = column[i] * hours * scale;
    });
  }
  const full = expm(augmented, size);
  const propagator = new Float64Array(n * n);
  for (let i = 0; i < n; i += 1) propagator.set(full.subarray(i * size, i * size + n), i * n);
  const integrals = columns.map((_, c) => {
    const integral = new Float64Array(n);
    for (let i = 0; i < n; i += 1) integral[i] = full[i * size + n + c] / scale;
    return integral;
  });
  return { propagator, integrals };
}
