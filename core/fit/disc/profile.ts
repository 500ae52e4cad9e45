/**
 * Disc profiles: the fitted shape of a disc as reported by a fit (`DiscShapeResult`), as stored in the
 * logbook's disc library (`shadowfront-disc-profile/1`), and as applied to later fits (`AppliedDiscProfile`).
 *
 * Conventions (./shape.ts): the disc's own frame is the lab frame at disc rotation 0; r(θ) =
 * a·(1 + e·cos 2(θ − axis) + Σ_{n=3,4} (A_n/a)·cos(nθ − phase_n)), i.e. relative coefficients
 * (cos, sin) = (e·cos 2·axis, e·sin 2·axis) for order 2 and (A_n/a)·(cos phase_n, sin phase_n) for n = 3, 4.
 */
import { SetupFieldError } from '../../setup/fieldReader.ts';
import type { DiscShapeTerm } from './shape.ts';

export const DISC_PROFILE_FORMAT = 'shadowfront-disc-profile/1';

/** One fitted order: relative coefficients in the disc's own frame, with 1σ and their correlation. */
export interface DiscCoefficient {
  order: number;
  cos: number;
  sin: number;
  sigmaCos: number;
  sigmaSin: number;
  correlation: number;
}

/** An edge harmonic of order 3 or 4 in the form of the setup file: amplitudeM·cos(order·θ − phaseRad). */
export interface DiscHarmonic {
  order: number;
  amplitudeM: number;
  sigmaAmplitudeM: number;
  phaseRad: number;
  sigmaPhaseRad: number;
}

/** How well a disc order is told apart from the beam's Zernike terms of the same azimuthal order. */
export interface DiscBeamSeparation {
  order: number;
  /** ANSI indices of the fitted beam terms with |m| = order (they look alike on the rim, physics notes §3). */
  beamTerms: number[];
  /** 1 − |mean over frames of e^{i·order·α}|: 0 when every frame has the disc at the same angle (mod 2π/order). */
  angleSpread: number;
  /** Largest |correlation| between this order's two coefficients and those beam terms (NaN when none). */
  maxAbsCorrelation: number;
}

/** The disc shape fitted with the beam, as a fit reports it (FitResult.discShape). */
export interface DiscShapeResult {
  orders: number[];
  /** The disc radius the relative coefficients refer to (the first frame's setup), m. */
  radiusM: number;
  coefficients: DiscCoefficient[];
  /** Ellipticity e and axis angle (−π/2, π/2], with 1σ; zero when order 2 was not fitted. */
  ellipticity: number;
  sigmaEllipticity: number;
  axisRad: number;
  sigmaAxisRad: number;
  harmonics: DiscHarmonic[];
  /** The disc rotation of each frame, rad. */
  discRotationsRad: number[];
  separation: DiscBeamSeparation[];
  /**
   * True when a fitted order cannot be told apart from the beam's same-m terms: all frames have the disc at
   * one angle (for that order), or the correlation exceeds 0.95.
   */
  degenerate: boolean;
  /** The fit reached a trustworthy minimum and the shape is not degenerate. */
  trusted: boolean;
}

/** A disc profile as stored in the logbook's disc library (`Disc.calibration`). */
export interface DiscProfile {
  format: typeof DISC_PROFILE_FORMAT;
  /** Nominal disc radius used by the calibration, m. */
  radiusM: number;
  ellipticity: number;
  sigmaEllipticity: number;
  axisRad: number;
  sigmaAxisRad: number;
  harmonics: DiscHarmonic[];
  /** The fit's own parameters (relative, disc's own frame): the exact form used when the profile is applied. */
  coefficients: DiscCoefficient[];
  /** ISO 8601 time of the calibration. */
  calibratedAt: string;
  /** 'rotation': fitted with the beam from frames at several disc angles; 'reference-beam': the beam was declared ideal or known. */
  method: 'rotation' | 'reference-beam';
  beam: 'fitted' | 'ideal' | 'known';
  /** Known beam coefficients used by a reference-beam calibration, or the beam fitted alongside, waves. */
  beamTerms: { j: number; waves: number; sigmaWaves: number | null }[];
  anglesRad: number[];
  /** Frame labels (file names) per disc angle. */
  frames: string[];
  separation: DiscBeamSeparation[];
  degenerate: boolean;
  trusted: boolean;
  chi2PerDof: number;
  warnings: string[];
  software: string;
}

