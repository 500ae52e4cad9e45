/**
 * Disc calibration: the disc's ellipticity, axis and (optionally) edge harmonics of orders 3–4, with their
 * uncertainties, from frames taken with the disc at several rotation angles (at least 0° and 90°), fitted
 * together with the beam's aberrations (the shape turns with the disc, the beam's aberrations stay in the
 * lab frame; physics notes §3). Or, in a reference-beam calibration, with the beam declared ideal or known
 * and only the disc fitted. Pure: the shells reach it through app/services/discService.ts.
 */
import { measureBeam, type FrameSet, type MeasureOptions } from '../measure.ts';
import { DEFAULT_TERMS } from '../fitShadow.ts';
import type { FitResult } from '../result.ts';
import type { ZernikeTerm } from '../../setup/types.ts';
import { DISC_PROFILE_FORMAT, type DiscProfile } from './profile.ts';

export type CalibrationBeam = 'fit' | 'ideal' | { known: ZernikeTerm[] };

export interface CalibrateOptions extends Omit<MeasureOptions, 'discOrders' | 'discProfile' | 'knownAberrations' | 'discCalibrated'> {
  /** Edge orders to fit: [2] (ellipticity and axis, default) or [2, 3, 4] with the harmonics. */
  orders?: readonly number[];
  /** The beam: fitted with the disc (default), declared ideal, or known coefficients (waves over the setup's Zernike radius). */
  beam?: CalibrationBeam;
  /** When the calibration was made (ISO 8601); default now. */
  calibratedAt?: string;
}

export interface DiscCalibration {
  /** The profile to store in the disc library (`shadowfront-disc-profile/1`). */
  profile: DiscProfile;
  /** The fit behind it (its `discShape` holds the same numbers). */
  fit: FitResult;
  /** False when the fit is suspect or the disc shape could not be told apart from the beam. */
  trusted: boolean;
  degenerate: boolean;
  warnings: string[];
}

export class CalibrationInputError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'RangeError';
  }
}

/**
 * @param sets frame sets, each with its `discRotationRad` (the disc's stated rotation) and its setup.
 * @throws CalibrationInputError (a RangeError) for unusable input; the fit's own errors.
 */
export function calibrateDisc(sets: FrameSet[], options: CalibrateOptions = {}): DiscCalibration {
  if (sets.length === 0) throw new CalibrationInputError('no frames to calibrate the disc with');
  const orders = [...(options.orders ?? [2])];
  if (!orders.includes(2)) throw new CalibrationInputError('a disc calibration fits the ellipticity (order 2), optionally with orders 3 and 4');
  const beam = options.beam ?? 'fit';
  const known = typeof beam === 'object' ? beam.known.filter((t) => t.waves !== 0) : [];
  const fitBeam = beam === 'fit';
  const terms = fitBeam ? [...(options.terms ?? DEFAULT_TERMS)] : [...(options.terms ?? [])].filter((j) => !known.some((t) => t.j === j));
  const angles = sets.map((s) => s.discRotationRad ?? 0);
  const warnings: string[] = [];
  const distinct = new Set(angles.map((a) => Math.round((((a % Math.PI) + Math.PI) % Math.PI) * 1e6)));
  if (fitBeam && distinct.size < 2) {
    warnings.push('all frames have the disc at one angle (mod 180°): the disc ellipticity cannot be told apart from the beam astigmatism; take frames with the disc turned by 90°, or declare the beam ideal or known');
  }
  const fit = measureBeam(sets, {
    ...options,
    terms,
    discOrders: orders,
    knownAberrations: known,
    discCalibrated: true,
  });
  const shape = fit.discShape!;
  const trusted = fit.trusted && shape.trusted;
  const profile: DiscProfile = {
    format: DISC_PROFILE_FORMAT,
    radiusM: shape.radiusM,
    ellipticity: shape.ellipticity,
    sigmaEllipticity: shape.sigmaEllipticity,
    axisRad: shape.axisRad,
    sigmaAxisRad: shape.sigmaAxisRad,
    harmonics: shape.harmonics,
    coefficients: shape.coefficients,
    calibratedAt: options.calibratedAt ?? new Date().toISOString(),
    method: fitBeam ? 'rotation' : 'reference-beam',
    beam: fitBeam ? 'fitted' : known.length ? 'known' : 'ideal',
    beamTerms: [
      ...fit.zernike.terms.map((t) => ({ j: t.j, waves: t.waves, sigmaWaves: t.sigmaWaves })),
      ...known.map((t) => ({ j: t.j, waves: t.waves, sigmaWaves: null })),
    ],
    anglesRad: angles,
    frames: sets.map((s) => s.prepared.label),
    separation: shape.separation,
    degenerate: shape.degenerate,
    trusted,
    chi2PerDof: fit.chi2PerDof,
    warnings: [...warnings, ...fit.warnings],
    software: fit.software,
  };
  return { profile, fit, trusted, degenerate: shape.degenerate, warnings: profile.warnings };
}
