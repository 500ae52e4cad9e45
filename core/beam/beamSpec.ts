/**
 * From the second-moment analysis of a beam frame to the setup's `beam` fields (radius and centre at
 * the disc plane).
 *
 * Radius. For a Gaussian beam I ∝ exp(−2r²/w²) the second-moment (D4σ) diameter equals the 1/e²
 * diameter, dσ = 2w (ISO 11146-1: four standard deviations of the intensity distribution; σ² of
 * exp(−2x²/w²) is w²/4). The setup wants one 1/e² radius: w = ½·(dσx + dσy)/2, the mean of the two
 * principal widths, halved.
 *
 * Plane. The setup's radius and centre are at the disc plane; a beam frame is usually recorded at the
 * camera plane with the disc removed (camera distance L behind the disc). Geometrically (physics notes,
 * section 1) the beam diverges from its nominal source a distance R = G before the disc, so sizes and
 * positions measured from the axis scale with the distance from the source:
 *     w_disc = w_cam · R / (R + L),    c_disc = c_cam · R / (R + L)      (R finite; R < 0 converging)
 *     w_disc = w_cam,                  c_disc = c_cam                    (collimated, R = ∞)
 * This ignores diffraction of the Gaussian beam over L. Exactly (Gaussian-beam propagation with the
 * q-parameter, Kogelnik & Li, Appl. Opt. 5, 1550, 1966):
 *     w_cam² = w_disc²·[(1 + L/R)² + (L/z_w)²],   z_w = π·w_disc²/λ,
 * so the geometric scaling overestimates w_disc by about ½·(L/z_w)²/(1 + L/R)² (relative). It is small
 * when L ≪ z_w (for a collimated beam, when the camera sits well inside the beam's Rayleigh range);
 * a warning says when it exceeds 1 %.
 *
 * Axis. Positions are taken relative to where the disc axis meets the sensor: the frame centre unless
 * `axisPx` says otherwise (e.g. the pattern centre located in a shadow frame taken from the same camera
 * position). Pure.
 */
import type { BenchSetup } from '../setup/types.ts';
import type { BeamMoments } from './moments.ts';

/** ISO 11146-1: beam profiles with ellipticity above 0.87 may be regarded as circular (from memory). */
export const CIRCULAR_ELLIPTICITY = 0.87;

export interface ToBeamSpecOptions {
  /** Where the beam frame was recorded: 'camera' (default; disc removed, camera at its place) or 'disc' (sensor at the disc plane). */
  recordedAt?: 'camera' | 'disc';
  /** [column, row] where the disc axis meets the sensor in the beam frame; default the frame centre. */
  axisPx?: [number, number];
}

export interface SuggestedBeamSpec {
  /** 1/e² radius at the disc plane, m. */
  radiusM: number;
  /** Beam centre at the disc plane relative to the disc axis, lab frame, m. */
  centerM: [number, number];
  /** The measured 1/e² radius at the plane of the frame, m (before any transfer). */
  measuredRadiusM: number;
  /** The measured centre at the plane of the frame, relative to the axis, lab frame, m. */
  measuredCenterM: [number, number];
  /** Factor applied to sizes and positions: R/(R + L), 1 when collimated or recorded at the disc. */
  transferFactor: number;
  /** Estimated relative error of the geometric transfer from the beam's diffraction, ½·(L/z_w)²/(1 + L/R)². */
  diffractionErrorEstimate: number;
  /** The setup's major/minor D4σ widths at the frame, m, for reference. */
  majorWidthM: number;
  minorWidthM: number;
  notes: string[];
}

/** Suggested setup `beam.radius` and `beam.center` from a beam frame's moments. */
export function toBeamSpec(result: BeamMoments, pixelPitchM: number, setup: BenchSetup, options: ToBeamSpecOptions = {}): SuggestedBeamSpec {
  if (!(pixelPitchM > 0)) throw new RangeError(`toBeamSpec: pixel pitch must be positive (got ${pixelPitchM})`);
  const at = options.recordedAt ?? 'camera';
  const notes: string[] = [];
  const measuredRadiusM = ((result.dSigmaXPx + result.dSigmaYPx) / 4) * pixelPitchM;
  const axis = options.axisPx ?? [(result.widthPx - 1) / 2, (result.heightPx - 1) / 2];
  const [cc, cr] = result.centroidPx;
  // Lab frame: x along +column, y along −row.
  const measuredCenterM: [number, number] = [(cc - axis[0]) * pixelPitchM, (axis[1] - cr) * pixelPitchM];
  const L = setup.camera.distanceM;
  const R = setup.beam.curvatureRadiusM;
  let factor = 1;
  if (at === 'camera' && Number.isFinite(R)) {
    if (!(Math.abs(R + L) > 0) || (R < 0 && R + L >= 0)) {
      throw new RangeError(`toBeamSpec: a converging beam (R = ${R} m) focused at or before the camera (L = ${L} m) cannot be transferred geometrically`);
    }
    factor = R / (R + L);
    notes.push(`transferred from the camera plane to the disc plane by the nominal curvature: sizes × R/(R + L) = ${factor.toFixed(5)} (R = ${R.toPrecision(4)} m, L = ${L.toPrecision(4)} m)`);
  } else if (at === 'camera') {
    notes.push('collimated beam: the radius and centre at the camera plane are taken as those at the disc plane');
  } else {
    notes.push('recorded at the disc plane: no transfer');
  }
  const radiusM = measuredRadiusM * factor;
  const centerM: [number, number] = [measuredCenterM[0] * factor, measuredCenterM[1] * factor];
  let diffractionErrorEstimate = 0;
  if (at === 'camera') {
    const zw = (Math.PI * radiusM * radiusM) / setup.wavelengthM;
    const geo = Number.isFinite(R) ? 1 + L / R : 1;
    diffractionErrorEstimate = (0.5 * (L / zw) ** 2) / (geo * geo);
    if (diffractionErrorEstimate > 0.01) {
      notes.push(
        `the geometric transfer ignores the beam's own diffraction over L, here about ${(100 * diffractionErrorEstimate).toFixed(1)} % of the radius (L = ${L} m against z_w = πw²/λ = ${zw.toPrecision(3)} m): record the beam frame at the disc plane instead`,
      );
    }
  }
  if (options.axisPx === undefined) notes.push('the beam centre is measured from the frame centre, taken to lie on the disc axis');
  if (result.ellipticity < CIRCULAR_ELLIPTICITY) {
    notes.push(`the beam is elliptical (ellipticity ${result.ellipticity.toFixed(2)}; ISO 11146-1 treats ε > ${CIRCULAR_ELLIPTICITY} as circular): the setup's single radius is the mean of the two principal radii`);
  }
  return {
    radiusM,
    centerM,
    measuredRadiusM,
    measuredCenterM,
    transferFactor: factor,
    diffractionErrorEstimate,
    majorWidthM: result.majorWidthPx * pixelPitchM,
    minorWidthM: result.minorWidthPx * pixelPitchM,
    notes,
  };
}
