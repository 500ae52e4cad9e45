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
import { localFieldEngine, type FieldEngine } from '../optics/fieldEngine.ts';
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
  onProgress?: (fraction: number) => boolean | void,
  engine: FieldEngine = localFieldEngine,
): (Float64Array | null)[] {
  const nz = layout.terms.length;
  const aberrations = modelAberrations(layout, p);
  const todo = which.filter(Boolean).length;
  let done = 0;
  return frames.map((fr, f) => {
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
    const ref = engine.referenceIntensity(setup, aberrations, xs, ys, {
      accuracy: 'draft',
      onProgress: onProgress ? (g) => onProgress((done + 0.9 * g) / todo) : undefined,
    });
    const field = engine.fastField(setup, aberrations, xs, ys, { nPhi: rimSamples[f], pointMask: grid ? null : fr.needed });
    const fast = new Float64Array(field.re.length);
    for (let k = 0; k < fast.length; k++) fast[k] = field.re[k] * field.re[k] + field.im[k] * field.im[k];
    done++;
    const a = reduce(ref);
    const b = reduce(fast);
    for (let u = 0; u < a.length; u++) a[u] -= b[u];
    return a;
  });
}
