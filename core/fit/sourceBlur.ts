/**
 * The finite source in the fit's frame model: the point-source intensity, averaged over each pixel, is
 * convolved with the uniform disc of diameter S·L/G on the camera (physics notes §2), by the same rule and
 * the same kernel code as the simulator (core/optics/simulate.ts, core/camera/blur.ts: G = |R|, exact
 * pixel/disc overlap weights, zero outside the computed grid), then averaged into super-pixels.
 *
 * Two levels:
 *  - 'pixel' (the fit's final stage): the model is sampled at pixel centres on the frame's binned rectangle
 *    plus the kernel's margin, pixel-averaged by the 7-tap filter (frameModel PIXEL_FILTER), blurred pixel by
 *    pixel exactly as the simulator does, and binned — the simulator's rule to the pixel;
 *  - 'super' (the coarse stages, only to find the basin): super-pixel means (2×2 Gauss–Legendre) blurred with
 *    the kernel scaled to super-pixels. Cheaper, approximate.
 * For Levenberg–Marquardt steps ('centre' Jacobian mode) the derivatives are taken at super-pixel centres and
 * blurred at super-pixel level.
 */
import type { BenchSetup } from '../setup/types.ts';
import { benchFigures } from '../optics/geometry.ts';
import { blurMarginPx, convolveWithDisc } from '../camera/blur.ts';
import { gl2Reducer, PIXEL_FILTER_BORDER, stencilReducer, type BinnedFrame } from './frameModel.ts';

export type BlurLevel = 'pixel' | 'super';

/** Blur diameter S·L/G on the camera for a source of diameter `sourceSizeM` (0 for a collimated beam: G = ∞). */
export function sourceBlurDiameterM(setup: BenchSetup, sourceSizeM: number = setup.source.sizeM): number {
  if (!(sourceSizeM > 0)) return 0;
  return benchFigures({ ...setup, source: { sizeM: sourceSizeM } }).sourceBlurM;
}

export interface BlurredGrid {
  /** Sample axes (camera metres relative to the frame centre, before the pattern-centre shift). */
  xs: Float64Array;
  ys: Float64Array;
  /** Samples on (xs × ys) → blurred values of the used super-pixels; `diameterM` defaults to the grid's. */
  reduce: (v: Float64Array, diameterM?: number) => Float64Array;
  /** Super-pixel-centre axes (with margin) and their reducer, for centre-sampled derivatives. */
  centreXs: Float64Array;
  centreYs: Float64Array;
  reduceCentre: (v: Float64Array) => Float64Array;
}

const GL2 = 0.5 / Math.sqrt(3);

function allCells(n: number): Int32Array {
  return Int32Array.from({ length: n }, (_, i) => i);
}

/**
 * The sample grid and reducers of a binned frame blurred by a disc of `diameterM` on the camera.
 * `maxDiameterM` (≥ diameterM) sets the margin, so that `reduce(v, d)` works for any d up to it
 * (the fitted source size's finite difference).
 */
export function blurredGrid(fr: BinnedFrame, diameterM: number, level: BlurLevel, maxDiameterM = diameterM): BlurredGrid {
  const inp = fr.input;
  const p = inp.setup.camera.pixelPitchM;
  const b = fr.binning;
  const cell = b * p;
  const { nbx, nby } = fr;
  // --- centre grid: super-pixel centres with a margin of the kernel's half-width in super-pixels
  const mc = blurMarginPx(Math.max(maxDiameterM, diameterM) / cell);
  const Nx = nbx + 2 * mc;
  const Ny = nby + 2 * mc;
  const centreXs = new Float64Array(Nx);
  const centreYs = new Float64Array(Ny);
  for (let i = 0; i < Nx; i++) centreXs[i] = ((i - mc) * b + (b - 1) / 2 - (inp.widthPx - 1) / 2) * p;
  for (let i = 0; i < Ny; i++) centreYs[i] = -((i - mc) * b + (b - 1) / 2 - (inp.heightPx - 1) / 2) * p;
  const pickCells = (grid: Float64Array, margin: number, width: number): Float64Array => {
    const out = new Float64Array(fr.used.length);
    for (let u = 0; u < fr.used.length; u++) {
      const c = fr.used[u];
      const bx = c % nbx;
      const by = (c - bx) / nbx;
      out[u] = grid[(by + margin) * width + bx + margin];
    }
    return out;
  };
  const reduceCentre = (v: Float64Array) => pickCells(convolveWithDisc(v, Nx, Ny, diameterM / cell), mc, Nx);

  if (level === 'super' && b > 1) {
    const xs = new Float64Array(2 * Nx);
    const ys = new Float64Array(2 * Ny);
    for (let i = 0; i < Nx; i++) {
      xs[2 * i] = centreXs[i] - GL2 * cell;
      xs[2 * i + 1] = centreXs[i] + GL2 * cell;
    }
    for (let i = 0; i < Ny; i++) {
      ys[2 * i] = centreYs[i] + GL2 * cell;
      ys[2 * i + 1] = centreYs[i] - GL2 * cell;
    }
    const means = gl2Reducer({ used: allCells(Nx * Ny), nbx: Nx }, 2 * Nx);
    const reduce = (v: Float64Array, d = diameterM) => pickCells(convolveWithDisc(means(v), Nx, Ny, d / cell), mc, Nx);
    return { xs, ys, reduce, centreXs, centreYs, reduceCentre };
  }

  // --- pixel level: pixel centres over the binned rectangle plus the kernel margin, plus the filter's border
  const m = blurMarginPx(Math.max(maxDiameterM, diameterM) / p);
  const W = nbx * b + 2 * m;
  const H = nby * b + 2 * m;
  const B = PIXEL_FILTER_BORDER;
  const xs = new Float64Array(W + 2 * B);
  const ys = new Float64Array(H + 2 * B);
  for (let i = 0; i < W + 2 * B; i++) xs[i] = (i - m - B - (inp.widthPx - 1) / 2) * p;
  for (let i = 0; i < H + 2 * B; i++) ys[i] = -(i - m - B - (inp.heightPx - 1) / 2) * p;
  const pixelMeans = stencilReducer({ used: allCells(W * H), nbx: W, xs, ys });
  const reduce = (v: Float64Array, d = diameterM) => {
    const blurred = convolveWithDisc(pixelMeans(v), W, H, d / p);
    const out = new Float64Array(fr.used.length);
    const inv = 1 / (b * b);
    for (let u = 0; u < fr.used.length; u++) {
      const c = fr.used[u];
      const bx = c % nbx;
      const by = (c - bx) / nbx;
      let s = 0;
      for (let y = by * b + m; y < by * b + b + m; y++) for (let x = bx * b + m; x < bx * b + b + m; x++) s += blurred[y * W + x];
      out[u] = s * inv;
    }
    return out;
  };
  return { xs, ys, reduce, centreXs, centreYs, reduceCentre };
}