/** A profile in the form the fit applies it, with what the result records. */
export interface AppliedDiscProfile {
  /** Logbook disc id, or null for a profile not from the logbook. */
  id: number | null;
  name: string;
  calibratedAt: string;
  /** Relative coefficients in the disc's own frame. */
  terms: DiscShapeTerm[];
  /**
   * Their 1σ and correlation per order (from the calibration); when given, the fit adds the profile's
   * uncertainty to the coefficients' covariance (./propagate.ts).
   */
  uncertainty?: { order: number; sigmaCos: number; sigmaSin: number; correlation: number }[];
}

/** Ellipticity, axis and their 1σ from (c, s) = (e·cos 2φ, e·sin 2φ) with covariance. */
export function ellipseFromCoefficients(c: number, s: number, vc: number, vs: number, cvs: number): { e: number; sigmaE: number; axisRad: number; sigmaAxisRad: number } {
  const e = Math.hypot(c, s);
  const axisRad = 0.5 * Math.atan2(s, c);
  if (e === 0) return { e, sigmaE: Math.sqrt(Math.max(vc, vs)), axisRad: 0, sigmaAxisRad: Math.PI / 2 };
  const sigmaE = Math.sqrt(Math.max(0, (c * c * vc + s * s * vs + 2 * c * s * cvs) / (e * e)));
  // φ = ½·atan2(s, c): ∂φ/∂c = −½·s/e², ∂φ/∂s = ½·c/e²
  const gc = (-0.5 * s) / (e * e);
  const gs = (0.5 * c) / (e * e);
  const sigmaAxisRad = Math.min(Math.PI / 2, Math.sqrt(Math.max(0, gc * gc * vc + gs * gs * vs + 2 * gc * gs * cvs)));
  return { e, sigmaE, axisRad, sigmaAxisRad };
}

/** Harmonic amplitude and phase (with 1σ) from relative (c, s) and the radius. */
export function harmonicFromCoefficients(order: number, radiusM: number, c: number, s: number, vc: number, vs: number, cvs: number): DiscHarmonic {
  const amp = Math.hypot(c, s);
  const phase = Math.atan2(s, c);
  if (amp === 0) return { order, amplitudeM: 0, sigmaAmplitudeM: radiusM * Math.sqrt(Math.max(vc, vs)), phaseRad: 0, sigmaPhaseRad: Math.PI };
  const sa = Math.sqrt(Math.max(0, (c * c * vc + s * s * vs + 2 * c * s * cvs) / (amp * amp)));
  const gc = -s / (amp * amp);
  const gs = c / (amp * amp);
  const sp = Math.min(Math.PI, Math.sqrt(Math.max(0, gc * gc * vc + gs * gs * vs + 2 * gc * gs * cvs)));
  return { order, amplitudeM: radiusM * amp, sigmaAmplitudeM: radiusM * sa, phaseRad: phase, sigmaPhaseRad: sp };
}

/** The profile in the form the fit applies: its relative coefficients. */
export function appliedProfile(profile: DiscProfile, id: number | null, name: string): AppliedDiscProfile {
  return {
    id,
    name,
    calibratedAt: profile.calibratedAt,
    terms: profile.coefficients.map((c) => ({ order: c.order, cos: c.cos, sin: c.sin })),
    uncertainty: profile.coefficients.map((c) => ({ order: c.order, sigmaCos: c.sigmaCos, sigmaSin: c.sigmaSin, correlation: c.correlation })),
  };
}

function fail(source: string, path: string, value: unknown, expected: string): never {
  throw new SetupFieldError({ file: source, path, value, expected });
}

function finite(source: string, obj: Record<string, unknown>, key: string, path: string, allowNull = false): number {
  const v = obj[key];
  if (v === undefined) throw new SetupFieldError({ file: source, path: path ? `${path}.${key}` : key, value: undefined, expected: 'a number', problem: 'missing' });
  if (allowNull && v === null) return NaN;
  if (typeof v !== 'number' || !Number.isFinite(v)) fail(source, path ? `${path}.${key}` : key, v, 'a finite number');
  return v;
}

