/** Small builders shared by the optics tests (SI scenes without going through the file format). */
import type { BenchSetup } from '../../core/setup/types.ts';

export function makeSetup(over: {
  wavelengthM?: number;
  beamRadiusM?: number;
  beamCenterM?: [number, number];
  curvatureRadiusM?: number;
  discRadiusM?: number;
  ellipticity?: number;
  ellipseAngleRad?: number;
  edgeHarmonics?: BenchSetup['disc']['edgeHarmonics'];
  distanceM?: number;
  zernikeRadiusM?: number;
}): BenchSetup {
  const w = over.beamRadiusM ?? 4e-3;
  return {
    wavelengthM: over.wavelengthM ?? 632.8e-9,
    beam: { radiusM: w, centerM: over.beamCenterM ?? [0, 0], curvatureRadiusM: over.curvatureRadiusM ?? Infinity },
    disc: {
      radiusM: over.discRadiusM ?? 1.5e-3,
      ellipticity: over.ellipticity ?? 0,
      ellipseAngleRad: over.ellipseAngleRad ?? 0,
      edgeHarmonics: over.edgeHarmonics ?? [],
    },
    camera: { distanceM: over.distanceM ?? 0.8, pixelPitchM: 5.5e-6, bitDepth: 12, saturationCounts: 4095, orientation: { flipX: false, flipY: false, rotateDeg: 0 } },
    zernikeRadiusM: over.zernikeRadiusM ?? w,
    source: { sizeM: 0 },
  };
}

/** n equally spaced values from a to b inclusive. */
export function linspace(a: number, b: number, n: number): Float64Array {
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = n === 1 ? a : a + ((b - a) * i) / (n - 1);
  return out;
}

export function intensityOf(f: { re: Float64Array; im: Float64Array }): Float64Array {
  const out = new Float64Array(f.re.length);
  for (let i = 0; i < out.length; i++) out[i] = f.re[i] * f.re[i] + f.im[i] * f.im[i];
  return out;
}
