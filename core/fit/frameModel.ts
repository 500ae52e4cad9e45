/**
 * The fit's forward model for one or more prepared camera frames: binned super-pixels inside each frame's
 * region of interest, the fast diffraction model sampled at every super-pixel's centre and averaged over the
 * super-pixel by a separable filter (pixel-area integration), and the camera noise model (shot noise plus
 * read noise).
 *
 * Parameters, in order: the Zernike coefficients (waves), then per frame [centre x (m), centre y (m),
 * scale (counts per unit relative intensity), background (counts)], then optionally a camera-distance
 * offset shared by all frames (m) and a disc-radius offset (m), then optionally the disc's edge-shape
 * coefficients (two per freed order, disc's own frame; ./disc/shape.ts) and the source diameter S (m).
 * Known aberrations (`fixedAberrations`) enter the model without being fitted. A finite source blurs each
 * frame by S·L/G (./sourceBlur.ts).
 */
import type { BenchSetup, ZernikeTerm } from '../setup/types.ts';
import { chooseRimSamples } from '../optics/fast/rimModel.ts';
import { localFieldEngine, type FieldEngine } from '../optics/fieldEngine.ts';
import { discShapeFieldDerivatives, discShapeParameterNames, discWithShape, shapeTermsFromParams, type DiscShapeTerm } from './disc/shape.ts';
import { blurredGrid, sourceBlurDiameterM, type BlurLevel } from './sourceBlur.ts';

export interface FitFrameInput {
  /** Setup of this frame (its own camera distance, disc angle). */
  setup: BenchSetup;
  /** Averaged, dark-subtracted counts in the lab orientation, row-major, first row on top. */
  counts: Float64Array;
  widthPx: number;
  heightPx: number;
  /** 1 = pixel excluded (saturated, hot). */
  mask: Uint8Array | null;
  /** How many frames were averaged, and how many darks subtracted (for the noise model). */
  frameCount: number;
  darkCount: number;
  /** Read noise of one raw frame, RMS counts. */
  readNoiseCounts: number;
  /** Camera gain in counts per photo-electron (shot-noise variance = gain·signal). */
  gainCountsPerElectron: number;
  /** Region of interest: centre (pixels, may be fractional) and radius (pixels). */
  regionCenterPx: [number, number];
  regionRadiusPx: number;
  /**
   * How far the disc is turned in this frame (rad, counter-clockwise in the lab frame, looking downstream)
   * relative to its own frame: a fitted or calibrated disc shape (./disc/shape.ts) turns with it; the beam's
   * aberrations do not. Default 0. A shape written in the frame's setup is that frame's lab-frame shape.
   */
  discRotationRad?: number;
}

export interface BinnedFrame {
  input: FitFrameInput;
  binning: number;
  /** Super-pixel columns/rows of the binned grid (full rectangle) and which of them are used. */
  nbx: number;
  nby: number;
  used: Int32Array;
  /** Data mean per used super-pixel. */
  data: Float64Array;
  /** Sample axes (2 per super-pixel), camera metres relative to the frame centre. */
  xs: Float64Array;
  ys: Float64Array;
  /** Pixels per super-pixel that are unmasked (all for used ones). */
  pixelsPer: number;
  /**
   * How the model integrates over a super-pixel: each super-pixel is split into s×s sub-cells
   * (s = `subcells`, 1 unless the super-pixel spans more than about a quarter of the ring period); the model is
   * sampled at the sub-cell centres on a grid with a border of PIXEL_FILTER_BORDER samples (xs, ys hold
   * nbx·s + 2·border and nby·s + 2·border centres), averaged over each sub-cell by the separable filter
   * PIXEL_FILTER, and the sub-cells are averaged.
   */
  subcells: number;
  /** Which points of the xs × ys grid the used super-pixels need (1 = needed), row-major. */
  needed: Uint8Array;
  /**
   * Model this frame with the fast model's first order only (no next-order term; FastModelOptions.thirdOrder),
   * whose analytic Jacobian is exact: for a frame whose model error is corrected by the reference model.
   */
  firstOrder?: boolean;
  /**
   * A correction added to the model's relative intensity per used super-pixel, held constant during a fit:
   * the reference model minus the fast model at a previous solution (./referencePolish.ts), or null.
   */
  correction?: Float64Array | null;
  /** How a finite source's blur is modelled (./sourceBlur.ts); default 'pixel'. */
  blurLevel?: BlurLevel;
}

