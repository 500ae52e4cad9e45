/**
 * Derived bench figures (physics notes, sections 1–2). All SI.
 *
 * With 1/L' = 1/L + 1/R the shadow behaves as if the beam were collimated and the camera sat at the
 * effective distance L'; it is magnified by M = L/L' on the camera, and camera point P corresponds to
 * F = P·L'/L in the disc plane.
 */
import type { BenchSetup } from '../setup/types.ts';

/** First zero of J₀ (Abramowitz & Stegun, Table 9.5). */
export const J0_FIRST_ZERO = 2.404825557695773;

/** Effective distance L' from 1/L' = 1/L + 1/R (R = +∞ for a collimated beam). */
export function effectiveDistanceM(cameraDistanceM: number, curvatureRadiusM: number): number {
  const inv = 1 / cameraDistanceM + (Number.isFinite(curvatureRadiusM) ? 1 / curvatureRadiusM : 0);
  if (!(inv > 0)) {
    throw new RangeError(
      `the camera sits at or beyond the beam's focus (L = ${cameraDistanceM} m, R = ${curvatureRadiusM} m): no shadow can form`,
    );
  }
  return 1 / inv;
}

/** Magnification M = L/L' of the shadow on the camera. */
export function magnification(cameraDistanceM: number, curvatureRadiusM: number): number {
  return cameraDistanceM / effectiveDistanceM(cameraDistanceM, curvatureRadiusM);
}

/** Width of the Fresnel zone at the disc edge, Δr ≈ λL'/(2a). */
export function fresnelZoneWidthM(wavelengthM: number, effectiveDistM: number, discRadiusM: number): number {
  return (wavelengthM * effectiveDistM) / (2 * discRadiusM);
}

/** Fresnel number of the disc seen from the effective distance, a²/(λL'). */
export function fresnelNumber(wavelengthM: number, effectiveDistM: number, discRadiusM: number): number {
  return (discRadiusM * discRadiusM) / (wavelengthM * effectiveDistM);
}

/** Radius on the camera of the spot's first dark ring, r₀ = 2.405·L/(k·a). */
export function firstDarkRingRadiusM(wavelengthM: number, cameraDistanceM: number, discRadiusM: number): number {
  const k = (2 * Math.PI) / wavelengthM;
  return (J0_FIRST_ZERO * cameraDistanceM) / (k * discRadiusM);
}

/** Summary of the derived figures for a setup. */
export interface BenchFigures {
  effectiveDistanceM: number;
  magnification: number;
  fresnelNumber: number;
  fresnelZoneWidthM: number;
  /** Rim tolerance from the 10 % rule (common practice, no published source). */
  rimToleranceM: number;
  firstDarkRingRadiusM: number;
  firstDarkRingDiameterPx: number;
  /** Diameter of the geometric shadow on the camera, 2·a·M. */
  shadowDiameterM: number;
  /** Blur on the camera from a finite source, S·L/G (0 for a point source). */
  sourceBlurM: number;
}

export function benchFigures(setup: BenchSetup): BenchFigures {
  const L = setup.camera.distanceM;
  const R = setup.beam.curvatureRadiusM;
  const a = setup.disc.radiusM;
  const lp = effectiveDistanceM(L, R);
  const m = L / lp;
  const dr = fresnelZoneWidthM(setup.wavelengthM, lp, a);
  const r0 = firstDarkRingRadiusM(setup.wavelengthM, L, a);
  return {
    effectiveDistanceM: lp,
    magnification: m,
    fresnelNumber: fresnelNumber(setup.wavelengthM, lp, a),
    fresnelZoneWidthM: dr,
    rimToleranceM: 0.1 * dr,
    firstDarkRingRadiusM: r0,
    firstDarkRingDiameterPx: (2 * r0) / setup.camera.pixelPitchM,
    shadowDiameterM: 2 * a * m,
    sourceBlurM: setup.source.sizeM > 0 && Number.isFinite(R) ? (setup.source.sizeM * L) / Math.abs(R) : 0,
  };
}
