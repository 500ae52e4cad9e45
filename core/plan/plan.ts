/**
 * The bench planner: for every candidate disc and camera distance of a plan, the analytic figures
 * (./figures.ts), the predicted 1σ of each Zernike coefficient from the Fisher information of the fast
 * model with the camera noise model (the Cramér–Rao bound, core/fit/crb.ts; Kay 1993, §3), and the
 * defocus–distance correlation; then a ranking by a stated rule. Pure.
 *
 * What the bound assumes (README.md): the pattern centred on the sensor; the region the fit would analyse
 * (core/frames/region.ts: the shadow plus its first four edge fringes, or the largest circle on the
 * sensor); the exposure set so that the brightest pixel on the sensor reaches camera.peakCounts; shot noise
 * (gain·signal) plus read noise; the fit's free parameters (the plan's terms, the pattern centre, an
 * intensity scale and a background); an ideal, round disc and a point source (edge roughness and source
 * size enter the figures and the warnings, not the bound).
 */
import { cramerRaoBound } from '../fit/crb.ts';
import { autoBinning } from '../fit/fitShadow.ts';
import type { FitFrameInput, ModelLayout } from '../fit/frameModel.ts';
import { invertSPD } from '../fit/levenbergMarquardt.ts';
import { expectedPattern } from '../frames/locate.ts';
import { EDGE_MARGIN_V } from '../frames/region.ts';
import { fastIntensity } from '../optics/fast/rimModel.ts';
import { rayCheck } from '../optics/fast/rayCheck.ts';
import type { BenchSetup } from '../setup/types.ts';
import { zernikeName } from '../zernike/index.ts';
import { benchFigures } from './figures.ts';
import { radialFisher, radialIntensity } from './symmetricFisher.ts';
import {
  PLAN_REPORT_FORMAT,
  type BenchPlan,
  type BoundSettings,
  type CandidateReport,
  type PlanCandidate,
  type PlanReport,
  type PredictedSigma,
} from './types.ts';

/** Smallest usable spot: its first dark ring should span at least this many pixels (common practice, no published source). */
export const MIN_SPOT_PX = 3;
/** Warn when the source blur S·L/G exceeds this fraction of the spot diameter (common practice, no published source). */
export const BLUR_WARN_FRACTION = 0.25;
/** Warn when |correlation(defocus, distance)| exceeds this (our choice: the two are then hard to tell apart in one frame). */
export const DEGENERATE_CORRELATION = 0.99;
/**
 * Most super-pixels the bound evaluates per candidate (our choice, for speed). When the fit's own binning
 * would give more, the bound uses coarser super-pixels, which can only lose information: the predicted σ
 * is then an upper bound on what the fit's binning would give (test/bench/plan-study.ts measures the gap).
 */
export const MAX_BOUND_SUPERPIXELS = 3000;

export const RANKING_RULE =
  'candidates are ranked by the larger of the predicted 1σ of astigmatism (j = 3, 5) and coma (j = 7, 8) among the fitted terms ' +
  '(all fitted terms when none of these is fitted), smallest first; candidates whose spot spans fewer than 3 px, whose source blur ' +
  'is as large as the spot, whose edge roughness exceeds the rim tolerance (10 % of Δr), or whose bound cannot be computed are not ranked';

export interface PlanOptions {
  /** Progress 0..1; return false to cancel (throws an Error named 'CancelledError'). */
  onProgress?: (fraction: number) => boolean | void;
}

function cancelled(): Error {
  const e = new Error('plan cancelled');
  e.name = 'CancelledError';
  return e;
}

/** Every candidate of a plan: discs outer, distances inner, in the order written. */
export function planCandidates(plan: BenchPlan): PlanCandidate[] {
  return plan.discDiametersM.flatMap((d) => plan.cameraDistancesM.map((L) => ({ discDiameterM: d, cameraDistanceM: L })));
}

