/**
 * Fit camera frames of the disc's shadow for the beam's low-order Zernike aberrations.
 *
 * Weighted least squares under the camera noise model, by Levenberg–Marquardt with the fast model's
 * analytic Jacobian, on binned super-pixels. The ring pattern makes the cost surface multi-modal, so the
 * fit starts from a coarse search on defocus (with scale and background solved linearly), then tries the
 * sign-flipped even-m alternative (the rim phase alone cannot tell +W from −W rotated by 180°; physics notes
 * §3). A suspect minimum is detected from χ² and from structure in the residuals and is reported as such.
 */
import { ansiToNM, peakToValley, zernikeName } from '../zernike/index.ts';
import { effectiveDistanceM } from '../optics/geometry.ts';
import { levenbergMarquardt, invertSPD, normalEquations, type LMResult } from './levenbergMarquardt.ts';
import {
  binFrame,
  ringPeriodM,
  evaluateModel,
  parameterCount,
  parameterNames,
  rimSamplesFor,
  sharedParameterIndex,
  superPixelVariance,
  type BinnedFrame,
  type FitFrameInput,
  type ModelLayout,
  type ModelEvaluation,
} from './frameModel.ts';
import { RESULT_FORMAT, type FitResult, type Termination } from './result.ts';
import { symmetryCentrePx } from './symmetryCentre.ts';
import type { ZernikeTerm } from '../setup/types.ts';
import { checkDiscOrders, discWithShape } from './disc/shape.ts';
import type { AppliedDiscProfile, DiscShapeResult } from './disc/profile.ts';
import { summariseDiscShape } from './disc/summary.ts';
import { profileCovariance } from './disc/propagate.ts';
import { sourceBlurDiameterM } from './sourceBlur.ts';
import { localFieldEngine, type FieldEngine } from '../optics/fieldEngine.ts';
import { regionReachesShadowEdge, startReferenceCorrections, type PolishMode } from './referencePolish.ts';

export const DEFAULT_TERMS = [3, 4, 5, 7, 8] as const;
export const OPTIONAL_TERMS = [6, 9, 12] as const;
const ALLOWED_TERMS = new Set<number>([...DEFAULT_TERMS, ...OPTIONAL_TERMS]);

export interface FitOptions {
  terms?: readonly number[];
  /** Free a camera-distance offset shared by all frames (degenerate with defocus in one frame). */
  freeDistance?: boolean;
  /** Free the disc radius within ±toleranceM (a Gaussian prior of that width). */
  freeDiscRadius?: boolean;
  discRadiusToleranceM?: number;
  /** Super-pixel size in camera pixels; 'auto' picks ~1/5 of the ring period. */
  binning?: number | 'auto';
  /** Initial pattern centre per frame, camera metres relative to the frame centre (default 0, 0). */
  initialCentersM?: [number, number][];
  /** Whether the disc's shape is calibrated (drops the disc-shape warning). */
  discCalibrated?: boolean;
  /**
   * Disc edge orders whose shape is fitted together with the beam (2 = ellipticity; 3, 4 = edge harmonics;
   * ./disc/shape.ts), shared by all frames and turned by each frame's `discRotationRad`. Frames at several
   * disc angles separate them from the beam's same-m terms; otherwise the result says they are degenerate.
   */
  discOrders?: readonly number[];
  /**
   * A calibrated disc profile: its shape, turned by each frame's disc rotation, replaces the setups' disc
   * ellipticity and harmonics of orders 2–4; the disc-shape warning is dropped and the result records it.
   */
  discProfile?: AppliedDiscProfile | null;
  /** Fit the source diameter S (needs a finite beam curvature: the blur is S·L/G with G = |R|). */
  freeSourceSize?: boolean;
  /** Known aberrations (waves), held fixed and not fitted (a reference beam); must not repeat a fitted term. */
  knownAberrations?: readonly ZernikeTerm[];
  software?: string;
  maxIterations?: number;
  /** Progress 0..1 with a stage name; return false to cancel. */
  onProgress?: (fraction: number, stage: string) => boolean | void;
  /**
   * Where the model fields are computed (core/optics/fieldEngine.ts): by default in this thread; a shell may
   * share the work among threads. The result does not depend on it.
   */
  fieldEngine?: FieldEngine;
  /**
   * Estimate the camera noise (gain and read noise) from the residuals of a first fit, for frames whose
   * noise is not known (no dark frames, no gain given). χ²/dof is then ≈ 1 by construction and only the
   * residual structure can flag a wrong minimum.
   */
  estimateNoise?: boolean;
  /**
   * Polish the solution with the reference model (./referencePolish.ts): 'auto' (default) for frames
   * whose region reaches the shadow edge, 'always', or 'never'.
   */
  referencePolish?: PolishMode;
}

export class FitInputError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'RangeError';
  }
}

function cancelledError(): Error {
  const e = new Error('fit cancelled');
  e.name = 'CancelledError';
  return e;
}

/** Super-pixel size the fit picks by default: about 1/5 of the ring period, 1 to 16 pixels. */
export function autoBinning(frames: FitFrameInput[]): number {
  let b = 16;
  for (const f of frames) b = Math.min(b, Math.floor(ringPeriodM(f.setup) / (5 * f.setup.camera.pixelPitchM)));
  return Math.max(1, b);
}

/** Weighted linear least squares for scale and background given the model intensity. */
function solveScaleBackground(data: Float64Array, I: Float64Array, w: Float64Array, from: number, to: number): [number, number] {
  let sw = 0, sI = 0, sII = 0, sd = 0, sId = 0;
  for (let i = from; i < to; i++) {
    sw += w[i];
    sI += w[i] * I[i];
    sII += w[i] * I[i] * I[i];
    sd += w[i] * data[i];
    sId += w[i] * I[i] * data[i];
  }
  const det = sw * sII - sI * sI;
  if (!(Math.abs(det) > 0)) return [sd / Math.max(sI, 1e-300), 0];
  return [(sw * sId - sI * sd) / det, (sII * sd - sI * sId) / det];
}

interface Problem {
  frames: BinnedFrame[];
  layout: ModelLayout;
  data: Float64Array;
  rim: number[];
  sigma: Float64Array;
  /** Gaussian priors (p[index] − centre)/sigma appended to the residuals. */
  priors: { index: number; sigma: number; centre: number }[];
  /** Where the model fields are computed. */
  engine: FieldEngine;
}

