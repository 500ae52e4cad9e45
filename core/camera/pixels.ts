/**
 * Camera pixel geometry: where a frame's pixels sit in the camera plane, and the sample points
 * used to integrate intensity over each pixel's area.
 *
 * Convention (physics notes, section 5): camera coordinates are lab-frame metres relative to the point
 * where the line from the nominal source through the disc centre meets the sensor; x right, y up.
 * In a stored frame the column index runs along +x and the row index along −y (row 0 is the top).
 */
import type { FrameSpec } from '../setup/types.ts';

/** Gauss–Legendre nodes on [−1/2, 1/2] and weights summing to 1, for n = 1..4 sub-samples per axis. */
const GL_OFFSETS: Record<number, { t: number[]; w: number[] }> = {
  1: { t: [0], w: [1] },
  2: { t: [-0.5 / Math.sqrt(3), 0.5 / Math.sqrt(3)], w: [0.5, 0.5] },
  3: { t: [-0.5 * Math.sqrt(0.6), 0, 0.5 * Math.sqrt(0.6)], w: [5 / 18, 8 / 18, 5 / 18] },
  4: {
    t: [-0.4305681557970263, -0.16999052179242813, 0.16999052179242813, 0.4305681557970263],
    w: [0.17392742256872692, 0.3260725774312731, 0.3260725774312731, 0.17392742256872692],
  },
};

export interface PixelSampleAxes {
  /** Sub-samples per pixel along each axis. */
  oversample: number;
  /** Camera x of every sample, column-major in pixel order: length widthPx·oversample. */
  xsM: Float64Array;
  /** Camera y of every sample, top row first (descending y): length heightPx·oversample. */
  ysM: Float64Array;
  /** Quadrature weight of each sub-sample position along one axis (sums to 1). */
  weights: Float64Array;
}

/** Camera x of pixel column `col` centre, and y of pixel row `row` centre. */
export function pixelCenterM(frame: FrameSpec, pixelPitchM: number, col: number, row: number): [number, number] {
  const x = frame.centerM[0] + (col - (frame.widthPx - 1) / 2) * pixelPitchM;
  const y = frame.centerM[1] - (row - (frame.heightPx - 1) / 2) * pixelPitchM;
  return [x, y];
}

/** Sample axes for integrating over pixel areas with a separable Gauss–Legendre rule. */
export function pixelSampleAxes(frame: FrameSpec, pixelPitchM: number, oversample = 2): PixelSampleAxes {
  const rule = GL_OFFSETS[oversample];
  if (!rule) throw new RangeError(`oversample must be 1, 2, 3 or 4 (got ${oversample})`);
  const { widthPx: w, heightPx: h } = frame;
  const xsM = new Float64Array(w * oversample);
  const ysM = new Float64Array(h * oversample);
  for (let c = 0; c < w; c++) {
    const xc = frame.centerM[0] + (c - (w - 1) / 2) * pixelPitchM;
    for (let s = 0; s < oversample; s++) xsM[c * oversample + s] = xc + rule.t[s] * pixelPitchM;
  }
  for (let r = 0; r < h; r++) {
    const yc = frame.centerM[1] - (r - (h - 1) / 2) * pixelPitchM;
    // Within a row, samples also run top to bottom (descending y).
    for (let s = 0; s < oversample; s++) ysM[r * oversample + s] = yc - rule.t[s] * pixelPitchM;
  }
  return { oversample, xsM, ysM, weights: Float64Array.from(rule.w) };
}

/**
 * Average sub-sampled values (row-major, rows = ysM, columns = xsM) into pixel means.
 * Returns a row-major widthPx × heightPx array.
 */
export function binSamples(samples: ArrayLike<number>, widthPx: number, heightPx: number, axes: PixelSampleAxes): Float64Array {
  const s = axes.oversample;
  const nx = widthPx * s;
  const out = new Float64Array(widthPx * heightPx);
  const wts = axes.weights;
  for (let r = 0; r < heightPx; r++) {
    for (let sy = 0; sy < s; sy++) {
      const rowOff = (r * s + sy) * nx;
      const wy = wts[sy];
      for (let c = 0; c < widthPx; c++) {
        let acc = 0;
        for (let sx = 0; sx < s; sx++) acc += wts[sx] * samples[rowOff + c * s + sx];
        out[r * widthPx + c] += wy * acc;
      }
    }
  }
  return out;
}