/** The bench setup of one candidate (ideal round disc, beam centred on it). */
export function candidateSetup(plan: BenchPlan, candidate: PlanCandidate): BenchSetup {
  const full = 2 ** plan.camera.bitDepth - 1;
  return {
    wavelengthM: plan.wavelengthM,
    beam: { radiusM: plan.beamRadiusM, centerM: [0, 0], curvatureRadiusM: plan.curvatureRadiusM },
    disc: { radiusM: candidate.discDiameterM / 2, ellipticity: 0, ellipseAngleRad: 0, edgeHarmonics: [] },
    camera: {
      distanceM: candidate.cameraDistanceM,
      pixelPitchM: plan.camera.pixelPitchM,
      bitDepth: plan.camera.bitDepth,
      saturationCounts: full,
      orientation: { flipX: false, flipY: false, rotateDeg: 0 },
      sensorPx: [plan.camera.sensorPx[0], plan.camera.sensorPx[1]],
    },
    zernikeRadiusM: plan.zernikeRadiusM,
    source: { sizeM: plan.sourceSizeM },
  };
}

/** The circle the fit would analyse for a candidate, with the pattern centred on the sensor (core/frames/region.ts). */
export interface PlannedRegion {
  /** The frame around the region (at most the sensor), pixels; the pattern sits at its centre. */
  widthPx: number;
  heightPx: number;
  regionRadiusPx: number;
  holdsWholeShadow: boolean;
  /** The fit's own super-pixel size for this setup (core/fit/fitShadow.ts autoBinning). */
  fitBinning: number;
}

export function plannedRegion(plan: BenchPlan, setup: BenchSetup): PlannedRegion {
  const [W, H] = plan.camera.sensorPx;
  const expected = expectedPattern(setup);
  // chooseRegion with the located centre at the sensor's centre: room = half the smaller side.
  const room = Math.min(W, H) / 2;
  const wanted = expected.shadowRadiusPx + EDGE_MARGIN_V * expected.edgeFringeScalePx;
  const holdsWholeShadow = wanted <= room;
  const regionRadiusPx = holdsWholeShadow ? wanted : room;
  const side = (n: number) => Math.min(n, 2 * Math.ceil(regionRadiusPx) + 2);
  const widthPx = side(W);
  const heightPx = side(H);
  const fitBinning = autoBinning([fitInput(plan, setup, widthPx, heightPx, regionRadiusPx, new Float64Array(0))]);
  return { widthPx, heightPx, regionRadiusPx, holdsWholeShadow, fitBinning };
}

function fitInput(plan: BenchPlan, setup: BenchSetup, widthPx: number, heightPx: number, regionRadiusPx: number, counts: Float64Array): FitFrameInput {
  return {
    setup,
    counts,
    widthPx,
    heightPx,
    mask: null,
    frameCount: plan.camera.averagedFrames,
    darkCount: 0,
    readNoiseCounts: plan.camera.readNoiseCounts,
    gainCountsPerElectron: plan.camera.gainCountsPerElectron,
    regionCenterPx: [(widthPx - 1) / 2, (heightPx - 1) / 2],
    regionRadiusPx,
  };
}

/** Super-pixels of b×b whose centres lie in the region (as core/fit/frameModel.ts binFrame counts them). */
function superPixelCount(region: PlannedRegion, b: number): number {
  const nbx = Math.floor(region.widthPx / b);
  const nby = Math.floor(region.heightPx / b);
  const cx = (region.widthPx - 1) / 2;
  const cy = (region.heightPx - 1) / 2;
  const r2 = region.regionRadiusPx ** 2;
  let count = 0;
  for (let by = 0; by < nby; by++) {
    const dy = by * b + (b - 1) / 2 - cy;
    for (let bx = 0; bx < nbx; bx++) {
      const dx = bx * b + (b - 1) / 2 - cx;
      if (dx * dx + dy * dy <= r2) count++;
    }
  }
  return count;
}