/**
 * A model evaluation kept for reuse: the (unweighted) model Jacobian and the intensity at parameters p, for
 * the Jacobian mode it was made in.
 */
interface KeptEvaluation {
  p: Float64Array;
  intensity: Float64Array;
  jacobian: Float64Array;
  mode: 'exact' | 'centre';
}

/**
 * The evaluation at seed.p from a kept Jacobian and a new intensity: for a model that differs from the kept
 * one by a constant added to the intensity (the reference-model correction), every derivative is the same
 * except the one by the scale, which is the intensity itself.
 */
function seededEvaluation(pr: Problem, p: Float64Array, seed: KeptEvaluation): ModelEvaluation {
  const np = parameterCount(pr.layout);
  const nz = pr.layout.terms.length;
  const jacobian = Float64Array.from(seed.jacobian);
  let row = 0;
  pr.frames.forEach((fr, f) => {
    for (let u = 0; u < fr.used.length; u++, row++) jacobian[row * np + nz + 4 * f + 2] = seed.intensity[row];
  });
  return { model: modelFromIntensity(pr, p, seed.intensity), intensity: seed.intensity, jacobian };
}

/** The model scale·I + background of every used super-pixel, for the intensity I at parameters p. */
function modelFromIntensity(pr: Problem, p: Float64Array, intensity: Float64Array): Float64Array {
  const nz = pr.layout.terms.length;
  const model = new Float64Array(intensity.length);
  let row = 0;
  pr.frames.forEach((fr, f) => {
    const scale = p[nz + 4 * f + 2], bg = p[nz + 4 * f + 3];
    for (let u = 0; u < fr.used.length; u++, row++) model[row] = scale * intensity[row] + bg;
  });
  return model;
}

function sameParams(a: Float64Array, b: Float64Array): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

/**
 * The problem with residuals and Jacobian divided by σ. `seed` (used once) replaces the first evaluation
 * with a Jacobian at exactly seed.p; `last` keeps the latest evaluation with a Jacobian.
 */
function makeWeighted(pr: Problem, jacobianMode: 'exact' | 'centre' = 'centre', seed: KeptEvaluation | null = null) {
  const np = parameterCount(pr.layout);
  const extra = pr.priors.length;
  const weighted = {
    nParams: np,
    last: null as KeptEvaluation | null,
    evaluate(p: Float64Array, withJacobian: boolean) {
      let ev: ModelEvaluation;
      if (seed && withJacobian && seed.mode === jacobianMode && sameParams(seed.p, p)) {
        ev = seededEvaluation(pr, p, seed);
        seed = null;
      } else ev = evaluateModel(pr.frames, pr.layout, p, withJacobian, pr.rim, jacobianMode, pr.engine);
      if (ev.jacobian) weighted.last = { p: Float64Array.from(p), intensity: ev.intensity, jacobian: ev.jacobian, mode: jacobianMode };
      const m = pr.data.length;
      const r = new Float64Array(m + extra);
      for (let i = 0; i < m; i++) r[i] = (pr.data[i] - ev.model[i]) / pr.sigma[i];
      let J: Float64Array | null = null;
      if (ev.jacobian) {
        J = new Float64Array((m + extra) * np);
        for (let i = 0; i < m; i++) {
          const s = 1 / pr.sigma[i];
          for (let k = 0; k < np; k++) J[i * np + k] = ev.jacobian[i * np + k] * s;
        }
      }
      pr.priors.forEach((q, i) => {
        r[m + i] = -(p[q.index] - q.centre) / q.sigma;
        if (J) J[(m + i) * np + q.index] = 1 / q.sigma;
      });
      return { r, J };
    },
  };
  return weighted;
}

function chi2At(pr: Problem, p: Float64Array): number {
  const w = makeWeighted(pr).evaluate(p, false).r;
  let s = 0;
  for (const v of w) s += v * v;
  return s;
}

/** Indices (in the coefficient list) of terms with even azimuthal order m (defocus, astigmatism, spherical). */
function evenTermIndices(terms: number[]): number[] {
  return terms.map((j, i) => (ansiToNM(j).m % 2 === 0 ? i : -1)).filter((i) => i >= 0);
}