/**
 * Super-pixel (box) average from samples at the super-pixel centres, per axis: a symmetric 7-tap filter
 * whose response w₀ + 2Σₘ wₘ·cos(mθ) matches the box average's response sinc(θ/2) = sin(θ/2)/(θ/2) to
 * within 5.1e-5 for θ = 2π·(super-pixel)/(period) ≤ 1.6 (least-squares design over θ ∈ [0, 1.7], weights
 * summing to 1; a constant is kept exactly). The fit's binning keeps the ring period ≥ 5 super-pixels
 * (θ ≤ 1.26). For comparison, 2×2 Gauss–Legendre sampling of each super-pixel is off by 5.7e-4 at θ = 1.26
 * and needs four samples per super-pixel instead of one. Weights for offsets −3…3.
 */
const PF1 = 0.0639018883003;
const PF2 = -0.00745977333923;
const PF3 = 0.000877734756823;
export const PIXEL_FILTER: readonly number[] = [PF3, PF2, PF1, 1 - 2 * (PF1 + PF2 + PF3), PF1, PF2, PF3];
/** Samples on each side of the super-pixel grid that the filter reads. */
export const PIXEL_FILTER_BORDER = 3;

/**
 * Bin a frame into b×b super-pixels inside the region; super-pixels with any masked pixel are dropped.
 * `maxSubcells` caps the sub-cells per super-pixel and axis (see `subcells`).
 */
export function binFrame(input: FitFrameInput, binning: number, maxSubcells = 4): BinnedFrame {
  const b = Math.max(1, Math.floor(binning));
  const nbx = Math.floor(input.widthPx / b);
  const nby = Math.floor(input.heightPx / b);
  const p = input.setup.camera.pixelPitchM;
  const used: number[] = [];
  const data: number[] = [];
  const [rcx, rcy] = input.regionCenterPx;
  const r2 = input.regionRadiusPx * input.regionRadiusPx;
  for (let by = 0; by < nby; by++) {
    for (let bx = 0; bx < nbx; bx++) {
      const cxPx = bx * b + (b - 1) / 2;
      const cyPx = by * b + (b - 1) / 2;
      if ((cxPx - rcx) ** 2 + (cyPx - rcy) ** 2 > r2) continue;
      let s = 0;
      let bad = false;
      for (let y = by * b; y < by * b + b && !bad; y++) {
        for (let x = bx * b; x < bx * b + b; x++) {
          const k = y * input.widthPx + x;
          if (input.mask && input.mask[k]) {
            bad = true;
            break;
          }
          s += input.counts[k];
        }
      }
      if (bad) continue;
      used.push(by * nbx + bx);
      data.push(s / (b * b));
    }
  }
  // Super-pixel (bx, by) covers columns bx·b … bx·b+b−1 (pixel c spans c − ½ … c + ½); sub-cell i (of s per
  // super-pixel, counted from the first super-pixel, negative in the border) is centred on
  // −½ + (i + ½)·b/s, in camera metres relative to the frame centre.
  const sub = Math.min(Math.max(1, Math.floor(maxSubcells)), subcellsFor(input.setup, b));
  const B = PIXEL_FILTER_BORDER;
  const xs = new Float64Array(nbx * sub + 2 * B);
  const ys = new Float64Array(nby * sub + 2 * B);
  for (let i = 0; i < xs.length; i++) xs[i] = (-0.5 + (i - B + 0.5) * (b / sub) - (input.widthPx - 1) / 2) * p;
  for (let i = 0; i < ys.length; i++) ys[i] = -(-0.5 + (i - B + 0.5) * (b / sub) - (input.heightPx - 1) / 2) * p;
  const usedCells = Int32Array.from(used);
  return {
    input,
    binning: b,
    nbx,
    nby,
    used: usedCells,
    data: Float64Array.from(data),
    xs,
    ys,
    pixelsPer: b * b,
    subcells: sub,
    needed: neededPoints(usedCells, nbx, sub, xs.length, ys.length),
  };
}

/** Ring period on the camera, λL/(2a): the finest structure inside the shadow (any beam curvature). */
export function ringPeriodM(setup: BenchSetup): number {
  return (setup.wavelengthM * setup.camera.distanceM) / (2 * setup.disc.radiusM);
}

/**
 * Sub-cells per super-pixel and axis: enough that the ring period spans at least 2π/1.7 ≈ 3.7 sub-cells, where
 * PIXEL_FILTER is accurate to 1e-4; at most 4.
 */