/** The model layout and the working-point parameters for a plan (centre 0, background 0, distance offset 0). */
function layoutAndParams(plan: BenchPlan, countsPerUnitIntensity: number): { layout: ModelLayout; params: Float64Array } {
  const terms = plan.terms;
  const freeDistance = terms.includes(4);
  const layout: ModelLayout = { terms, nFrames: 1, freeDistance, freeDiscRadius: false };
  const params = new Float64Array(terms.length + 4 + (freeDistance ? 1 : 0));
  terms.forEach((j, k) => {
    params[k] = plan.aberrations.find((t) => t.j === j)?.waves ?? 0;
  });
  params[terms.length + 2] = countsPerUnitIntensity;
  return { layout, params };
}

/** True when the working point is an ideal beam (no aberrations): the pattern is round. */
export function symmetricWorkingPoint(plan: BenchPlan): boolean {
  return plan.aberrations.every((t) => t.waves === 0);
}

/** The frame the bound is computed on: the region the fit would analyse, with the pattern at its centre. */
export interface PlannedFrame {
  input: FitFrameInput;
  layout: ModelLayout;
  /** Parameters at the working point: coefficients, centre (0, 0), scale, background 0, and the distance offset 0 when freed. */
  params: Float64Array;
  bound: BoundSettings;
  warnings: string[];
}

/**
 * The fit input for a candidate as the fit would see it (region, binning, noise), with a noiseless
 * (zero) counts array, for the whole-frame bound (core/fit/crb.ts). Exported for the tests and the study,
 * which simulate and fit the same frame. The binning is the fit's, made coarser only when the region would
 * hold more than MAX_BOUND_SUPERPIXELS super-pixels.
 */
export function plannedFrame(plan: BenchPlan, setup: BenchSetup): PlannedFrame {
  const warnings: string[] = [];
  const pitch = setup.camera.pixelPitchM;
  const region = plannedRegion(plan, setup);
  const { widthPx, heightPx, regionRadiusPx, holdsWholeShadow, fitBinning } = region;
  // Exposure: the brightest pixel of the analysed region at peakCounts. The pattern is round at the working
  // point (nearly so with small aberrations), so cuts through its centre find the peak.
  const axis = (n: number) => Float64Array.from({ length: n }, (_, i) => (i - (n - 1) / 2) * pitch).filter((x) => Math.abs(x) <= regionRadiusPx * pitch);
  const cutX = fastIntensity(setup, plan.aberrations, axis(widthPx), Float64Array.of(0));
  const cutY = fastIntensity(setup, plan.aberrations, Float64Array.of(0), axis(heightPx));
  let peak = 0;
  for (const v of cutX) if (Number.isFinite(v) && v > peak) peak = v;
  for (const v of cutY) if (Number.isFinite(v) && v > peak) peak = v;
  if (!(peak > 0)) throw new RangeError('the expected pattern has no light in the analysed region');
  const countsPerUnitIntensity = plan.camera.peakCounts / peak;
  const input = fitInput(plan, setup, widthPx, heightPx, regionRadiusPx, new Float64Array(widthPx * heightPx));
  const areaPx = Math.PI * regionRadiusPx * regionRadiusPx;
  const binning = Math.max(fitBinning, Math.ceil(Math.sqrt(areaPx / MAX_BOUND_SUPERPIXELS) - 1e-9));
  const superPixels = superPixelCount(region, binning);
  const { layout, params } = layoutAndParams(plan, countsPerUnitIntensity);
  if (!symmetricWorkingPoint(plan)) {
    const half = [(widthPx / 2) * pitch, (heightPx / 2) * pitch];
    const check = rayCheck(setup, plan.aberrations, { xMinM: -half[0], xMaxM: half[0], yMinM: -half[1], yMaxM: half[1] });
    if (!check.ok) warnings.push(`the fast model may not hold for the working-point aberrations: ${check.message}`);
  }
  return {
    input,
    layout,
    params,
    bound: { method: 'frame', regionRadiusPx, holdsWholeShadow, fitBinning, binning, superPixels, countsPerUnitIntensity },
    warnings,
  };
}

