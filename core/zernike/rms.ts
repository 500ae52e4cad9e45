import type { RmsOptions, ZernikeCoefficient } from './types.ts';
import { mergeCoefficients } from './internal/coefficients.ts';

/**
 * Root-mean-square of W = Σ c_j Z_j over the unit disc, by Parseval's theorem for the orthonormal
 * set: √(Σ c_j²) (duplicate j are summed first). Same unit as the coefficients.
 *
 * By default every term counts, piston included: this is the literal RMS of W. With
 * `excludePistonTilt: true` the terms j = 0, 1, 2 are left out, which gives the RMS of W about its
 * best-fit plane — the usual "RMS wavefront error" (physics notes §5).
 *
 * @throws RangeError on invalid coefficients
 */
export function rms(coeffs: readonly ZernikeCoefficient[], options: RmsOptions = {}): number {
  const merged = mergeCoefficients(coeffs);
  const skip = options.excludePistonTilt === true;
  let sum = 0;
  for (const [j, v] of merged) {
    if (skip && j <= 2) continue;
    sum += v * v;
  }
  return Math.sqrt(sum);
}