export function subcellsFor(setup: BenchSetup, binning: number): number {
  const theta = (2 * Math.PI * binning * setup.camera.pixelPitchM) / ringPeriodM(setup);
  return Math.min(4, Math.max(1, Math.ceil(theta / 1.7)));
}

/** The grid points (with the filter's border) that the filter reads for the used super-pixels. */
function neededPoints(used: Int32Array, nbx: number, sub: number, gx: number, gy: number): Uint8Array {
  const out = new Uint8Array(gx * gy);
  const span = sub - 1 + 2 * PIXEL_FILTER_BORDER;
  for (let u = 0; u < used.length; u++) {
    const c = (used[u] % nbx) * sub;
    const r = Math.floor(used[u] / nbx) * sub;
    for (let y = r; y <= r + span; y++) out.fill(1, y * gx + c, y * gx + c + span + 1);
  }
  return out;
}

export interface ModelLayout {
  terms: number[];
  nFrames: number;
  freeDistance: boolean;
  freeDiscRadius: boolean;
  /** Disc edge orders (2, 3, 4) whose shape coefficients are fitted, shared by all frames (./disc/shape.ts). */
  discOrders?: readonly number[];
  /** Known disc shape (disc's own frame) for the orders not fitted, when `discOrders` is not empty. */
  discFixed?: readonly DiscShapeTerm[];
  /** Fit the source diameter S (m), shared by all frames; the blur on the camera is |S|·L/G. */
  freeSourceSize?: boolean;
  /** Known aberrations added to the fitted ones (not fitted; none of `terms`). */
  fixedAberrations?: readonly ZernikeTerm[];
}

export function parameterCount(l: ModelLayout): number {
  return l.terms.length + 4 * l.nFrames + (l.freeDistance ? 1 : 0) + (l.freeDiscRadius ? 1 : 0) + 2 * (l.discOrders?.length ?? 0) + (l.freeSourceSize ? 1 : 0);
}

export function parameterNames(l: ModelLayout): string[] {
  const names = l.terms.map((j) => `z${j}`);
  for (let f = 0; f < l.nFrames; f++) names.push(`cx${f}`, `cy${f}`, `scale${f}`, `bg${f}`);
  if (l.freeDistance) names.push('dL');
  if (l.freeDiscRadius) names.push('da');
  names.push(...discShapeParameterNames(l.discOrders ?? []));
  if (l.freeSourceSize) names.push('S');
  return names;
}

/** Indices of the shared parameters after the per-frame ones (−1 when not in the layout). */
export function sharedParameterIndex(l: ModelLayout): { dL: number; da: number; disc: number; source: number } {
  let k = l.terms.length + 4 * l.nFrames;
  const dL = l.freeDistance ? k++ : -1;
  const da = l.freeDiscRadius ? k++ : -1;
  const nd = l.discOrders?.length ?? 0;
  const disc = nd > 0 ? k : -1;
  k += 2 * nd;
  const source = l.freeSourceSize ? k++ : -1;
  return { dL, da, disc, source };
}

/** The aberrations the model uses at p: the fitted terms and the known ones. */
export function modelAberrations(l: ModelLayout, p: ArrayLike<number>): ZernikeTerm[] {
  return [...l.terms.map((j, k) => ({ j, waves: p[k] })), ...(l.fixedAberrations ?? [])];
}

/**
 * The setup a frame is modelled with at p: the shared distance and disc-radius offsets, the fitted disc
 * shape turned by the frame's disc rotation, and the fitted source size.
 */
export function modelSetup(input: FitFrameInput, l: ModelLayout, p: ArrayLike<number>): BenchSetup {
  const ix = sharedParameterIndex(l);
  let setup = offsetSetup(input.setup, ix.dL >= 0 ? p[ix.dL] : 0, ix.da >= 0 ? p[ix.da] : 0);
  if (ix.disc >= 0) {
    const terms = shapeTermsFromParams(l.discOrders!, p, ix.disc, l.discFixed ?? []);
    setup = { ...setup, disc: discWithShape(setup.disc, terms, input.discRotationRad ?? 0) };
  }
  if (ix.source >= 0) setup = { ...setup, source: { sizeM: Math.abs(p[ix.source]) } };
  return setup;
}

/** Setup with the shared distance and disc-radius offsets applied. */
export function offsetSetup(setup: BenchSetup, dL: number, da: number): BenchSetup {
  if (dL === 0 && da === 0) return setup;
  return {
    ...setup,
    camera: { ...setup.camera, distanceM: setup.camera.distanceM + dL },
    disc: { ...setup.disc, radiusM: setup.disc.radiusM + da },
  };
}