/** Fisher matrix of a candidate (layout order) and how it was computed. */
export function candidateFisher(plan: BenchPlan, setup: BenchSetup): { fisher: Float64Array | null; layout: ModelLayout; bound: BoundSettings; warnings: string[] } {
  if (!symmetricWorkingPoint(plan)) {
    const planned = plannedFrame(plan, setup);
    const enough = planned.bound.superPixels >= 4 * planned.params.length;
    const fisher = enough ? cramerRaoBound([planned.input], planned.layout, planned.params, planned.bound.binning).fisher : null;
    return { fisher, layout: planned.layout, bound: planned.bound, warnings: planned.warnings };
  }
  // Round pattern: the same Fisher information from radial profiles (./symmetricFisher.ts), at the fit's binning.
  const pitch = setup.camera.pixelPitchM;
  const region = plannedRegion(plan, setup);
  const profile = radialIntensity(setup, region.regionRadiusPx * pitch);
  let peak = 0;
  for (const v of profile.intensity) if (Number.isFinite(v) && v > peak) peak = v;
  if (!(peak > 0)) throw new RangeError('the expected pattern has no light in the analysed region');
  const countsPerUnitIntensity = plan.camera.peakCounts / peak;
  const { layout, params } = layoutAndParams(plan, countsPerUnitIntensity);
  const superPixels = superPixelCount(region, region.fitBinning);
  const bound: BoundSettings = {
    method: 'radial',
    regionRadiusPx: region.regionRadiusPx,
    holdsWholeShadow: region.holdsWholeShadow,
    fitBinning: region.fitBinning,
    binning: region.fitBinning,
    superPixels,
    countsPerUnitIntensity,
  };
  const noise = {
    countsPerUnitIntensity,
    gainCountsPerElectron: plan.camera.gainCountsPerElectron,
    readNoiseCounts: plan.camera.readNoiseCounts,
    averagedFrames: plan.camera.averagedFrames,
  };
  const fisher = superPixels >= 4 * params.length ? radialFisher(setup, layout, region.regionRadiusPx * pitch, noise, { binningPx: region.fitBinning }) : null;
  return { fisher, layout, bound, warnings: [] };
}

/** Remove row and column `drop` from an n×n matrix. */
function withoutIndex(F: Float64Array, n: number, drop: number): Float64Array {
  const m = n - 1;
  const out = new Float64Array(m * m);
  for (let a = 0, ra = 0; a < n; a++) {
    if (a === drop) continue;
    for (let b = 0, rb = 0; b < n; b++) {
      if (b === drop) continue;
      out[ra * m + rb] = F[a * n + b];
      rb++;
    }
    ra++;
  }
  return out;
}

/** Predicted σ (distance known) and the defocus–distance figures, from one Fisher matrix with the distance freed. */
export function boundFromFisher(
  fisher: Float64Array,
  layout: ModelLayout,
): { sigma: number[] | null; defocusSigmaFreeDistance: number | null; correlation: number | null } {
  const terms = layout.terms;
  const n = terms.length + 4 * layout.nFrames + (layout.freeDistance ? 1 : 0);
  const known = layout.freeDistance ? withoutIndex(fisher, n, n - 1) : fisher;
  const nk = layout.freeDistance ? n - 1 : n;
  const inv = invertSPD(known, nk);
  const sigma = inv ? terms.map((_, k) => Math.sqrt(Math.max(inv[k * nk + k], 0))) : null;
  let defocusSigmaFreeDistance: number | null = null;
  let correlation: number | null = null;
  const k4 = terms.indexOf(4);
  if (layout.freeDistance && k4 >= 0) {
    const full = invertSPD(fisher, n);
    if (full) {
      const d = n - 1;
      const c = full[k4 * n + d] / Math.sqrt(full[k4 * n + k4] * full[d * n + d]);
      correlation = Number.isFinite(c) ? Math.min(1, Math.abs(c)) : null;
      defocusSigmaFreeDistance = Math.sqrt(Math.max(full[k4 * n + k4], 0));
    } else {
      correlation = 1;
    }
  }
  return { sigma, defocusSigmaFreeDistance, correlation };
}

/** "2 mm", "0.8 m": lengths for sentences, to three significant digits. */
export function formatLength(valueM: number, unit: 'mm' | 'm'): string {
  const v = unit === 'mm' ? valueM * 1e3 : valueM;
  return `${Number(v.toPrecision(3))} ${unit}`;
}

