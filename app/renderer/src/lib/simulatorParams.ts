/**
 * Pure helpers of the simulator screen: the sliders (which Zernike terms, their ranges), the starting
 * values read from a setup, the request sent to the simulate job, and the size of the disc's
 * ellipticity at the rim against the rim tolerance of the 10 % rule.
 */
import type { SetupJson, SimulateRequest } from '../../../shared/contract.ts';
import { zernikeName } from '../../../../core/zernike/index.ts';

/** The aberrations offered as sliders: ANSI j = 3 … 8 and 12 (astigmatism, defocus, trefoil, coma, spherical). */
export const SIM_TERMS: readonly number[] = [3, 4, 5, 6, 7, 8, 12];

export interface SliderRange {
  min: number;
  max: number;
  step: number;
}

/** Waves (unit-RMS over the setup's Zernike radius). */
export const WAVES_RANGE: SliderRange = { min: -0.3, max: 0.3, step: 0.005 };
/**
 * Disc ellipticity e (a_major = a·(1 + e)). The setup format accepts |e| < 0.2; the slider stops at 0.05,
 * already several times the 10 % rim tolerance for usual benches (physics notes §2).
 */
export const ELLIPTICITY_RANGE: SliderRange = { min: 0, max: 0.05, step: 0.0005 };
/** Axis of the ellipse's major axis from +x, degrees; 0–180 covers every orientation. */
export const AXIS_RANGE: SliderRange = { min: 0, max: 180, step: 1 };

export type SimModel = 'fast' | 'reference';

export interface SimParams {
  /** ANSI j → waves, for every term in SIM_TERMS. */
  waves: Record<number, number>;
  ellipticity: number;
  axisDeg: number;
  model: SimModel;
}

export function termLabel(j: number): string {
  const name = zernikeName(j);
  return `${name.charAt(0).toUpperCase()}${name.slice(1)} (j = ${j})`;
}

function clamp(v: number, r: SliderRange): number {
  return Math.min(r.max, Math.max(r.min, v));
}

/** Round to the slider's step, so a value read from a file sits on a slider position. */
export function snap(v: number, r: SliderRange): number {
  const k = Math.round((clamp(v, r) - r.min) / r.step);
  return Number((r.min + k * r.step).toFixed(10));
}

/** All sliders at zero: a perfect beam and a round disc. */
export function zeroParams(model: SimModel = 'fast'): SimParams {
  return { waves: Object.fromEntries(SIM_TERMS.map((j) => [j, 0])), ellipticity: 0, axisDeg: 0, model };
}

/**
 * Starting values from a setup: its "aberrations" (a scene file has them: {"4": 0.08, …}) and its
 * disc's plain-number "ellipticity", when present and numbers; anything else starts at zero. The
 * ellipse angle starts at 0 (a setup gives it with a unit, which the simulate request does not need).
 */
export function paramsFromSetup(setup: SetupJson, model: SimModel = 'fast'): SimParams {
  const p = zeroParams(model);
  const ab = setup.aberrations;
  if (ab && typeof ab === 'object' && !Array.isArray(ab)) {
    for (const j of SIM_TERMS) {
      const v = (ab as Record<string, unknown>)[String(j)];
      if (typeof v === 'number' && Number.isFinite(v)) p.waves[j] = snap(v, WAVES_RANGE);
    }
  }
  const disc = setup.disc;
  if (disc && typeof disc === 'object' && !Array.isArray(disc)) {
    const e = (disc as Record<string, unknown>).ellipticity;
    if (typeof e === 'number' && Number.isFinite(e)) p.ellipticity = snap(Math.abs(e), ELLIPTICITY_RANGE);
  }
  return p;
}

/**
 * The simulate request: the setup without any disc imperfection of its own (the sliders set it), the
 * slider aberrations (zeros left out), and the frame size when a measured frame gives one.
 */
export function simulateRequest(setup: SetupJson, p: SimParams, size?: { widthPx: number; heightPx: number } | null): SimulateRequest {
  const aberrationsWaves: Record<string, number> = {};
  for (const j of SIM_TERMS) if (p.waves[j]) aberrationsWaves[String(j)] = p.waves[j];
  const req: SimulateRequest = {
    setup,
    aberrationsWaves,
    disc: { ellipticity: p.ellipticity, axisRad: (p.axisDeg * Math.PI) / 180 },
    model: p.model,
  };
  if (size) {
    req.widthPx = size.widthPx;
    req.heightPx = size.heightPx;
  }
  return req;
}

/**
 * RMS wavefront error of the slider aberrations, waves: √Σc_j² because unit-RMS Zernike terms are
 * orthonormal over the disc (ANSI Z80.28 normalisation); no piston or tilt is among the sliders.
 */
export function rmsWaves(p: SimParams): number {
  return Math.sqrt(SIM_TERMS.reduce((s, j) => s + (p.waves[j] ?? 0) ** 2, 0));
}

/** How far the elliptical rim departs from the round one: e·a, metres (a_major − a). */
export function rimDeviationM(radiusM: number, ellipticity: number): number {
  return Math.abs(ellipticity) * radiusM;
}

/**
 * Strehl ratio by the Maréchal approximation, exp(−(2π·σ)²) with σ the RMS wavefront error in waves
 * (physics notes §5; Born & Wolf). Good for small errors (σ ≲ λ/14, S ≳ 0.8); only a rough guide beyond.
 */
export function marechalStrehl(rmsWavesValue: number): number {
  return Math.exp(-((2 * Math.PI * rmsWavesValue) ** 2));
}
