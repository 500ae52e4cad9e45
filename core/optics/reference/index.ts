/**
 * Reference diffraction model: the slow, trustworthy scalar Fresnel simulator of the disc shadow
 * (Babinet's principle with spectrally accurate quadratures), used to validate the fast model.
 *
 * Camera points are lab-frame metres relative to the nominal axis point (physics notes §5).
 * The field is U(P) = 1/(iλL) ∫∫_{outside the disc} U_in(Q) e^{i k |P−Q|²/(2L)} d²Q exactly as in
 * physics notes §1 (including its P-dependent phase; the common factor e^{ikL} is omitted), so |U|²
 * is the intensity relative to the incident peak at the disc plane.
 */
import type { BenchSetup, ZernikeTerm } from '../../setup/types.ts';
import { referenceFieldWithInfo, type ComplexGrid } from './field.ts';

export type { ComplexGrid, ReferenceOptions, InternalOptions, ReferenceInfo } from './field.ts';
import type { ReferenceOptions } from './field.ts';

/** Options of referenceIntensity. */
export type ReferenceIntensityOptions = Pick<ReferenceOptions, 'accuracy' | 'onProgress' | 'planXsM' | 'planYsM'>;
/** Same field plus a description of the quadrature used (route, grid, node counts); for diagnostics. */
export { referenceFieldWithInfo } from './field.ts';

/**
 * Field at camera points P = (xsM[ix], ysM[iy]) (metres, lab frame, relative to the nominal axis
 * point), row-major [iy * nx + ix].
 *
 * @throws RangeError on an invalid setup, or when the scene needs a free-beam grid larger than
 *   6000 points per axis (non-separable aberrations with a very large beam Fresnel number)
 * @throws Error named 'CancelledError' when onProgress returns false
 */
export function referenceField(
  setup: BenchSetup,
  aberrations: readonly ZernikeTerm[],
  xsM: Float64Array,
  ysM: Float64Array,
  options?: ReferenceIntensityOptions,
): ComplexGrid {
  return referenceFieldWithInfo(setup, aberrations, xsM, ysM, options ?? {}).field;
}

/** Intensity |U|² at the same points, row-major, relative to the incident peak intensity at the disc. */
export function referenceIntensity(
  setup: BenchSetup,
  aberrations: readonly ZernikeTerm[],
  xsM: Float64Array,
  ysM: Float64Array,
  options?: ReferenceIntensityOptions,
): Float64Array {
  const { re, im } = referenceField(setup, aberrations, xsM, ysM, options);
  const out = new Float64Array(re.length);
  for (let i = 0; i < re.length; i++) out[i] = re[i] * re[i] + im[i] * im[i];
  return out;
}
