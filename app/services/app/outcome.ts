/**
 * What the result screen shows besides the fit result: the measured counts, the model at the fitted
 * parameters and the normalised residual over the analysed region; the radial profile about the fitted
 * centre; the wavefront map; and the verdict against the asset's limits.
 *
 * The model is the fit's own forward model (core/fit/frameModel.ts: the fast model, pixel-area
 * integrated, with the camera noise model), evaluated at the fitted coefficients and centre; scale and
 * background are solved again by weighted linear least squares, as the fit does. Nothing here fits.
 */
import type { FitOutcome, ImagePlane, Verdict } from '../../shared/contract.ts';
import type { FitResult } from '../../../core/fit/result.ts';
import { binFrame, evaluateModel, rimSamplesFor, superPixelVariance, type FitFrameInput, type ModelLayout } from '../../../core/fit/frameModel.ts';
import { wavefrontGrid } from '../../../core/logbook/images.ts';
import type { PreparedFrameSet } from '../fitService.ts';

/** Largest side of the measured / model / residual images (super-pixels of b × b camera pixels above it). */
export const OUTCOME_MAX_SIDE_PX = 400;
/** Samples per side of the wavefront map. */
export const WAVEFRONT_MAP_PX = 128;

export interface AssetLimits {
  asset: string;
  limitRmsWaves: number | null;
  limitStrehl: number | null;
}

interface FitSettings {
  rimSamples?: unknown;
  noiseModel?: { readNoiseCounts?: number; gainCountsPerElectron?: number }[];
  distanceOffsetM?: number;
  discRadiusOffsetM?: number;
}

function fmt(v: number, digits: number): string {
  return Number.isFinite(v) ? v.toFixed(digits) : String(v);
}

/**
 * Pass / warn / fail. An untrusted fit fails. RMS against a ceiling and Strehl against a floor: pass when
 * the value is more than 1σ on the good side of the limit, warn within 1σ of it, fail beyond it by more
 * than 1σ. Null when there is nothing to judge (no limits, a trusted fit).
 */
export function verdictFor(result: FitResult, limits: AssetLimits | null): Verdict | null {
  const reasons: string[] = [];
  let level: Verdict['level'] = 'pass';
  const worst = (l: Verdict['level']) => {
    const order = { pass: 0, warn: 1, fail: 2 } as const;
    if (order[l] > order[level]) level = l;
  };
  if (!result.trusted) {
    worst('fail');
    reasons.push('The fit is not trustworthy: its residuals are structured, so it may have stopped in a wrong minimum. Do not use these numbers; check the setup and the region, or record a new frame.');
  }
  const hasLimits = !!limits && (limits.limitRmsWaves !== null || limits.limitStrehl !== null);
  if (limits && limits.limitRmsWaves !== null) {
    const L = limits.limitRmsWaves;
    const r = result.rmsWaves;
    const s = Number.isFinite(result.sigmaRmsWaves) ? result.sigmaRmsWaves : 0;
    const text = `RMS wavefront error ${fmt(r, 4)} ± ${fmt(s, 4)} waves`;
    if (r - s > L) {
      worst('fail');
      reasons.push(`${text} is above the limit of ${fmt(L, 4)} waves for "${limits.asset}".`);
    } else if (r + s >= L) {
      worst('warn');
      reasons.push(`${text} is within 1σ of the limit of ${fmt(L, 4)} waves for "${limits.asset}".`);
    } else {
      reasons.push(`${text} is below the limit of ${fmt(L, 4)} waves for "${limits.asset}".`);
    }
  }
  if (limits && limits.limitStrehl !== null) {
    const L = limits.limitStrehl;
    const v = result.strehl;
    const s = Number.isFinite(result.sigmaStrehl) ? result.sigmaStrehl : 0;
    const text = `Strehl ratio ${fmt(v, 3)} ± ${fmt(s, 3)}`;
    if (v + s < L) {
      worst('fail');
      reasons.push(`${text} is below the floor of ${fmt(L, 3)} for "${limits.asset}".`);
    } else if (v - s <= L) {
      worst('warn');
      reasons.push(`${text} is within 1σ of the floor of ${fmt(L, 3)} for "${limits.asset}".`);
    } else {
      reasons.push(`${text} is above the floor of ${fmt(L, 3)} for "${limits.asset}".`);
    }
  }
  if (!hasLimits && result.trusted) return null;
  return { level, reasons };
}