export function fitShadow(inputs: FitFrameInput[], options: FitOptions = {}): FitResult {
  const t0 = Date.now();
  if (inputs.length === 0) throw new FitInputError('no frames to fit');
  const terms = [...(options.terms ?? DEFAULT_TERMS)];
  for (const j of terms) {
    if (!ALLOWED_TERMS.has(j)) {
      throw new FitInputError(
        `term j = ${j} cannot be fitted: choose from ${[...ALLOWED_TERMS].sort((a, b) => a - b).join(', ')} (piston and tilt are absorbed by the pattern centre)`,
      );
    }
  }
  if (new Set(terms).size !== terms.length) throw new FitInputError(`a term is listed twice in ${terms.join(',')}`);
  const discOrders = [...(options.discOrders ?? [])];
  const orderProblem = checkDiscOrders(discOrders);
  if (orderProblem) throw new FitInputError(orderProblem);
  const known = (options.knownAberrations ?? []).filter((t) => t.waves !== 0);
  for (const t of known) {
    if (terms.includes(t.j)) throw new FitInputError(`term j = ${t.j} is both fitted and given as known`);
  }
  if (terms.length === 0 && discOrders.length === 0) throw new FitInputError('nothing to fit: give Zernike terms or disc edge orders');
  if (options.freeSourceSize && inputs.some((f) => !Number.isFinite(f.setup.beam.curvatureRadiusM))) {
    throw new FitInputError('the source size can only be fitted for a diverging or converging beam (finite curvature radius): a collimated beam is not blurred by its source (S·L/G with G = ∞)');
  }
  // A calibrated profile replaces the setups' disc shape (turned by each frame's disc rotation).
  const profile = options.discProfile ?? null;
  if (profile) {
    inputs = inputs.map((f) => ({ ...f, setup: { ...f.setup, disc: discWithShape(f.setup.disc, profile.terms, f.discRotationRad ?? 0) } }));
  }
  // A fitted source size starts at the stated one, or at a blur of 2 pixels; its margin is kept in the frames' setups.
  const sourceStartM = options.freeSourceSize
    ? Math.max(...inputs.map((f) => (f.setup.source.sizeM > 0 ? f.setup.source.sizeM : (2 * f.setup.camera.pixelPitchM * Math.abs(f.setup.beam.curvatureRadiusM)) / f.setup.camera.distanceM)))
    : 0;
  if (options.freeSourceSize) inputs = inputs.map((f) => ({ ...f, setup: { ...f.setup, source: { sizeM: 1.5 * sourceStartM } } }));
  const progress = options.onProgress;
  const engine = options.fieldEngine ?? localFieldEngine;
  const step = (f: number, stage: string) => {
    if (progress && progress(f, stage) === false) throw cancelledError();
  };
  const warnings: string[] = [];
  const layout: ModelLayout = {
    terms,
    nFrames: inputs.length,
    freeDistance: !!options.freeDistance,
    freeDiscRadius: !!options.freeDiscRadius,
    discOrders,
    discFixed: profile?.terms ?? [],
    freeSourceSize: !!options.freeSourceSize,
    fixedAberrations: known,
  };
  const np = parameterCount(layout);
  const shared = sharedParameterIndex(layout);
  const nz = terms.length;

  // --- binning and data: a coarse stage (2× binning) finds the basin, the fine stage refines it
  const binning = options.binning === undefined || options.binning === 'auto' ? autoBinning(inputs) : Math.max(1, Math.floor(options.binning));
  const rimFor = (fr: BinnedFrame[]) => rimSamplesFor(fr, [...terms.map((j) => ({ j, waves: 0.3 })), ...known]);
  const priors: Problem['priors'] = [];
  if (layout.freeDiscRadius) priors.push({ index: shared.da, sigma: options.discRadiusToleranceM ?? 0.01 * inputs[0].setup.disc.radiusM, centre: 0 });
  if (layout.freeSourceSize) {
    // A weak prior keeps a blur below one pixel (which the pixel kernel cannot see) from leaving S undetermined:
    // centred on a point source, 1σ = the size whose blur equals the spot's first dark ring diameter.
    const f0 = inputs[0].setup;
    const spotM = (2 * 2.404825557695773 * f0.camera.distanceM * f0.wavelengthM) / (2 * Math.PI * f0.disc.radiusM);
    priors.push({ index: shared.source, sigma: (spotM * Math.abs(f0.beam.curvatureRadiusM)) / f0.camera.distanceM, centre: 0 });
  }
  const makeProblem = (b: number, maxSubcells?: number): Problem => {
    const frames = inputs.map((f) => binFrame(f, b, maxSubcells));
    for (let f = 0; f < frames.length; f++) {
      if (frames[f].used.length < 4 * np) throw new FitInputError(`frame ${f + 1}: only ${frames[f].used.length} usable super-pixels in the region of interest`);
    }
    const data = new Float64Array(frames.reduce((s, f) => s + f.used.length, 0));
    let o = 0;
    for (const f of frames) {
      data.set(f.data, o);
      o += f.data.length;
    }
    return { frames, layout, data, rim: rimFor(frames), sigma: new Float64Array(data.length), priors, engine };
  };
  const fine = makeProblem(binning);
  // The coarse stage keeps ≲ 2500 super-pixels; the defocus search runs on ≲ 900 (it reads mostly the
  // shadow size and the ring envelope, which survive heavy binning).
  const coarsen = (target: number) => Math.max(binning, Math.ceil(binning * Math.sqrt(fine.data.length / target)));
  const coarseBinning = fine.data.length > 2500 ? Math.min(coarsen(2500), 2 * binning + 2) : binning;
  const coarse = coarseBinning === binning ? fine : makeProblem(coarseBinning);
  const searchBinning = Math.max(coarseBinning, coarsen(900));
  // The defocus search reads the ring envelope: 2×2 sub-cells per super-pixel are enough for it, even where
  // its super-pixels span more than a ring period (the model is then only approximate).
  const search = searchBinning === coarseBinning ? coarse : makeProblem(searchBinning, 2);
  // The coarse stages blur a finite source at super-pixel level (cheaper; they only find the basin).
  for (const pr of [coarse, search]) if (pr !== fine) pr.frames.forEach((f) => (f.blurLevel = 'super'));
  // The search's own frames take the fast model's first order (no next-order factor; 40 % cheaper per value):
  // it picked the same defocus as the full model in all 80 trials of the accuracy study.
  if (search !== coarse) search.frames.forEach((f) => (f.firstOrder = true));
  const polishMode = options.referencePolish ?? 'auto';
  // The frames the reference-model polish corrects: those whose region reaches the shadow edge at centres q.
  const polishFor = (q: Float64Array) =>
    inputs.map((f, i) => polishMode === 'always' || (polishMode === 'auto' && regionReachesShadowEdge(f, [q[nz + 4 * i], q[nz + 4 * i + 1]])));

  // --- start: centres, coarse search on defocus with scale and background solved linearly
  step(0, 'coarse search');
  const p = new Float64Array(np);
  for (let f = 0; f < inputs.length; f++) {
    const c = options.initialCentersM?.[f] ?? [0, 0];
    p[nz + 4 * f] = c[0];
    p[nz + 4 * f + 1] = c[1];
    p[nz + 4 * f + 2] = 1;
  }
  if (shared.disc >= 0) {
    discOrders.forEach((n, i) => {
      const t = profile?.terms.find((q) => q.order === n);
      p[shared.disc + 2 * i] = t?.cos ?? 0;
      p[shared.disc + 2 * i + 1] = t?.sin ?? 0;
    });
  }
  if (shared.source >= 0) p[shared.source] = sourceStartM;
  // The coarse stage's frames that the polish will correct take the first order too (the polish fits the first
  // order plus its correction, measured at the coarse solution): the next-order term costs a second pass over
  // the rim.
  if (coarse !== fine) {
    const willPolish = polishFor(p);
    coarse.frames.forEach((f, i) => (f.firstOrder = willPolish[i]));
  }
  const dataWeights = new Float64Array(search.data.length);
  {
    let row = 0;
    for (const f of search.frames) {
      const r2 = f.input.readNoiseCounts ** 2;
      for (let u = 0; u < f.used.length; u++, row++) dataWeights[row] = f.pixelsPer / (Math.max(search.data[row], 1) * f.input.gainCountsPerElectron + r2);
    }
  }
  const setScaleBackground = (q: Float64Array): number => {
    const ev = evaluateModel(search.frames, layout, q, false, search.rim, 'exact', engine);
    let row = 0;
    let c2 = 0;
    for (let f = 0; f < search.frames.length; f++) {
      const n = search.frames[f].used.length;
      const [s, b] = solveScaleBackground(search.data, ev.intensity, dataWeights, row, row + n);
      q[nz + 4 * f + 2] = s;
      q[nz + 4 * f + 3] = b;
      for (let i = row; i < row + n; i++) c2 += dataWeights[i] * (search.data[i] - s * ev.intensity[i] - b) ** 2;
      row += n;
    }
    return c2;
  };
  const iDefocus = terms.indexOf(4);
  let best = Float64Array.from(p);
  let bestC2 = setScaleBackground(best);
  if (iDefocus >= 0) {
    // Defocus from −0.4 to 0.4 waves every 0.1, then halving towards the best point (±0.05, then ±0.025). The
    // χ² profile along defocus had a single minimum on a 0.025-wave grid in all 80 trials of the accuracy study
    // (test/bench/fit-accuracy.ts, shadow interior and whole shadow), and this finds the same grid point as
    // that grid in all of them, with 12 evaluations after the start's instead of 33.
    const tryDefocus = (c: number) => {
      const q = Float64Array.from(p);
      q[iDefocus] = c;
      const c2 = setScaleBackground(q);
      if (c2 < bestC2) {
        bestC2 = c2;
        best = q;
      }
    };
    // The start (defocus 0) is already evaluated; then every 0.1 waves, and halfway to the best point's
    // neighbours twice (0.05, then 0.025).
    const grid: number[] = [];
    for (let i = -4; i <= 4; i++) if (i !== 0 || p[iDefocus] !== 0) grid.push(Math.round(i * 100) / 1000);
    grid.forEach((c, gi) => {
      tryDefocus(c);
      step((0.16 * (gi + 1)) / grid.length, 'coarse search');
    });
    for (const half of [0.05, 0.025]) {
      const centre = best[iDefocus];
      for (const c of [centre - half, centre + half]) if (c >= -0.4 - 1e-9 && c <= 0.4 + 1e-9) tryDefocus(Math.round(c * 1000) / 1000);
    }
    step(0.2, 'coarse search');
  }

  // --- noise weights from the model, then LM; weights refreshed at the solution
  const refreshSigma = (pr: Problem, q: Float64Array, intensity?: Float64Array) => {
    const v = superPixelVariance(pr.frames, layout, q, intensity ?? evaluateModel(pr.frames, layout, q, false, pr.rim, 'exact', engine).intensity);
    for (let i = 0; i < v.length; i++) pr.sigma[i] = Math.sqrt(Math.max(v[i], 1e-12));
  };
  const maxIt = options.maxIterations ?? 60;
  let iterationsTotal = 0;
  // The fine stage's latest evaluation with a Jacobian (the polish starts from it).
  const keptFine: { value: KeptEvaluation | null } = { value: null };
  const runLM = (pr: Problem, start: Float64Array, from: number, span: number, seed: KeptEvaluation | null = null): LMResult => {
    const weighted = makeWeighted(pr, 'centre', seed);
    const res = levenbergMarquardt(weighted, start, {
      maxIterations: maxIt,
      // Steps below 1 % of σ change nothing that matters; the residuals are exact, the step Jacobian is not.
      stepTolerance: 0.01,
      chi2Tolerance: 1e-8,
      // The coarse stages only find the start: they stop within Δχ² = 2 of their own minimum (about 1.4σ in
      // the worst direction), and the fine stage moves on from there.
      chi2AbsoluteTolerance: pr === fine ? 0.01 : 2,
      // Derivatives cost about five times the values; on the final binning, starting close, the kept Jacobian
      // serves several steps (the coarse stages start far away).
      reuseJacobian: pr === fine,
      // The step Jacobian leaves out the third-order (coma) correction's derivatives, good to about 0.2σ near
      // the minimum: a rejected step smaller than that ends the fit instead of raising λ step by step.
      rejectedStepTolerance: 0.2,
      onIteration: (it) => {
        if (progress && progress(Math.min(from + (span * it) / 12, from + span), 'fitting') === false) return false;
        return true;
      },
    });
    iterationsTotal += res.iterations;
    if (res.termination === 'cancelled') throw cancelledError();
    if (pr === fine) keptFine.value = weighted.last && sameParams(weighted.last.p, res.params) ? weighted.last : null;
    return res;
  };
  refreshSigma(coarse, best);
  let sol = runLM(coarse, best, 0.2, 0.3);
  // Where the first order does not describe the frames (χ²/dof > 2, as at low Fresnel numbers or for strong
  // coma), the coarse stage goes on from its solution with the next-order term: otherwise the first order's own
  // error could set off the wider search below (whole-shadow trial 5 of the accuracy study: 33 iterations in
  // all without this, 15 with it).
  const coarseDof = Math.max(1, coarse.data.length - np);
  if (coarse.frames.some((f) => f.firstOrder) && sol.chi2 / coarseDof > 2) {
    coarse.frames.forEach((f) => (f.firstOrder = false));
    refreshSigma(coarse, sol.params);
    sol = runLM(coarse, sol.params, 0.3, 0.1);
  }

  // --- a poor first minimum: strong astigmatism splits the spot and can mislead the pattern locator and
  // the defocus search. Try a wider set of starts (centre offsets around the first start, astigmatism
  // of either sign), rank them cheaply on the search data, and refine the best few.
  if (sol.chi2 / coarseDof > 3) {
    const spotRadiusM = (2.405 * inputs[0].setup.camera.distanceM) / (((2 * Math.PI) / inputs[0].setup.wavelengthM) * inputs[0].setup.disc.radiusM);
    const i3 = terms.indexOf(3), i5 = terms.indexOf(5);
    const astigStarts: [number, number][] = [[0, 0]];
    if (i3 >= 0 || i5 >= 0) for (const v of [0.15, -0.15]) astigStarts.push([v, 0], [0, v], [v, v], [v, -v]);
    const candidates: { q: Float64Array; c2: number }[] = [];
    const offsets: [number, number][] = [[0, 0]];
    for (let k = 0; k < 8; k++) offsets.push([0.6 * spotRadiusM * Math.cos((k * Math.PI) / 4), 0.6 * spotRadiusM * Math.sin((k * Math.PI) / 4)]);
    // The centre of point symmetry of the first frame, as an offset from the first start (all frames move together).
    const f0 = inputs[0];
    const sym = symmetryCentrePx(f0.counts, f0.widthPx, f0.heightPx, f0.mask);
    if (sym) {
      const pitch = f0.setup.camera.pixelPitchM;
      const sx = (sym[0] - (f0.widthPx - 1) / 2) * pitch;
      const sy = -(sym[1] - (f0.heightPx - 1) / 2) * pitch;
      const ox = sx - p[nz], oy = sy - p[nz + 1];
      offsets.push([ox, oy]);
      for (let k = 0; k < 4; k++) offsets.push([ox + 0.3 * spotRadiusM * Math.cos((k * Math.PI) / 2), oy + 0.3 * spotRadiusM * Math.sin((k * Math.PI) / 2)]);
    }
    for (const [ox, oy] of offsets) {
      for (const [a3, a5] of astigStarts) {
        for (const c4 of iDefocus >= 0 ? [best[iDefocus] - 0.1, best[iDefocus], best[iDefocus] + 0.1] : [0]) {
          const q = Float64Array.from(p);
          for (let f = 0; f < inputs.length; f++) {
            q[nz + 4 * f] += ox;
            q[nz + 4 * f + 1] += oy;
          }
          if (i3 >= 0) q[i3] = a3;
          if (i5 >= 0) q[i5] = a5;
          if (iDefocus >= 0) q[iDefocus] = c4;
          candidates.push({ q, c2: setScaleBackground(q) });
        }
      }
      step(0.3, 'wider search');
    }
    candidates.sort((a, b) => a.c2 - b.c2);
    for (const cand of candidates.slice(0, 4)) {
      const trial = runLM(coarse, cand.q, 0.3, 0.1);
      if (trial.chi2 < sol.chi2) sol = trial;
      if (sol.chi2 / coarseDof < 2) break;
    }
  }

  // --- the sign-flipped even-m alternative, on the coarse stage
  const even = evenTermIndices(terms);
  let alternativeGap: number | null = null;
  if (even.length > 0) {
    const alt = Float64Array.from(sol.params);
    for (const i of even) alt[i] = -alt[i];
    // the disc's even orders are part of the same rim phase (physics notes §3)
    discOrders.forEach((n, i) => {
      if (n % 2 === 0) for (const q of [0, 1]) alt[shared.disc + 2 * i + q] = -alt[shared.disc + 2 * i + q];
    });
    const altStartC2 = chi2At(coarse, alt);
    // Only pursue it when it starts within reach of the current minimum.
    if (altStartC2 < sol.chi2 + 50 + 0.5 * sol.chi2) {
      const altSol = runLM(coarse, alt, 0.5, 0.2);
      alternativeGap = Math.abs(altSol.chi2 - sol.chi2);
      if (altSol.chi2 < sol.chi2) sol = altSol;
    } else alternativeGap = altStartC2 - sol.chi2;
  }

  // --- fine stage, with the reference-model polish where the fast model's edge error matters
  const problem = fine;
  const frames = fine.frames;
  const data = fine.data;
  const rim = fine.rim;
  // When the coarse solution already describes the frames, the polish's first correction is computed there and
  // the fine stage runs once, with it in place. The correction changes with p only through the fast model's
  // small error (a second round moves the coefficients by about 1 % of the first move), so computing it a few σ
  // from the solution costs nothing in accuracy, and a whole fast-model fit on the fine data is saved. A frame
  // the coarse stage does not describe gets the fast-model fit first. (With the noise unknown, χ²/dof says
  // nothing before the noise is estimated, which then happens after the polish, from its residuals.)
  const coarseChi2PerDof = sol.chi2 / coarseDof;
  const polishEarly = (options.estimateNoise || coarseChi2PerDof <= 2) && polishFor(sol.params).some(Boolean);
  let noiseNote: string | null = null;
  const estimateNoise = () => {
    const est = estimateNoiseModel(fine, sol.params, keptFine.value && sameParams(keptFine.value.p, sol.params) ? keptFine.value.intensity : undefined);
    if (!est) return false;
    for (const f of inputs) {
      f.gainCountsPerElectron = est.gain;
      f.readNoiseCounts = est.readNoise;
    }
    noiseNote = `the camera noise was estimated from the fit residuals (gain ${est.gain.toPrecision(3)} counts per electron, read noise ${est.readNoise.toPrecision(3)} counts): χ²/dof is ≈ 1 by construction; give --gain and --read-noise, or dark frames, for an independent check`;
    return true;
  };
  if (!polishEarly) {
    refreshSigma(fine, sol.params);
    sol = runLM(fine, sol.params, 0.7, 0.1);
    if (options.estimateNoise) estimateNoise();
    // The weights are refreshed at the solution and the fit repeated; the polish does both itself, so this
    // round is left to it when the noise model did not change.
    if (options.estimateNoise || !polishFor(sol.params).some(Boolean)) {
      refreshSigma(fine, sol.params);
      sol = runLM(fine, sol.params, 0.8, 0.05);
    }
  }
  const polishWhich = polishFor(sol.params);
  let polishNote: string | null = null;
  let polishUnsettled: string | null = null;
  // A fit that does not describe the frame (wrong setup, wrong minimum) gains nothing from the polish. (With
  // the noise estimated from the residuals χ²/dof cannot tell.)
  const chi2BeforePolish = polishEarly ? coarseChi2PerDof : sol.chi2 / Math.max(1, fine.data.length - np);
  if (polishWhich.some(Boolean) && !options.estimateNoise && chi2BeforePolish > 2) {
    polishNote = `reference-model polish not run: χ²/dof = ${chi2BeforePolish.toFixed(2)} before it, so the model does not describe the frame`;
  } else if (polishWhich.some(Boolean)) {
    let rounds = 0;
    let lastShift = NaN;
    // The polished frames are modelled by the fast model's first order plus the correction, which includes the
    // next-order term: the analytic Jacobian is then that of the model fitted. (The next-order term's
    // derivatives are not computed; where it is large, a fit that keeps it stops where the first-order
    // Jacobian says it should, which can be several σ from the minimum.) The kept evaluation was of the other model.
    fine.frames.forEach((fr, i) => (fr.firstOrder = polishWhich[i]));
    keptFine.value = null;
    try {
      for (rounds = 1; rounds <= 3; rounds++) {
        step(0.85, 'reference-model check');
        const before = sol.params;
        // The model at `before` with its Jacobian: kept from the fit that ended there, or evaluated now. Its
        // intensity (less the correction in place) is the fast model's that the correction is measured from.
        const last = keptFine.value as KeptEvaluation | null; // (set by runLM, which the compiler does not follow)
        let kept: KeptEvaluation | null = last && sameParams(last.p, before) ? last : null;
        // The reference intensities are started first: an engine with helper threads computes them there
        // while this thread evaluates the model and its Jacobian at `before` (neither needs the other).
        const pendingCorrections = startReferenceCorrections(fine.frames, layout, before, fine.rim, polishWhich, {
          onProgress: (g) => {
            if (progress && progress(0.85 + 0.03 * g, 'reference-model check') === false) return false;
          },
          engine,
        });
        if (!kept) {
          const ev = evaluateModel(fine.frames, layout, before, true, fine.rim, 'centre', engine);
          kept = { p: Float64Array.from(before), intensity: ev.intensity, jacobian: ev.jacobian!, mode: 'centre' };
        }
        const fastIntensities: Float64Array[] = [];
        {
          let row = 0;
          for (const fr of fine.frames) {
            const v = kept.intensity.slice(row, row + fr.used.length);
            if (fr.correction) for (let u = 0; u < v.length; u++) v[u] -= fr.correction[u];
            fastIntensities.push(v);
            row += fr.used.length;
          }
        }
        const corr = pendingCorrections.finish(fastIntensities);
        // At `before` the corrected intensity is the fast one plus the new correction, and the kept Jacobian
        // serves (the correction is constant in p; seededEvaluation): the weights and the first step need no
        // new evaluation.
        const intensity = new Float64Array(kept.intensity.length);
        {
          let row = 0;
          fine.frames.forEach((fr, i) => {
            for (let u = 0; u < fr.used.length; u++, row++) intensity[row] = fastIntensities[i][u] + (corr[i]?.[u] ?? 0);
          });
        }
        const seed: KeptEvaluation = { ...kept, intensity };
        fine.frames.forEach((fr, i) => (fr.correction = corr[i]));
        refreshSigma(fine, before, intensity);
        sol = runLM(fine, before, 0.88, 0.02, seed);
        // Another round only when the coefficients moved by more than 5σ (σ from this solution's normal
        // matrix): the correction changes with p only through the fast model's small error, so a second round
        // moves them by about 1 % of the first move (measured: ≤ 0.03σ after first moves of 1–5σ).
        const covP = invertSPD(sol.normalMatrix, np);
        lastShift = 0;
        for (let k = 0; k < nz; k++) {
          const s = covP ? Math.sqrt(Math.max(covP[k * np + k], 1e-300)) : NaN;
          lastShift = Math.max(lastShift, Math.abs(sol.params[k] - before[k]) / s);
        }
        if (!(lastShift > 5)) break;
      }
      polishNote = `reference-model polish: ${Math.min(rounds, 3)} round(s), last coefficient change ${Number.isFinite(lastShift) ? lastShift.toFixed(2) : 'n/a'}σ${polishEarly ? ' (the first correction at the coarse solution)' : ''}`;
      // A later round that still moves the coefficients by more than half a σ has not settled: the fast
      // model's derivatives are then far from the reference model's (seen at Fresnel numbers near 1).
      if (rounds > 1 && lastShift > 0.5) {
        const fresnel = Math.min(...inputs.map((f) => f.setup.disc.radiusM ** 2 / (f.setup.wavelengthM * f.setup.camera.distanceM)));
        polishUnsettled =
          `the reference-model polish had not settled: its last round still moved a coefficient by ${lastShift.toFixed(2)}σ ` +
          `(Fresnel number a²/(λL) = ${fresnel.toFixed(2)}; the fast model is least accurate near 1): the coefficients may be off by more than their σ`;
      }
    } catch (err) {
      if ((err as Error).name === 'CancelledError') throw err;
      // Without the polish, the fit is the fast model's (on the fine data, which an early polish has not fitted yet).
      fine.frames.forEach((fr) => {
        fr.correction = null;
        fr.firstOrder = false;
      });
      refreshSigma(fine, sol.params);
      sol = runLM(fine, sol.params, 0.88, 0.02);
      polishNote = `the reference-model polish was skipped (${(err as Error).message}); near the shadow edge the uncertainties may be optimistic`;
    }
  }
  if (polishEarly && options.estimateNoise && estimateNoise()) {
    // The weights under the estimated noise, and the fit repeated from the solution (its kept evaluation serves
    // the weights and the first step).
    const kept = keptFine.value && sameParams(keptFine.value.p, sol.params) ? keptFine.value : null;
    refreshSigma(fine, sol.params, kept?.intensity);
    sol = runLM(fine, sol.params, 0.89, 0.01, kept);
  }
  step(0.9, 'uncertainties');
  // A blurred frame's steps used centre-sampled derivatives; the covariance takes the pixel-integrated ones.
  // Unblurred frames already have them: the fit ends with a Jacobian evaluated afresh at the solution.
  if (layout.freeSourceSize || inputs.some((f) => sourceBlurDiameterM(f.setup) > 0)) {
    const { r, J } = makeWeighted(problem, 'exact').evaluate(sol.params, true);
    sol = { ...sol, normalMatrix: normalEquations(J!, r, np).A };
  }

  // --- statistics
  const m = data.length + priors.length;
  const dof = Math.max(1, m - np);
  const chi2PerDof = sol.chi2 / dof;
  const cov = invertSPD(sol.normalMatrix, np);
  const scaleCov = Math.max(1, chi2PerDof);
  // A calibrated disc profile's own uncertainty adds to the coefficients' (./disc/propagate.ts).
  const profileCov = profile && cov ? profileCovariance(problem.frames, layout, sol.params, rim, problem.sigma, cov, profile) : null;
  if (cov && profileCov) for (let k = 0; k < cov.length; k++) cov[k] += profileCov[k] / scaleCov;
  const sigmaOf = (k: number) => (cov ? Math.sqrt(Math.max(cov[k * np + k], 0) * scaleCov) : NaN);
  const names = parameterNames(layout);
  void names;
  const lambda = inputs[0].setup.wavelengthM;
  const rho = inputs[0].setup.zernikeRadiusM;
  const coeffs = terms.map((j, k) => ({ j, value: sol.params[k] }));
  const termRows = terms.map((j, k) => ({
    j,
    name: zernikeName(j),
    waves: sol.params[k],
    sigmaWaves: sigmaOf(k),
    nm: sol.params[k] * lambda * 1e9,
    sigmaNm: sigmaOf(k) * lambda * 1e9,
  }));
  const correlation = terms.map((_, a) =>
    terms.map((__, b) => {
      if (!cov) return NaN;
      const d = Math.sqrt(cov[a * np + a] * cov[b * np + b]);
      return d > 0 ? cov[a * np + b] / d : NaN;
    }),
  );
  // RMS without piston and tilt (orthonormal terms: root of the sum of squares), Strehl by Maréchal.
  let rms2 = 0;
  for (const c of coeffs) rms2 += c.value * c.value;
  const rms = Math.sqrt(rms2);
  let varRms = 0;
  if (cov && rms > 0) {
    for (let a = 0; a < nz; a++) for (let b = 0; b < nz; b++) varRms += ((coeffs[a].value * coeffs[b].value) / rms2) * cov[a * np + b] * scaleCov;
  }
  const sigmaRms = Math.sqrt(varRms);
  const strehl = Math.exp(-((2 * Math.PI * rms) ** 2));
  const sigmaStrehl = strehl * 2 * (2 * Math.PI) ** 2 * rms * sigmaRms;
  const pv = peakToValley(coeffs, { excludePistonTilt: true });
  const c4 = iDefocus >= 0 ? sol.params[iDefocus] : 0;
  // W = c4·λ·√3(2ρ²−1): the quadratic part λ·c4·2√3·r²/ρz² equals r²/(2R) → R = ρz²/(4√3·λ·c4).
  const residualCurvatureRadius_m = iDefocus >= 0 && c4 !== 0 ? (rho * rho) / (4 * Math.sqrt(3) * lambda * c4) : null;

  // --- warnings
  const byM = new Map<number, number[]>();
  for (const j of terms) {
    const { m: mm } = ansiToNM(j);
    byM.set(mm, [...(byM.get(mm) ?? []), j]);
  }
  for (const [mm, js] of byM) {
    if (js.length > 1) {
      warnings.push(
        `terms ${js.map((j) => `j=${j} (${zernikeName(j)})`).join(' and ')} share the azimuthal order m = ${mm}: the rim sees them almost alike, so their coefficients are strongly correlated and depend on the set of terms fitted`,
      );
    }
  }
  if (layout.freeDistance) {
    const iL = nz + 4 * inputs.length;
    const corr = cov && iDefocus >= 0 ? cov[iDefocus * np + iL] / Math.sqrt(cov[iDefocus * np + iDefocus] * cov[iL * np + iL]) : NaN;
    const distances = new Set(inputs.map((f) => f.setup.camera.distanceM));
    warnings.push(
      `the camera distance was freed: defocus and distance trade against each other (correlation ${Number.isFinite(corr) ? corr.toFixed(3) : 'n/a'})${distances.size < 2 ? '; frames at two distances a known step apart separate them' : ''}`,
    );
  }
  if (chi2PerDof > 1.5) {
    warnings.push(
      `the noise model does not explain the residuals (χ²/dof = ${chi2PerDof.toFixed(2)}): the uncertainties were scaled up by √(χ²/dof) = ${Math.sqrt(chi2PerDof).toFixed(2)}`,
    );
  }
  if (alternativeGap !== null && alternativeGap < 9) {
    warnings.push(
      `the sign of the even terms (defocus, astigmatism) is poorly determined: flipping it changes χ² by only ${alternativeGap.toFixed(1)}; a frame that holds the shadow edge settles it`,
    );
  }
  if (noiseNote) warnings.push(noiseNote);
  if (polishNote && polishNote.startsWith('the reference')) warnings.push(polishNote);
  if (polishUnsettled) warnings.push(polishUnsettled);
  // Residual structure: normalised residuals grouped in rings and sectors around the fitted centre.
  const structure = residualStructure(problem, sol.params, keptFine.value && sameParams(keptFine.value.p, sol.params) ? keptFine.value.intensity : undefined);
  let trusted = true;
  if (structure.excess > 5 && chi2PerDof > 1.3) {
    trusted = false;
    warnings.push(
      `the residuals are structured (ring/sector statistic ${structure.statistic.toFixed(0)} for ${structure.groups} groups): the fit may have stopped in a wrong local minimum — do not use these coefficients`,
    );
  }
  const ringsOnly = inputs.every((f, i) => {
    const shadowRadiusPx = (f.setup.disc.radiusM * f.setup.camera.distanceM) / effectiveDistanceM(f.setup.camera.distanceM, f.setup.beam.curvatureRadiusM) / f.setup.camera.pixelPitchM;
    return frames[i].input.regionRadiusPx < 0.95 * shadowRadiusPx;
  });
  if (ringsOnly) warnings.push('the region holds only the inside of the shadow: defocus and coma are weakly determined without the shadow edge');
  // --- the disc's shape: fitted (and told apart from the beam, or not), calibrated, or neither
  let discShape: DiscShapeResult | undefined;
  if (discOrders.length) {
    const summary = summariseDiscShape(layout, sol.params, cov ? Float64Array.from(cov, (v) => v * scaleCov) : null, inputs, trusted);
    discShape = summary.shape;
    warnings.push(...summary.warnings);
  }
  const shapeKnown = !!profile || (!!discShape && discOrders.includes(2) && !discShape.degenerate);
  if (!options.discCalibrated && !shapeKnown && !discShape?.degenerate) {
    warnings.push('the disc shape is not calibrated: astigmatism may include disc ellipticity (measure with the disc turned by 90° to separate them)');
  }
  const sourceSizeM = shared.source >= 0 ? Math.abs(sol.params[shared.source]) : inputs[0].setup.source.sizeM;
  const source = {
    sizeM: sourceSizeM,
    sigmaSizeM: shared.source >= 0 ? sigmaOf(shared.source) : null,
    fitted: shared.source >= 0,
    blurM: inputs.map((f) => sourceBlurDiameterM(f.setup, shared.source >= 0 ? sourceSizeM : f.setup.source.sizeM)),
  };

  const termination: Termination = sol.termination;
  const centers: [number, number][] = inputs.map((_, f) => [sol.params[nz + 4 * f], sol.params[nz + 4 * f + 1]]);
  step(1, 'done');
  return {
    format: RESULT_FORMAT,
    software: options.software ?? 'shadowfront',
    wavelength_m: lambda,
    zernike: { radius_m: rho, basis: 'ANSI Z80.28 / ISO 24157 Zernike polynomials, unit RMS over the normalisation radius', terms: termRows, correlation },
    rmsWaves: rms,
    sigmaRmsWaves: sigmaRms,
    pvWaves: pv,
    strehl,
    sigmaStrehl,
    residualCurvatureRadius_m,
    center_m: centers[0],
    centers_m: centers,
    chi2PerDof,
    dof,
    termination,
    iterations: iterationsTotal,
    elapsedMs: Date.now() - t0,
    regions: frames.map((f, i) => {
      const pitch = f.input.setup.camera.pixelPitchM;
      return {
        centerPx: [(f.input.widthPx - 1) / 2 + centers[i][0] / pitch, (f.input.heightPx - 1) / 2 - centers[i][1] / pitch] as [number, number],
        radiusPx: f.input.regionRadiusPx,
        binning: f.binning,
      };
    }),
    settings: {
      terms,
      binning,
      coarseBinning,
      searchBinning,
      freeDistance: layout.freeDistance,
      freeDiscRadius: layout.freeDiscRadius,
      rimSamples: rim,
      referencePolish: polishNote,
      ...(layout.freeDistance
        ? { distanceOffsetM: sol.params[nz + 4 * inputs.length], sigmaDistanceOffsetM: sigmaOf(nz + 4 * inputs.length) }
        : {}),
      ...(layout.freeDiscRadius
        ? { discRadiusOffsetM: sol.params[shared.da], sigmaDiscRadiusOffsetM: sigmaOf(shared.da) }
        : {}),
      ...(discOrders.length ? { discOrders } : {}),
      ...(profile ? { discProfileUncertaintyIncluded: !!profileCov } : {}),
      ...(inputs.some((f) => f.discRotationRad) ? { discRotationsRad: inputs.map((f) => f.discRotationRad ?? 0) } : {}),
      ...(known.length ? { knownAberrations: known } : {}),
      ...(layout.freeSourceSize ? { freeSourceSize: true } : {}),
      noiseModel: inputs.map((f) => ({ readNoiseCounts: f.readNoiseCounts, gainCountsPerElectron: f.gainCountsPerElectron, frames: f.frameCount, darks: f.darkCount })),
    },
    warnings,
    trusted,
    disc: profile ? { id: profile.id, name: profile.name, calibratedAt: profile.calibratedAt } : null,
    ...(discShape ? { discShape } : {}),
    ...(source.sizeM > 0 || source.fitted ? { source } : {}),
  };
}

