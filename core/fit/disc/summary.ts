/**
 * The fitted disc shape as the result reports it, with the check that it was told apart from the beam.
 *
 * Disc ellipticity mimics beam astigmatism (physics notes §3): on the rim both are a cos 2θ phase. Beam
 * astigmatism stays in the lab frame; the disc's shape turns with the disc. Frames with the disc at
 * different angles separate them — for order n when the angles differ by other than a multiple of 2π/n
 * (0° and 90° separate order 2; order 4 needs e.g. 0° and 45°). With one angle the two are degenerate and
 * the shape is reported as such rather than as a confident number.
 */
import { ansiToNM } from '../../zernike/index.ts';
import { sharedParameterIndex, type FitFrameInput, type ModelLayout } from '../frameModel.ts';
import { ellipseFromCoefficients, harmonicFromCoefficients, type DiscBeamSeparation, type DiscCoefficient, type DiscShapeResult } from './profile.ts';

/** Correlation above which a disc order counts as degenerate with the beam's same-m terms. */
export const DEGENERATE_CORRELATION = 0.95;
/** Angle spread (1 − |mean e^{inα}|) below which the frames' disc angles do not separate order n. */
export const MIN_ANGLE_SPREAD = 0.05;

export function summariseDiscShape(
  layout: ModelLayout,
  params: Float64Array,
  /** Covariance (np × np, already scaled), or null when the normal matrix was singular. */
  cov: Float64Array | null,
  inputs: FitFrameInput[],
  fitTrusted: boolean,
): { shape: DiscShapeResult; warnings: string[] } {
  const orders = [...(layout.discOrders ?? [])];
  const np = params.length;
  const off = sharedParameterIndex(layout).disc;
  const radiusM = inputs[0].setup.disc.radiusM;
  const v = (a: number, b: number) => (cov ? cov[a * np + b] : NaN);
  const corr = (a: number, b: number) => v(a, b) / Math.sqrt(v(a, a) * v(b, b));
  const rotations = inputs.map((f) => f.discRotationRad ?? 0);
  const coefficients: DiscCoefficient[] = orders.map((order, i) => {
    const ic = off + 2 * i;
    return { order, cos: params[ic], sin: params[ic + 1], sigmaCos: Math.sqrt(v(ic, ic)), sigmaSin: Math.sqrt(v(ic + 1, ic + 1)), correlation: corr(ic, ic + 1) };
  });
  let ellipse = { e: 0, sigmaE: 0, axisRad: 0, sigmaAxisRad: 0 };
  const harmonics = [];
  for (let i = 0; i < orders.length; i++) {
    const ic = off + 2 * i;
    const c = coefficients[i];
    if (c.order === 2) ellipse = ellipseFromCoefficients(c.cos, c.sin, v(ic, ic), v(ic + 1, ic + 1), v(ic, ic + 1));
    else harmonics.push(harmonicFromCoefficients(c.order, radiusM, c.cos, c.sin, v(ic, ic), v(ic + 1, ic + 1), v(ic, ic + 1)));
  }
  const warnings: string[] = [];
  const separation: DiscBeamSeparation[] = orders.map((order, i) => {
    const beamTerms = layout.terms.filter((j) => Math.abs(ansiToNM(j).m) === order);
    let re = 0, im = 0;
    for (const a of rotations) {
      re += Math.cos(order * a);
      im += Math.sin(order * a);
    }
    const angleSpread = 1 - Math.hypot(re, im) / rotations.length;
    let maxAbs = beamTerms.length ? 0 : NaN;
    for (const j of beamTerms) {
      const k = layout.terms.indexOf(j);
      for (const q of [0, 1]) {
        const c = Math.abs(corr(k, off + 2 * i + q));
        maxAbs = Number.isFinite(c) ? Math.max(maxAbs, c) : Infinity;
      }
    }
    return { order, beamTerms, angleSpread, maxAbsCorrelation: maxAbs };
  });
  let degenerate = false;
  for (const s of separation) {
    if (s.beamTerms.length === 0) continue;
    const bad = s.angleSpread < MIN_ANGLE_SPREAD || !(s.maxAbsCorrelation <= DEGENERATE_CORRELATION);
    if (!bad) continue;
    degenerate = true;
    const what = s.order === 2 ? 'disc ellipticity' : `the disc's order-${s.order} edge harmonic`;
    const beam = s.beamTerms.map((j) => `j=${j}`).join(', ');
    const corrText = Number.isFinite(s.maxAbsCorrelation) ? s.maxAbsCorrelation.toFixed(3) : 'not defined (singular)';
    warnings.push(
      s.angleSpread < MIN_ANGLE_SPREAD
        ? `${what} cannot be told apart from the beam's same-order terms (${beam}): every frame has the disc at the same angle for order ${s.order} (correlation ${corrText}). Take frames with the disc turned${s.order === 2 ? ' by 90°' : ` by 180°/${s.order}`}, or declare the beam known (reference-beam calibration)`
        : `${what} is strongly correlated with the beam's same-order terms (${beam}; |correlation| ${corrText} > ${DEGENERATE_CORRELATION}): the frames do not separate them well enough`,
    );
  }
  if (orders.includes(4) && !layout.terms.some((j) => Math.abs(ansiToNM(j).m) === 4)) {
    warnings.push("the disc's order-4 harmonic also takes up any beam aberration of azimuthal order 4 (not fitted): use it with care");
  }
  return {
    shape: {
      orders,
      radiusM,
      coefficients,
      ellipticity: ellipse.e,
      sigmaEllipticity: ellipse.sigmaE,
      axisRad: ellipse.axisRad,
      sigmaAxisRad: ellipse.sigmaAxisRad,
      harmonics,
      discRotationsRad: rotations,
      separation,
      degenerate,
      trusted: fitTrusted && !degenerate,
    },
    warnings,
  };
}