/** The wavefront map over the unit Zernike disc, waves, NaN outside (core/logbook/images.ts). */
export function wavefrontPlane(result: FitResult, size = WAVEFRONT_MAP_PX): ImagePlane {
  const g = wavefrontGrid(result, size);
  return { widthPx: size, heightPx: size, data: Float32Array.from(g.values), pixelM: (2 * result.zernike.radius_m) / size };
}

/** Weighted linear least squares for model = s·I + b. */
function scaleBackground(data: Float64Array, I: Float64Array, w: Float64Array): [number, number] {
  let sw = 0, sI = 0, sII = 0, sd = 0, sId = 0;
  for (let i = 0; i < data.length; i++) {
    sw += w[i];
    sI += w[i] * I[i];
    sII += w[i] * I[i] * I[i];
    sd += w[i] * data[i];
    sId += w[i] * I[i] * data[i];
  }
  const det = sw * sII - sI * sI;
  if (!(Math.abs(det) > 0)) return [sI > 0 ? sd / sI : 0, 0];
  return [(sw * sId - sI * sd) / det, (sII * sd - sI * sId) / det];
}

/** Measured, model and residual images and the radial profile, for the first frame set of a fit. */
export function outcomeImages(result: FitResult, set: PreparedFrameSet): Pick<FitOutcome, 'measured' | 'model' | 'residual' | 'profile'> {
  const { setup, prepared } = set;
  const pitch = setup.camera.pixelPitchM;
  const W = prepared.widthPx;
  const H = prepared.heightPx;
  const [rcx, rcy] = prepared.region.centerPx;
  const R = prepared.region.radiusPx;
  // The region's bounding box, cropped from the frame.
  const c0 = Math.max(0, Math.floor(rcx - R));
  const c1 = Math.min(W - 1, Math.ceil(rcx + R));
  const r0 = Math.max(0, Math.floor(rcy - R));
  const r1 = Math.min(H - 1, Math.ceil(rcy + R));
  const w = c1 - c0 + 1;
  const h = r1 - r0 + 1;
  const counts = new Float64Array(w * h);
  const mask = new Uint8Array(w * h);
  for (let r = 0; r < h; r++) {
    counts.set(prepared.counts.subarray((r + r0) * W + c0, (r + r0) * W + c0 + w), r * w);
    mask.set(prepared.mask.subarray((r + r0) * W + c0, (r + r0) * W + c0 + w), r * w);
  }
  const b = Math.max(1, Math.ceil(Math.max(w, h) / OUTCOME_MAX_SIDE_PX));
  const settings = (result.settings ?? {}) as FitSettings;
  const noise = settings.noiseModel?.[0];
  // A fitted source size replaces the setup's (the model blurs by S·L/G, as in the fit).
  const modelSetup = result.source?.fitted ? { ...setup, source: { sizeM: result.source.sizeM } } : setup;
  const input: FitFrameInput = {
    setup: modelSetup,
    counts,
    widthPx: w,
    heightPx: h,
    mask,
    frameCount: prepared.frameCount,
    darkCount: prepared.darkCount,
    readNoiseCounts: noise?.readNoiseCounts ?? Math.max(prepared.readNoiseCounts, 0.5),
    gainCountsPerElectron: noise?.gainCountsPerElectron ?? 1,
    regionCenterPx: [rcx - c0, rcy - r0],
    regionRadiusPx: R,
    ...(set.discRotationRad ? { discRotationRad: set.discRotationRad } : {}),
  };
  const binned = binFrame(input, b);
  const terms = result.zernike.terms.map((t) => t.j);
  const dL = Number.isFinite(settings.distanceOffsetM) ? settings.distanceOffsetM! : 0;
  const da = Number.isFinite(settings.discRadiusOffsetM) ? settings.discRadiusOffsetM! : 0;
  const layout: ModelLayout = { terms, nFrames: 1, freeDistance: dL !== 0, freeDiscRadius: da !== 0 };
  // The fitted centre, moved from the full frame's centre to the crop's centre.
  const [cx, cy] = result.centers_m[0] ?? result.center_m;
  const cxCrop = cx - (c0 + (w - 1) / 2 - (W - 1) / 2) * pitch;
  const cyCrop = cy + (r0 + (h - 1) / 2 - (H - 1) / 2) * pitch;
  const p = [...result.zernike.terms.map((t) => t.waves), cxCrop, cyCrop, 1, 0];
  if (layout.freeDistance) p.push(dL);
  if (layout.freeDiscRadius) p.push(da);
  const params = Float64Array.from(p);
  const fitted = Array.isArray(settings.rimSamples) && typeof settings.rimSamples[0] === 'number' ? (settings.rimSamples[0] as number) : 0;
  const rim = [Math.max(fitted, rimSamplesFor([binned], terms.map((j) => ({ j, waves: 0.3 })))[0])];
  const n = binned.used.length;
  const plane = (data: Float32Array): ImagePlane => ({ widthPx: binned.nbx, heightPx: binned.nby, data, pixelM: b * pitch });
  const measured = new Float32Array(binned.nbx * binned.nby).fill(NaN);
  const model = new Float32Array(binned.nbx * binned.nby).fill(NaN);
  const residual = new Float32Array(binned.nbx * binned.nby).fill(NaN);
  if (n === 0) return { measured: plane(measured), model: plane(model), residual: plane(residual), profile: { radiusM: [], measured: [], model: [] } };
  const I = evaluateModel([binned], layout, params, false, rim).intensity;
  // Scale and background: unweighted first, then weighted by the noise model at that solution.
  let [s, bg] = scaleBackground(binned.data, I, new Float64Array(n).fill(1));
  params[terms.length + 2] = s;
  let variance = superPixelVariance([binned], layout, params, I);
  const weights = Float64Array.from(variance, (v) => 1 / Math.max(v, 1e-12));
  [s, bg] = scaleBackground(binned.data, I, weights);
  params[terms.length + 2] = s;
  variance = superPixelVariance([binned], layout, params, I);
  // Radial profile about the fitted centre, in rings one super-pixel wide.
  const fcx = (w - 1) / 2 + cxCrop / pitch;
  const fcy = (h - 1) / 2 - cyCrop / pitch;
  const nBins = Math.max(1, Math.ceil((R + Math.hypot(fcx - (rcx - c0), fcy - (rcy - r0))) / b) + 1);
  const sumM = new Float64Array(nBins);
  const sumP = new Float64Array(nBins);
  const cnt = new Uint32Array(nBins);
  for (let u = 0; u < n; u++) {
    const cell = binned.used[u];
    const m = s * I[u] + bg;
    measured[cell] = binned.data[u];
    model[cell] = m;
    residual[cell] = (binned.data[u] - m) / Math.sqrt(Math.max(variance[u], 1e-12));
    const bx = cell % binned.nbx;
    const by = (cell - bx) / binned.nbx;
    const rPx = Math.hypot(bx * b + (b - 1) / 2 - fcx, by * b + (b - 1) / 2 - fcy);
    const k = Math.min(nBins - 1, Math.floor(rPx / b));
    sumM[k] += binned.data[u];
    sumP[k] += m;
    cnt[k]++;
  }
  const profile = { radiusM: [] as number[], measured: [] as number[], model: [] as number[] };
  for (let k = 0; k < nBins; k++) {
    if (!cnt[k]) continue;
    profile.radiusM.push((k + 0.5) * b * pitch);
    profile.measured.push(sumM[k] / cnt[k]);
    profile.model.push(sumP[k] / cnt[k]);
  }
  return { measured: plane(measured), model: plane(model), residual: plane(residual), profile };
}

/** The whole outcome of a fit job. */
export function fitOutcome(result: FitResult, set: PreparedFrameSet, limits: AssetLimits | null): FitOutcome {
  return { result, ...outcomeImages(result, set), wavefront: wavefrontPlane(result), verdict: verdictFor(result, limits) };
}
