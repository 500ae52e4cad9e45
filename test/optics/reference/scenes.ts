/** Bench setups for the reference-model tests (SI units). */
import type { BenchSetup, EdgeHarmonic } from '../../../core/setup/types.ts';

export interface SceneOptions {
  wavelengthM?: number;
  beamRadiusM?: number;
  beamCenterM?: [number, number];
  curvatureRadiusM?: number;
  discRadiusM?: number;
  ellipticity?: number;
  ellipseAngleRad?: number;
  edgeHarmonics?: EdgeHarmonic[];
  distanceM?: number;
  zernikeRadiusM?: number;
}

/** Defaults: the typical bench of the brief (632.8 nm, w = 4 mm, a = 1.5 mm, L = 0.8 m, collimated). */
export function bench(o: SceneOptions = {}): BenchSetup {
  const w = o.beamRadiusM ?? 4e-3;
  return {
    wavelengthM: o.wavelengthM ?? 632.8e-9,
    beam: { radiusM: w, centerM: o.beamCenterM ?? [0, 0], curvatureRadiusM: o.curvatureRadiusM ?? Infinity },
    disc: {
      radiusM: o.discRadiusM ?? 1.5e-3,
      ellipticity: o.ellipticity ?? 0,
      ellipseAngleRad: o.ellipseAngleRad ?? 0,
      edgeHarmonics: o.edgeHarmonics ?? [],
    },
    camera: {
      distanceM: o.distanceM ?? 0.8,
      pixelPitchM: 5e-6,
      bitDepth: 12,
      saturationCounts: 4095,
      orientation: { flipX: false, flipY: false, rotateDeg: 0 },
    },
    zernikeRadiusM: o.zernikeRadiusM ?? w,
    source: { sizeM: 0 },
  };
}

/** n points from `start` with spacing `step`. */
export function axis(n: number, start: number, step: number): Float64Array {
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = start + i * step;
  return out;
}

/** A symmetric axis of n points with spacing `step`, centred on 0. */
export function centredAxis(n: number, step: number): Float64Array {
  return axis(n, -((n - 1) / 2) * step, step);
}

export const ORIGIN = new Float64Array([0]);

export function intensityOf(re: Float64Array, im: Float64Array): Float64Array {
  const out = new Float64Array(re.length);
  for (let i = 0; i < re.length; i++) out[i] = re[i] * re[i] + im[i] * im[i];
  return out;
}

export function maxOf(a: ArrayLike<number>): number {
  let m = -Infinity;
  for (let i = 0; i < a.length; i++) if (a[i] > m) m = a[i];
  return m;
}