export interface ModelEvaluation {
  /** Model counts per used super-pixel, frames concatenated. */
  model: Float64Array;
  /** Model intensity (relative) per used super-pixel (for the noise model). */
  intensity: Float64Array;
  /** ∂model/∂p, row-major [i·nParams + k], or null. */
  jacobian: Float64Array | null;
}

/**
 * Evaluate the model for all frames at parameters p. `rimSamples` per frame fixes N_φ so that the
 * model is a smooth function of p during a fit.
 */
export function evaluateModel(
  frames: BinnedFrame[],
  layout: ModelLayout,
  p: Float64Array,
  withJacobian: boolean,
  rimSamples: number[],
  /**
   * For frames blurred by a finite source only: 'exact' blurs the derivatives at pixel level like the values;
   * 'centre' takes them at the super-pixel centres, blurred at super-pixel level (cheaper; fine for
   * Levenberg–Marquardt steps, whose residuals stay exact, not for the final covariance). Unblurred frames
   * always get the filtered, pixel-integrated derivatives, at no extra cost.
   */
  jacobianMode: 'exact' | 'centre' = 'exact',
  /** Where the fields are computed (core/optics/fieldEngine.ts); the result does not depend on it. */
  engine: FieldEngine = localFieldEngine,
): ModelEvaluation {
  const nz = layout.terms.length;
  const np = parameterCount(layout);
  const total = frames.reduce((s, f) => s + f.used.length, 0);
  const model = new Float64Array(total);
  const intensity = new Float64Array(total);
  const jac = withJacobian ? new Float64Array(total * np) : null;
  const aberrations: ZernikeTerm[] = modelAberrations(layout, p);
  const shared = sharedParameterIndex(layout);
  const discOrders = layout.discOrders ?? [];
  let row = 0;
  for (let f = 0; f < frames.length; f++) {
    const fr = frames[f];
    const base = nz + 4 * f;
    const cx = p[base], cy = p[base + 1], scale = p[base + 2], bg = p[base + 3];
    const setup = modelSetup(fr.input, layout, p);
    const rotation = fr.input.discRotationRad ?? 0;
    // Finite source: blur diameter S·L/G (S fitted or from the setup); the sample grid grows by its margin.
    const blurM = sourceBlurDiameterM(setup);
    const sourceStep = shared.source >= 0 ? 0.02 * setup.camera.pixelPitchM : 0;
    const grid = blurM > 0 || shared.source >= 0 ? blurredGrid(fr, blurM, fr.blurLevel ?? 'pixel', blurM + 2 * sourceStep) : null;
    const centreDerivs: Float64Array[] = [];
    const xs = Float64Array.from(grid ? grid.xs : fr.xs, (v) => v - cx);
    const ys = Float64Array.from(grid ? grid.ys : fr.ys, (v) => v - cy);
    // Without a finite source the model is sampled once, at the super-pixel centres (and the filter's border),
    // and values and derivatives are filtered alike: every Jacobian is the pixel-integrated one. A blurred
    // frame in 'centre' mode takes its derivatives at super-pixel centres, blurred at super-pixel level.
    const centreJacobian = withJacobian && jacobianMode === 'centre' && !!grid;
    const field = engine.fastField(setup, aberrations, xs, ys, {
      nPhi: rimSamples[f],
      derivativeTerms: withJacobian && !centreJacobian ? layout.terms : undefined,
      centerDerivatives: withJacobian && !centreJacobian,
      pointMask: grid ? null : fr.needed,
      thirdOrder: !fr.firstOrder,
    });
    if (centreJacobian && grid) {
      // Blurred frame: derivatives at the super-pixel centres (with margin), blurred at super-pixel level.
      const cxs = Float64Array.from(grid.centreXs, (v) => v - cx);
      const cys = Float64Array.from(grid.centreYs, (v) => v - cy);
      const cf = engine.fastField(setup, aberrations, cxs, cys, { nPhi: rimSamples[f], derivativeTerms: layout.terms, centerDerivatives: true, thirdOrder: !fr.firstOrder });
      const sd = discOrders.length ? discShapeFieldDerivatives(setup, aberrations, cxs, cys, rimSamples[f], discOrders, rotation) : null;
      const dRe = sd ? [...cf.dRe, ...sd.dRe] : cf.dRe;
      const dIm = sd ? [...cf.dIm, ...sd.dIm] : cf.dIm;
      for (let q = 0; q < dRe.length; q++) {
        const d = new Float64Array(cf.re.length);
        for (let k = 0; k < d.length; k++) d[k] = 2 * (cf.re[k] * dRe[q][k] + cf.im[k] * dIm[q][k]);
        centreDerivs.push(grid.reduceCentre(d));
      }
    }
    // Sample intensities and their derivatives: I = |U|², dI = 2·Re(conj(U)·dU).
    const ns = field.re.length;
    const Is = new Float64Array(ns);
    for (let k = 0; k < ns; k++) Is[k] = field.re[k] * field.re[k] + field.im[k] * field.im[k];
    const dIs: Float64Array[] = [];
    if (jac && !centreJacobian) {
      for (let q = 0; q < nz + 2; q++) {
        const d = new Float64Array(ns);
        const dr = field.dRe[q], di = field.dIm[q];
        for (let k = 0; k < ns; k++) d[k] = 2 * (field.re[k] * dr[k] + field.im[k] * di[k]);
        dIs.push(d);
      }
      if (discOrders.length) {
        const sd = discShapeFieldDerivatives(setup, aberrations, xs, ys, rimSamples[f], discOrders, rotation);
        for (let q = 0; q < sd.dRe.length; q++) {
          const d = new Float64Array(ns);
          const dr = sd.dRe[q], di = sd.dIm[q];
          for (let k = 0; k < ns; k++) d[k] = 2 * (field.re[k] * dr[k] + field.im[k] * di[k]);
          dIs.push(d);
        }
      }
    }
    const reduce = grid ? (v: Float64Array) => grid.reduce(v) : stencilReducer(fr);
    const Iu = reduce(Is);
    const dIu = centreJacobian ? centreDerivs : dIs.map(reduce);
    if (jac && grid && shared.source >= 0) {
      // Source size: central difference of the blur alone (the coherent intensity does not depend on S);
      // D = |S|·L/G, so ∂/∂S = sign(S)·(L/G)·∂/∂D.
      const dDdS = (Math.sign(p[shared.source]) || 1) * (setup.camera.distanceM / Math.abs(setup.beam.curvatureRadiusM));
      const lo = Math.max(0, blurM - sourceStep);
      const plus = grid.reduce(Is, blurM + sourceStep);
      const minus = grid.reduce(Is, lo);
      const d = new Float64Array(fr.used.length);
      for (let u = 0; u < d.length; u++) d[u] = ((plus[u] - minus[u]) / (blurM + sourceStep - lo)) * dDdS;
      dIu.push(d);
    }
    const corr = fr.correction ?? null;
    for (let u = 0; u < fr.used.length; u++) {
      const I = corr ? Iu[u] + corr[u] : Iu[u];
      intensity[row] = I;
      model[row] = scale * I + bg;
      if (jac) {
        const o = row * np;
        for (let t = 0; t < nz; t++) jac[o + t] = scale * dIu[t][u];
        // centre: model at P − c, so ∂/∂c = −∂/∂P
        jac[o + base] = -scale * dIu[nz][u];
        jac[o + base + 1] = -scale * dIu[nz + 1][u];
        jac[o + base + 2] = I;
        jac[o + base + 3] = 1;
        // disc shape (and source size) columns follow the centre derivatives
        for (let q = 0; q < 2 * discOrders.length; q++) jac[o + shared.disc + q] = scale * dIu[nz + 2 + q][u];
        if (shared.source >= 0 && grid) jac[o + shared.source] = scale * dIu[nz + 2 + 2 * discOrders.length][u];
      }
      row++;
    }
  }
  if (jac && (layout.freeDistance || layout.freeDiscRadius)) {
    // Distance and disc-radius offsets: central differences of the model (they enter every frame).
    let col = nz + 4 * layout.nFrames;
    for (const which of ['dL', 'da'] as const) {
      if (which === 'dL' && !layout.freeDistance) continue;
      if (which === 'da' && !layout.freeDiscRadius) continue;
      const h = which === 'dL' ? 1e-5 * frames[0].input.setup.camera.distanceM : 1e-5 * frames[0].input.setup.disc.radiusM;
      const pp = Float64Array.from(p);
      const pm = Float64Array.from(p);
      pp[col] += h;
      pm[col] -= h;
      const mp = evaluateModel(frames, layout, pp, false, rimSamples, 'exact', engine).model;
      const mm = evaluateModel(frames, layout, pm, false, rimSamples, 'exact', engine).model;
      void jacobianMode;
      for (let i = 0; i < total; i++) jac[i * np + col] = (mp[i] - mm[i]) / (2 * h);
      col++;
    }
  }
  return { model, intensity, jacobian: jac };
}