/**
 * Fit the noise model var = (gain·S + read²)/(pixels per super-pixel · frames) to the squared residuals
 * by weighted linear regression (S = model signal above background), iterated twice for the weights.
 */
function estimateNoiseModel(pr: Problem, p: Float64Array, intensity?: Float64Array): { gain: number; readNoise: number } | null {
  const ev = intensity ? { intensity, model: modelFromIntensity(pr, p, intensity) } : evaluateModel(pr.frames, pr.layout, p, false, pr.rim, 'exact', pr.engine);
  const nz = pr.layout.terms.length;
  const xs: number[] = [];
  const ys: number[] = [];
  let row = 0;
  for (let f = 0; f < pr.frames.length; f++) {
    const fr = pr.frames[f];
    const scale = p[nz + 4 * f + 2];
    const k = fr.pixelsPer * fr.input.frameCount;
    for (let u = 0; u < fr.used.length; u++, row++) {
      xs.push(Math.max(scale * ev.intensity[row], 0));
      ys.push((pr.data[row] - ev.model[row]) ** 2 * k);
    }
  }
  let g = 1, r2 = 9;
  for (let it = 0; it < 3; it++) {
    let sw = 0, sx = 0, sxx = 0, sy = 0, sxy = 0;
    for (let i = 0; i < xs.length; i++) {
      const v = g * xs[i] + r2;
      const w = 1 / (v * v);
      sw += w;
      sx += w * xs[i];
      sxx += w * xs[i] * xs[i];
      sy += w * ys[i];
      sxy += w * xs[i] * ys[i];
    }
    const det = sw * sxx - sx * sx;
    if (!(det > 0)) return null;
    const gNew = (sw * sxy - sx * sy) / det;
    const rNew = (sxx * sy - sx * sxy) / det;
    g = Math.max(gNew, 1e-3);
    r2 = Math.max(rNew, 0.25);
  }
  return Number.isFinite(g) && Number.isFinite(r2) ? { gain: g, readNoise: Math.sqrt(r2) } : null;
}

