/**
 * Public types of the Zernike library.
 *
 * Conventions (see README.md): ANSI Z80.28 / ISO 24157 single index j = (n(n+2)+m)/2,
 * unit-RMS normalisation over the unit disc, θ counter-clockwise from +x,
 * m > 0 ↔ cos(mθ), m < 0 ↔ sin(|m|θ).
 */

/** Radial order n ≥ 0 and signed azimuthal frequency m (|m| ≤ n, n − |m| even). */
export interface NM {
  n: number;
  m: number;
}

/** Value and analytic first and second derivatives in unit-disc Cartesian coordinates. */
export interface ZernikeDerivatives {
  value: number;
  dx: number;
  dy: number;
  dxx: number;
  dxy: number;
  dyy: number;
}

/** One term of an exact Cartesian monomial expansion: coef · x^px · y^py. */
export interface Monomial {
  px: number;
  py: number;
  coef: number;
}

/**
 * One coefficient of a Zernike expansion, keyed by the ANSI index j.
 * The unit of `value` is whatever the caller uses (waves, metres, …); the library never converts it.
 */
export interface ZernikeCoefficient {
  j: number;
  value: number;
}

/** A coefficient set compiled for fast repeated evaluation (see `compileWavefront`). */
export interface CompiledWavefront {
  /** Value and derivatives at (x, y) in unit-disc coordinates, written into `out` (which is returned). */
  evaluate(x: number, y: number, out: ZernikeDerivatives): ZernikeDerivatives;
  /** Value only at (x, y) in unit-disc coordinates. */
  value(x: number, y: number): number;
}

/** Options of `rms`. */
export interface RmsOptions {
  /** Leave out piston and tilt (ANSI j = 0, 1, 2). Default false. */
  excludePistonTilt?: boolean;
}

/** Options of `peakToValley`. */
export interface PeakToValleyOptions {
  /** Leave out piston and tilt (ANSI j = 0, 1, 2). Default false. */
  excludePistonTilt?: boolean;
  /**
   * Number of radial sample circles from the centre to the rim, both included (integer ≥ 2).
   * Default max(65, 8·nMax + 1), where nMax is the highest radial order present.
   */
  samples?: number;
}
