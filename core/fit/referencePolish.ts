/**
 * Reference-model polish of a fit (a defect correction): at a fast-model solution p₀, compute for every
 * used super-pixel
 *   c = I_reference(p₀) − I_fast(p₀),
 * both evaluated at the fit's own sample points with the fit's own pixel integration (and, for the fast
 * model, the fit's own number of rim samples), and fit again with the model I_fast(p) + c, c held constant.
 * At the fixed point the fitted model equals the reference model to first order in (p − p₀), so the
 * coefficients are the reference model's least-squares solution, while every iteration keeps the fast
 * model's speed and analytic Jacobian. It matters where the fast model's asymptotics are weakest: at the
 * shadow edge, for odd terms (coma) and low Fresnel numbers (core/optics/README.md gives the measured
 * model error). Inside the shadow the correction is below the noise and is skipped by default.
 */
import { effectiveDistanceM } from '../optics/geometry.ts';
import { localFieldEngine, startReference, type FieldEngine } from '../optics/fieldEngine.ts';
import { modelAberrations, modelSetup, stencilReducer, type BinnedFrame, type FitFrameInput, type ModelLayout } from './frameModel.ts';
import { blurredGrid, sourceBlurDiameterM } from './sourceBlur.ts';

export type PolishMode = 'auto' | 'always' | 'never';

/** Whether a frame's analysed region reaches the shadow edge (where the fast model's error is largest). */
export function regionReachesShadowEdge(f: FitFrameInput, centerM: [number, number]): boolean {
  const s = f.setup;
  const shadowRadiusPx = (s.disc.radiusM * s.camera.distanceM) / effectiveDistanceM(s.camera.distanceM, s.beam.curvatureRadiusM) / s.camera.pixelPitchM;
  const pitch = s.camera.pixelPitchM;
  const cxPx = (f.widthPx - 1) / 2 + centerM[0] / pitch;
  const cyPx = (f.heightPx - 1) / 2 - centerM[1] / pitch;
  const offset = Math.hypot(f.regionCenterPx[0] - cxPx, f.regionCenterPx[1] - cyPx);
  return f.regionRadiusPx + offset > 0.8 * shadowRadiusPx;
}

/** Options of referenceCorrections. */
export interface CorrectionOptions {
  /** Completed fraction; return false to cancel. */
  onProgress?: (fraction: number) => boolean | void;
  /** Where the fields are computed (core/optics/fieldEngine.ts). */
  engine?: FieldEngine;
  /**
   * The fit's fast-model intensity per used super-pixel of each frame at p (without any correction), when the
   * caller already has it (from the model evaluation at p); computed here otherwise.
   */
  fastIntensities?: readonly (Float64Array | null)[];
}

/**
 * The correction (reference − fast, relative intensity) per used super-pixel of each frame at
 * parameters p, or null for a frame that is skipped. `rimSamples` are the fit's, so that the fast
 * model's own rim-sampling error is part of what is corrected.
 */
export function referenceCorrections(
  frames: BinnedFrame[],
  layout: ModelLayout,
  p: Float64Array,
  rimSamples: number[],
  which: boolean[],
  options: CorrectionOptions = {},
): (Float64Array | null)[] {
  return startReferenceCorrections(frames, layout, p, rimSamples, which, options).finish(options.fastIntensities);
}

/** Corrections whose reference intensities are being computed (startReferenceCorrections). */
export interface PendingCorrections {
  /**
   * Waits for the reference intensities and returns the corrections, as referenceCorrections does; the fast
   * intensities are computed here for frames without one.
   */
  finish(fastIntensities?: readonly (Float64Array | null)[]): (Float64Array | null)[];
}

/**
 * referenceCorrections in two steps: the reference intensities are started now on the engine, beside the
 * caller's next work where the engine can (a helper thread; core/optics/fieldEngine.ts), and `finish` waits
 * for them. The result is the same as referenceCorrections'.
 */
export function startReferenceCorrections(
  frames: BinnedFrame[],
  layout: ModelLayout,
  p: Float64Array,
  rimSamples: number[],
  which: boolean[],
  options: Omit<CorrectionOptions, 'fastIntensities'> = {},
): PendingCorrections {
  const { onProgress, engine = localFieldEngine } = options;
  const nz = layout.terms.length;
  const aberrations = modelAberrations(layout, p);
  const todo = which.filter(Boolean).length;
  let done = 0;
  const parts = frames.map((fr, f) => {
    if (!which[f]) return null;
    // The frame's model setup at p: distance and disc-radius offsets, a fitted disc shape, the source size.
    const setup = modelSetup(fr.input, layout, p);
    const cx = p[nz + 4 * f];
    const cy = p[nz + 4 * f + 1];
    const blurM = sourceBlurDiameterM(setup);
    const grid = blurM > 0 ? blurredGrid(fr, blurM, fr.blurLevel ?? 'pixel', blurM) : null;
    const xs = Float64Array.from(grid ? grid.xs : fr.xs, (v) => v - cx);
    const ys = Float64Array.from(grid ? grid.ys : fr.ys, (v) => v - cy);
    const reduce = grid ? (v: Float64Array) => grid.reduce(v) : stencilReducer(fr);
    const pending = startReference(engine, setup, aberrations, xs, ys, {
      accuracy: 'draft',
      onProgress: onProgress ? (g) => onProgress((done + 0.9 * g) / todo) : undefined,
    });
    return { setup, xs, ys, grid, reduce, pending };
  });
  return {
    finish(fastIntensities) {
      return frames.map((fr, f) => {
        const part = parts[f];
        if (!part) return null;
        const ref = part.pending(() => !onProgress || onProgress(done / todo) !== false);
        done++;
        const a = part.reduce(ref);
        const b =
          fastIntensities?.[f] ?? part.reduce(fastIntensity(engine, part.setup, aberrations, part.xs, part.ys, rimSamples[f], part.grid ? null : fr.needed, !fr.firstOrder));
        if (b.length !== a.length) throw new RangeError(`frame ${f + 1}: ${b.length} fast-model intensities for ${a.length} super-pixels`);
        for (let u = 0; u < a.length; u++) a[u] -= b[u];
        return a;
      });
    },
  };
}

function fastIntensity(
  engine: FieldEngine,
  setup: ReturnType<typeof modelSetup>,
  aberrations: ReturnType<typeof modelAberrations>,
  xs: Float64Array,
  ys: Float64Array,
  nPhi: number,
  pointMask: Uint8Array | null,
  thirdOrder: boolean,
): Float64Array {
  const field = engine.fastField(setup, aberrations, xs, ys, { nPhi, pointMask, thirdOrder });
  const out = new Float64Array(field.re.length);
  for (let k = 0; k < out.length; k++) out[k] = field.re[k] * field.re[k] + field.im[k] * field.im[k];
  return out;
}