/** χ²-like statistic of residual means over rings × 8 sectors; excess in standard deviations above its expectation. */
function residualStructure(pr: Problem, p: Float64Array, intensity?: Float64Array): { statistic: number; groups: number; excess: number } {
  const model = intensity ? modelFromIntensity(pr, p, intensity) : evaluateModel(pr.frames, pr.layout, p, false, pr.rim, 'exact', pr.engine).model;
  const nz = pr.layout.terms.length;
  const sums = new Map<string, { s: number; n: number }>();
  let row = 0;
  for (let f = 0; f < pr.frames.length; f++) {
    const fr = pr.frames[f];
    const inp = fr.input;
    const pitch = inp.setup.camera.pixelPitchM;
    const cx = p[nz + 4 * f], cy = p[nz + 4 * f + 1];
    const ring = ringPeriodM(inp.setup) / 2;
    for (let u = 0; u < fr.used.length; u++, row++) {
      const cell = fr.used[u];
      const bx = cell % fr.nbx;
      const by = (cell - bx) / fr.nbx;
      const x = (bx * fr.binning + (fr.binning - 1) / 2 - (inp.widthPx - 1) / 2) * pitch - cx;
      const y = -(by * fr.binning + (fr.binning - 1) / 2 - (inp.heightPx - 1) / 2) * pitch - cy;
      const ri = Math.floor(Math.hypot(x, y) / ring);
      const si = Math.floor(((Math.atan2(y, x) + Math.PI) / (2 * Math.PI)) * 8) % 8;
      const key = `${f}:${ri}:${si}`;
      const e = sums.get(key) ?? { s: 0, n: 0 };
      e.s += (pr.data[row] - model[row]) / pr.sigma[row];
      e.n++;
      sums.set(key, e);
    }
  }
  let stat = 0;
  let groups = 0;
  for (const { s, n } of sums.values()) {
    if (n < 4) continue;
    stat += (s * s) / n;
    groups++;
  }
  const excess = groups > 0 ? (stat - groups) / Math.sqrt(2 * groups) : 0;
  return { statistic: stat, groups, excess };
}

export type { FitFrameInput };
