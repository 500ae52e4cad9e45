/**
 * Zernike polynomials in the ANSI Z80.28 / ISO 24157 convention (single index j = (n(n+2)+m)/2,
 * unit RMS over the unit disc, θ counter-clockwise from +x), with Noll (1976) conversions,
 * Cartesian evaluation with analytic derivatives, coefficient-set utilities (RMS, P-V, exact pupil
 * rescaling, least-squares fitting). Self-contained: no dependencies. See README.md.
 */
export type {
  NM,
  ZernikeDerivatives,
  Monomial,
  ZernikeCoefficient,
  CompiledWavefront,
  RmsOptions,
  PeakToValleyOptions,
} from './types.ts';

export { ansiToNM } from './ansi-to-nm.ts';
export { nmToAnsi } from './nm-to-ansi.ts';
export { nollToNM } from './noll-to-nm.ts';
export { nmToNoll } from './nm-to-noll.ts';
export { ansiToNoll } from './ansi-to-noll.ts';
export { nollToAnsi } from './noll-to-ansi.ts';
export { zernikeName } from './zernike-name.ts';
export { zernikeNormalization } from './zernike-normalization.ts';
export { radialPolynomial } from './radial-polynomial.ts';
export { zernikePolar } from './zernike-polar.ts';
export { zernikeXY } from './zernike-xy.ts';
export { zernikeDerivativesXY } from './zernike-derivatives-xy.ts';
export { zernikeMonomials } from './zernike-monomials.ts';
export { compileWavefront } from './compile-wavefront.ts';
export { evaluateGrid } from './evaluate-grid.ts';
export { rms } from './rms.ts';
export { peakToValley } from './peak-to-valley.ts';
export { rescaleCoefficients } from './rescale-coefficients.ts';
export { fitCoefficients } from './fit-coefficients.ts';
