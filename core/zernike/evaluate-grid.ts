import type { ZernikeCoefficient } from './types.ts';
import { compileWavefront } from './compile-wavefront.ts';

/**
 * Evaluates W = Σ c_j Z_j on the tensor grid xs × ys (unit-disc coordinates).
 *
 * Returns a row-major Float64Array of length ys.length · xs.length with
 * out[iy · xs.length + ix] = W(xs[ix], ys[iy]): the row index runs over ys. Points outside the unit
 * disc are evaluated as polynomials, not masked. (With the lab-frame image convention, where the first
 * row is the top, pass ys in decreasing order.)
 *
 * @throws RangeError on invalid coefficients
 */
export function evaluateGrid(
  coeffs: readonly ZernikeCoefficient[],
  xs: ArrayLike<number>,
  ys: ArrayLike<number>,
): Float64Array {
  const w = compileWavefront(coeffs);
  const nx = xs.length;
  const ny = ys.length;
  const out = new Float64Array(nx * ny);
  for (let iy = 0; iy < ny; iy++) {
    const y = ys[iy]!;
    const row = iy * nx;
    for (let ix = 0; ix < nx; ix++) out[row + ix] = w.value(xs[ix]!, y);
  }
  return out;
}
