/**
 * The result of a fit (format "shadowfront-result/1"), as written by `shadowfront fit --json` and stored in
 * the logbook. Other tools rely on it: keep it stable; add fields, never change or remove one.
 * Lengths are metres unless the name says otherwise; coefficients are over `zernike.radius_m`.
 */
import type { DiscShapeResult } from './disc/profile.ts';

export const RESULT_FORMAT = 'shadowfront-result/1';

export type Termination = 'converged' | 'iteration limit' | 'stalled' | 'non-finite' | 'cancelled';

export interface ResultTerm {
  /** ANSI Z80.28 index */
  j: number;
  name: string;
  waves: number;
  sigmaWaves: number;
  nm: number;
  sigmaNm: number;
}

export interface FitResult {
  format: typeof RESULT_FORMAT;
  /** Software that produced it, e.g. "shadowfront 0.1.0". */
  software: string;
  wavelength_m: number;
  zernike: {
    radius_m: number;
    /** The terms fitted, in the order of `terms`; the basis is ANSI Z80.28 unit-RMS Zernike polynomials. */
    basis: string;
    terms: ResultTerm[];
    /** Correlation matrix of the fitted coefficients, rows and columns in the order of `terms`. */
    correlation: number[][];
  };
  /** RMS wavefront error of the fitted terms without piston and tilt, waves, with its 1σ. */
  rmsWaves: number;
  sigmaRmsWaves: number;
  /** Peak-to-valley of the fitted terms without piston and tilt, waves. */
  pvWaves: number;
  /** Strehl ratio by the Maréchal approximation exp(−(2π·σ)²), σ = rmsWaves, with its 1σ. */
  strehl: number;
  sigmaStrehl: number;
  /** Residual radius of curvature equivalent to the fitted defocus, m (positive: diverging), null when defocus was not fitted or is zero. */
  residualCurvatureRadius_m: number | null;
  /** Fitted pattern centre per frame, camera plane, lab frame, relative to the frame centre. */
  center_m: [number, number];
  centers_m: [number, number][];
  chi2PerDof: number;
  dof: number;
  termination: Termination;
  iterations: number;
  elapsedMs: number;
  /** Region analysed per frame, in pixels of the (oriented) frame: centre and radius, and the binning. */
  regions: { centerPx: [number, number]; radiusPx: number; binning: number }[];
  /** Solver settings that produced this result (for re-analysis). */
  settings: Record<string, unknown>;
  warnings: string[];
  /** False when χ² and the residual structure say the fit stopped in a wrong minimum: do not use the coefficients. */
  trusted: boolean;
  /**
   * The calibrated disc profile the fit used (a disc of the logbook's disc library, `id` null for a profile
   * from elsewhere), or null when none was used. Absent in results written before it existed.
   */
  disc?: { id: number | null; name: string; calibratedAt: string } | null;
  /** The disc's edge shape when it was fitted with the beam (disc calibration, core/fit/disc); absent otherwise. */
  discShape?: DiscShapeResult;
  /**
   * A finite source (setup `source.size` > 0, or fitted): its diameter S with 1σ when fitted (else null), and
   * the blur S·L/G on each frame, m. Absent for a point source.
   */
  source?: { sizeM: number; sigmaSizeM: number | null; fitted: boolean; blurM: number[] };
}
