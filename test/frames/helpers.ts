/** Shared helpers for the frame tests: decoded frames made in memory, seeded noise. */
import normal from '@stdlib/random-base-normal';
import type { DecodedFrame } from '../../core/imageio/decodeFrame.ts';
import type { CameraSpec } from '../../core/setup/types.ts';

export function frameOf(data: ArrayLike<number>, widthPx: number, heightPx: number, bitDepth: number | null = 16): DecodedFrame {
  return { data: Float64Array.from(data), widthPx, heightPx, bitDepth, warnings: [], format: 'png' };
}

export function camera12(over: Partial<CameraSpec> = {}): CameraSpec {
  return { distanceM: 0.4, pixelPitchM: 10e-6, bitDepth: 12, saturationCounts: 4095, orientation: { flipX: false, flipY: false, rotateDeg: 0 }, ...over };
}

/** Seeded Gaussian noise (@stdlib/random-base-normal, Mersenne Twister). */
export function gaussianNoise(n: number, sigma: number, seed: number): Float64Array {
  const g = normal.factory(0, sigma, { seed });
  return Float64Array.from({ length: n }, () => g());
}

/** A smooth bright test image: a broad Gaussian bump on an offset, rounded to counts. */
export function bump(widthPx: number, heightPx: number, peak: number, offset: number, widthScalePx = 0.35 * Math.min(widthPx, heightPx)): Float64Array {
  const d = new Float64Array(widthPx * heightPx);
  for (let r = 0; r < heightPx; r++) {
    for (let c = 0; c < widthPx; c++) {
      const x = c - (widthPx - 1) / 2;
      const y = r - (heightPx - 1) / 2;
      d[r * widthPx + c] = Math.round(offset + peak * Math.exp(-(x * x + y * y) / (2 * widthScalePx ** 2)));
    }
  }
  return d;
}