/** Waves to two significant digits: 0.0021, 0.012. */
export function formatWaves(w: number): string {
  if (!Number.isFinite(w)) return 'n/a';
  return String(Number(w.toPrecision(2)));
}

const ASTIGMATISM = [3, 5];
const COMA = [7, 8];

function largestOf(predicted: PredictedSigma[], js: number[]): number | null {
  const s = predicted.filter((p) => js.includes(p.j)).map((p) => p.sigmaWaves);
  return s.length ? Math.max(...s) : null;
}

/** The ranking score of a candidate (smaller is better), or null. */
export function rankingScore(predicted: PredictedSigma[]): number | null {
  if (predicted.length === 0) return null;
  const key = largestOf(predicted, [...ASTIGMATISM, ...COMA]);
  return key ?? Math.max(...predicted.map((p) => p.sigmaWaves));
}

function summary(c: CandidateReport): string {
  const name = `${formatLength(c.candidate.discDiameterM, 'mm')} disc at ${formatLength(c.candidate.cameraDistanceM, 'm')}`;
  const parts: string[] = [];
  const astig = largestOf(c.predicted, ASTIGMATISM);
  const coma = largestOf(c.predicted, COMA);
  if (astig !== null) parts.push(`astigmatism ${formatWaves(astig)} waves`);
  if (coma !== null) parts.push(`coma ${formatWaves(coma)} waves`);
  if (astig === null && coma === null) {
    for (const p of c.predicted) parts.push(`${p.name} ${formatWaves(p.sigmaWaves)} waves`);
  }
  parts.push(`the spot spans ${c.figures.spotDiameterPx.toFixed(0)} px`);
  return `${name}: ${parts.join(', ')}`;
}