/**
 * Check a stored profile (e.g. a logbook disc's calibration JSON) and return it typed.
 * @throws SetupFieldError naming `source`, the field and the value.
 */
export function parseDiscProfile(json: unknown, source: string): DiscProfile {
  if (typeof json !== 'object' || json === null || Array.isArray(json)) fail(source, '', json, `a "${DISC_PROFILE_FORMAT}" object`);
  const o = json as Record<string, unknown>;
  if (o.format !== DISC_PROFILE_FORMAT) fail(source, 'format', o.format, `"${DISC_PROFILE_FORMAT}" (a disc profile made by "shadowfront disc calibrate")`);
  const radiusM = finite(source, o, 'radiusM', '');
  if (!(radiusM > 0)) fail(source, 'radiusM', o.radiusM, 'a disc radius in metres > 0');
  if (!Array.isArray(o.coefficients)) fail(source, 'coefficients', o.coefficients, 'a list of {order, cos, sin, …}');
  const seen = new Set<number>();
  const coefficients = (o.coefficients as unknown[]).map((c, i) => {
    const path = `coefficients[${i}]`;
    if (typeof c !== 'object' || c === null) fail(source, path, c, 'an object {order, cos, sin, sigmaCos, sigmaSin, correlation}');
    const r = c as Record<string, unknown>;
    const order = finite(source, r, 'order', path);
    if (![2, 3, 4].includes(order) || seen.has(order)) fail(source, `${path}.order`, order, 'one of 2, 3, 4, each at most once');
    seen.add(order);
    const cos = finite(source, r, 'cos', path);
    const sin = finite(source, r, 'sin', path);
    if (Math.hypot(cos, sin) >= 0.2) fail(source, `${path}.cos`, cos, 'a relative edge deviation below 0.2');
    return {
      order,
      cos,
      sin,
      sigmaCos: finite(source, r, 'sigmaCos', path, true),
      sigmaSin: finite(source, r, 'sigmaSin', path, true),
      correlation: finite(source, r, 'correlation', path, true),
    };
  });
  const str = (key: string): string => {
    const v = o[key];
    if (typeof v !== 'string') fail(source, key, v, 'a text');
    return v;
  };
  const method = str('method');
  if (method !== 'rotation' && method !== 'reference-beam') fail(source, 'method', method, '"rotation" or "reference-beam"');
  const beam = str('beam');
  if (beam !== 'fitted' && beam !== 'ideal' && beam !== 'known') fail(source, 'beam', beam, '"fitted", "ideal" or "known"');
  const calibratedAt = str('calibratedAt');
  if (!Number.isFinite(Date.parse(calibratedAt))) fail(source, 'calibratedAt', calibratedAt, 'an ISO 8601 time such as "2024-05-01T10:00:00Z"');
  const list = <T>(key: string): T[] => {
    const v = o[key] ?? [];
    if (!Array.isArray(v)) fail(source, key, v, 'a list');
    return v as T[];
  };
  return {
    format: DISC_PROFILE_FORMAT,
    radiusM,
    ellipticity: finite(source, o, 'ellipticity', ''),
    sigmaEllipticity: finite(source, o, 'sigmaEllipticity', '', true),
    axisRad: finite(source, o, 'axisRad', ''),
    sigmaAxisRad: finite(source, o, 'sigmaAxisRad', '', true),
    harmonics: list<DiscHarmonic>('harmonics'),
    coefficients,
    calibratedAt,
    method,
    beam,
    beamTerms: list('beamTerms'),
    anglesRad: list<number>('anglesRad'),
    frames: list<string>('frames'),
    separation: list<DiscBeamSeparation>('separation'),
    degenerate: o.degenerate === true,
    trusted: o.trusted === true,
    chi2PerDof: typeof o.chi2PerDof === 'number' ? o.chi2PerDof : NaN,
    warnings: list<string>('warnings'),
    software: typeof o.software === 'string' ? o.software : '',
  };
}
