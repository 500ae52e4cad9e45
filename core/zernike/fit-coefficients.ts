import type { ZernikeCoefficient } from './types.ts';
import { basisEvaluator } from './internal/basis.ts';
import { assertIndex } from './internal/validate.ts';

/**
 * Least-squares fit of the ANSI terms `jList` to samples values[i] ≈ Σ c_j Z_j(xs[i], ys[i]).
 *
 * Coordinates are unit-disc coordinates; samples may lie anywhere (they are not masked), and any
 * sampling works as long as it determines the terms. The (unweighted) least-squares problem is solved
 * by a QR factorisation accumulated one sample at a time with Givens rotations (Golub & Van Loan,
 * Matrix Computations, §5.1.8 and §5.3), which needs O(J²) memory for J terms and avoids the squared
 * condition number of the normal equations.
 *
 * @returns one coefficient per entry of `jList`, in the same order
 * @throws RangeError on an invalid or repeated index, arrays of different lengths, non-finite samples,
 *   or when the samples do not determine all terms (rank deficiency, e.g. fewer samples than terms)
 */
export function fitCoefficients(
  jList: readonly number[],
  xs: ArrayLike<number>,
  ys: ArrayLike<number>,
  values: ArrayLike<number>,
): ZernikeCoefficient[] {
  const J = jList.length;
  const seen = new Set<number>();
  for (const j of jList) {
    assertIndex(j, 0, 'ANSI index j');
    if (seen.has(j)) throw new RangeError(`fitCoefficients: index j = ${j} is listed twice`);
    seen.add(j);
  }
  const N = values.length;
  if (xs.length !== N || ys.length !== N) {
    throw new RangeError(`fitCoefficients: xs, ys and values must have the same length (${xs.length}, ${ys.length}, ${N})`);
  }
  if (J === 0) return [];

  const basis = basisEvaluator(jList);
  const R = new Float64Array(J * J); // upper triangular, row-major
  const qtb = new Float64Array(J);
  const row = new Float64Array(J);
  for (let i = 0; i < N; i++) {
    const x = xs[i]!;
    const y = ys[i]!;
    let b = values[i]!;
    if (!Number.isFinite(x) || !Number.isFinite(y) || !Number.isFinite(b)) {
      throw new RangeError(`fitCoefficients: sample ${i} is not finite`);
    }
    basis.row(x, y, row);
    // Rotate the new row into R.
    for (let k = 0; k < J; k++) {
      const ak = row[k]!;
      if (ak === 0) continue;
      const rkk = R[k * J + k]!;
      const r = Math.sqrt(rkk * rkk + ak * ak); // faster than Math.hypot; the entries are far from overflow
      const c = rkk / r;
      const s = ak / r;
      R[k * J + k] = r;
      for (let l = k + 1; l < J; l++) {
        const rl = R[k * J + l]!;
        const al = row[l]!;
        R[k * J + l] = c * rl + s * al;
        row[l] = c * al - s * rl;
      }
      const qk = qtb[k]!;
      qtb[k] = c * qk + s * b;
      b = c * b - s * qk;
    }
  }

  let maxDiag = 0;
  for (let k = 0; k < J; k++) maxDiag = Math.max(maxDiag, Math.abs(R[k * J + k]!));
  const tol = maxDiag * Math.max(N, J) * Number.EPSILON * 16;
  const coef = new Float64Array(J);
  for (let k = J - 1; k >= 0; k--) {
    const rkk = R[k * J + k]!;
    if (!(Math.abs(rkk) > tol)) {
      throw new RangeError(`fitCoefficients: the samples do not determine term j = ${jList[k]} (rank-deficient least-squares problem)`);
    }
    let s = qtb[k]!;
    for (let l = k + 1; l < J; l++) s -= R[k * J + l]! * coef[l]!;
    coef[k] = s / rkk;
  }
  return jList.map((j, k) => ({ j, value: coef[k]! }));
}