/** Mean of the 2×2 Gauss–Legendre samples of each used super-pixel. */
export function gl2Reducer(fr: Pick<BinnedFrame, 'used' | 'nbx'>, nx: number): (v: Float64Array) => Float64Array {
  return (v) => {
    const out = new Float64Array(fr.used.length);
    for (let u = 0; u < fr.used.length; u++) {
      const cell = fr.used[u];
      const bx = cell % fr.nbx;
      const by = (cell - bx) / fr.nbx;
      const k = 2 * by * nx + 2 * bx;
      out[u] = 0.25 * (v[k] + v[k + 1] + v[k + nx] + v[k + nx + 1]);
    }
    return out;
  };
}

/**
 * The separable filter PIXEL_FILTER on the bordered sub-cell grid, then the mean of each used super-pixel's
 * s×s sub-cells (s = `subcells`, default 1).
 */
export function stencilReducer(fr: Pick<BinnedFrame, 'used' | 'nbx' | 'xs' | 'ys'> & { subcells?: number }): (v: Float64Array) => Float64Array {
  const gx = fr.xs.length;
  const gy = fr.ys.length;
  const w = PIXEL_FILTER;
  const span = w.length;
  const W = gx - (span - 1);
  const sub = fr.subcells ?? 1;
  const inv = 1 / (sub * sub);
  return (v) => {
    // filter along x for every grid row, at interior columns
    const tmp = new Float64Array(gy * W);
    for (let r = 0; r < gy; r++) {
      const o = r * gx;
      for (let c = 0; c < W; c++) {
        const k = o + c;
        tmp[r * W + c] = w[0] * v[k] + w[1] * v[k + 1] + w[2] * v[k + 2] + w[3] * v[k + 3] + w[4] * v[k + 4] + w[5] * v[k + 5] + w[6] * v[k + 6];
      }
    }
    const out = new Float64Array(fr.used.length);
    for (let u = 0; u < fr.used.length; u++) {
      const cell = fr.used[u];
      const bx = cell % fr.nbx;
      const by = (cell - bx) / fr.nbx;
      let sum = 0;
      for (let i = 0; i < sub; i++) {
        for (let j = 0; j < sub; j++) {
          const k = (by * sub + i) * W + bx * sub + j;
          sum += w[0] * tmp[k] + w[1] * tmp[k + W] + w[2] * tmp[k + 2 * W] + w[3] * tmp[k + 3 * W] + w[4] * tmp[k + 4 * W] + w[5] * tmp[k + 5 * W] + w[6] * tmp[k + 6 * W];
        }
      }
      out[u] = sum * inv;
    }
    return out;
  };
}