/** Plan the bench: figures, predicted σ, warnings and a ranked recommendation for every candidate. */
export function planBench(plan: BenchPlan, options: PlanOptions = {}): PlanReport {
  const candidates = planCandidates(plan);
  const progress = options.onProgress;
  const step = (f: number) => {
    if (progress && progress(f) === false) throw cancelled();
  };
  const reports: CandidateReport[] = [];
  const exclusions: string[][] = [];
  for (let i = 0; i < candidates.length; i++) {
    step(i / candidates.length);
    const candidate = candidates[i];
    const setup = candidateSetup(plan, candidate);
    const figures = benchFigures(setup, { edgeRoughnessM: plan.edgeRoughnessM });
    const warnings: string[] = [];
    const excluded: string[] = [];
    if (figures.spotDiameterPx < MIN_SPOT_PX) {
      excluded.push(`the spot spans only ${figures.spotDiameterPx.toFixed(1)} px (fewer than ${MIN_SPOT_PX})`);
    }
    if (figures.sourceBlurPx >= figures.spotDiameterPx) {
      excluded.push(`the source blur (${figures.sourceBlurPx.toFixed(1)} px) is as large as the spot (${figures.spotDiameterPx.toFixed(1)} px)`);
    } else if (figures.sourceBlurPx > BLUR_WARN_FRACTION * figures.spotDiameterPx) {
      warnings.push(
        `the source blur S·L/G (${figures.sourceBlurPx.toFixed(1)} px) exceeds a quarter of the spot size (${figures.spotDiameterPx.toFixed(1)} px): the spot is smeared and the predicted σ is optimistic (common practice, no published source)`,
      );
    }
    if (figures.edgeRoughnessM > figures.rimToleranceM) {
      excluded.push(
        `the edge roughness (${(figures.edgeRoughnessM * 1e6).toPrecision(2)} µm) exceeds the rim tolerance (${(figures.rimToleranceM * 1e6).toPrecision(2)} µm, 10 % of Δr): the spot keeps only ${(100 * figures.roughnessIntensityRatio).toFixed(0)} % of its intensity`,
      );
    }
    if (figures.shadowFits === false) {
      warnings.push(
        `the shadow (${figures.shadowDiameterPx.toFixed(0)} px across) does not fit on the sensor (${figures.sensorMinSidePx} px): the fit sees only its inside, so defocus and coma are less well determined`,
      );
    }
    let predicted: PredictedSigma[] = [];
    let defocusSigmaFreeDistanceWaves: number | null = null;
    let defocusDistanceCorrelation: number | null = null;
    let bound: BoundSettings | null = null;
    // A spot this small leaves the fit nothing to work with: skip the bound.
    if (figures.spotDiameterPx >= MIN_SPOT_PX) {
      try {
        const result = candidateFisher(plan, setup);
        bound = result.bound;
        warnings.push(...result.warnings);
        if (result.fisher === null) {
          excluded.push(`only ${result.bound.superPixels} super-pixels in the region: too few for the fit`);
        } else {
          const b = boundFromFisher(result.fisher, result.layout);
          if (b.sigma && b.sigma.every((s) => Number.isFinite(s) && s > 0)) {
            predicted = plan.terms.map((j, k) => ({ j, name: zernikeName(j), sigmaWaves: b.sigma![k] }));
          } else {
            excluded.push('the Fisher information is singular: the terms cannot be told apart in this frame');
          }
          defocusSigmaFreeDistanceWaves = b.defocusSigmaFreeDistance;
          defocusDistanceCorrelation = b.correlation;
          if (b.correlation !== null && b.correlation > DEGENERATE_CORRELATION) {
            warnings.push(
              `defocus and the camera distance are nearly degenerate in one frame (|correlation| ${b.correlation.toFixed(3)}): measure the distance carefully, or take frames at two distances`,
            );
          }
        }
      } catch (err) {
        if ((err as Error).name === 'CancelledError') throw err;
        excluded.push(`the bound could not be computed (${(err as Error).message})`);
      }
    }
    reports.push({
      candidate,
      figures,
      predicted,
      defocusSigmaFreeDistanceWaves,
      defocusDistanceCorrelation,
      bound,
      usable: excluded.length === 0,
      warnings: [...excluded.map((e) => `not ranked: ${e}`), ...warnings],
      rank: null,
      reason: '',
    });
    exclusions.push(excluded);
  }

  // Ranking.
  const order = reports
    .map((r, i) => ({ i, score: r.usable ? rankingScore(r.predicted) : null }))
    .filter((x): x is { i: number; score: number } => x.score !== null)
    .sort((a, b) => a.score - b.score || a.i - b.i);
  order.forEach((o, k) => {
    reports[o.i].rank = k + 1;
  });
  reports.forEach((r, i) => {
    if (r.rank !== null) {
      r.reason = `${summary(r)} (rank ${r.rank} of ${order.length} by the larger of the astigmatism and coma σ)`;
    } else {
      const base = `${formatLength(r.candidate.discDiameterM, 'mm')} disc at ${formatLength(r.candidate.cameraDistanceM, 'm')}`;
      r.reason = `${base}: not ranked because ${exclusions[i].join('; ') || 'no predicted σ'}`;
    }
  });
  const warnings: string[] = [];
  const recommended = order.length ? order[0].i : null;
  let recommendation: string;
  if (recommended === null) {
    recommendation = 'No candidate is usable: see the reasons beside each candidate (a larger disc, a longer distance or smaller pixels make a larger spot).';
    warnings.push('no candidate is usable');
  } else {
    const best = reports[recommended];
    recommendation = `${summary(best)}; the smallest worst-case σ of astigmatism and coma among ${order.length} usable candidate${order.length === 1 ? '' : 's'}.`;
    if (best.warnings.length) warnings.push(`the recommended candidate has warnings: ${best.warnings.join('; ')}`);
  }
  if (plan.sourceSizeM > 0) warnings.push('the predicted σ assume a point source; a finite source blurs the spot and loosens them');
  step(1);
  return {
    format: PLAN_REPORT_FORMAT,
    wavelengthM: plan.wavelengthM,
    zernikeRadiusM: plan.zernikeRadiusM,
    terms: [...plan.terms],
    rankingRule: RANKING_RULE,
    candidates: reports,
    recommended,
    recommendation,
    warnings,
  };
}