/** Rim samples for each frame, chosen once for the frame's extent (plus a margin for centre moves). */
export function rimSamplesFor(frames: BinnedFrame[], terms: ZernikeTerm[]): number[] {
  return frames.map((f) => {
    // Only the region's circle matters (pixels outside it are computed but not used): its radius around
    // the pattern, with room for the stencil border, binning and centre moves during the fit.
    const p = f.input.setup.camera.pixelPitchM;
    // A finite source widens the computed grid by the blur's radius (with room for a fitted size to grow).
    const blurRadiusM = 0.75 * sourceBlurDiameterM(f.input.setup);
    const radiusM = (f.input.regionRadiusPx + 2 * f.binning + 3) * p * 1.05 + 20e-6 + blurRadiusM;
    return chooseRimSamples(f.input.setup, terms, f.xs, f.ys, radiusM);
  });
}

/** Noise variance of each used super-pixel's mean, from the model intensity (shot + read noise). */
export function superPixelVariance(frames: BinnedFrame[], layout: ModelLayout, p: Float64Array, intensity: Float64Array): Float64Array {
  const nz = layout.terms.length;
  const out = new Float64Array(intensity.length);
  let row = 0;
  for (let f = 0; f < frames.length; f++) {
    const fr = frames[f];
    const inp = fr.input;
    const scale = p[nz + 4 * f + 2];
    const read2 = inp.readNoiseCounts ** 2;
    for (let u = 0; u < fr.used.length; u++) {
      const signal = Math.max(scale * intensity[row], 0);
      const perPixel = (inp.gainCountsPerElectron * signal + read2) / inp.frameCount + (inp.darkCount > 0 ? read2 / inp.darkCount : 0);
      out[row] = perPixel / fr.pixelsPer;
      row++;
    }
  }
  return out;
}
