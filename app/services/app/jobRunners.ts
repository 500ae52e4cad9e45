/**
 * The work of the two job kinds, as plain functions (the job worker calls them off the calling thread;
 * tests may call them directly). Progress goes to `onProgress`; returning false cancels (the fit and the
 * simulators then throw an Error named "CancelledError").
 */
import type { FitOutcome, FitRequest, SimulateOutcome, SimulateRequest } from '../../shared/contract.ts';
import type { BenchSetup, DiscSpec, EdgeHarmonic, Scene, ZernikeTerm } from '../../../core/setup/types.ts';
import { simulateIntensity } from '../../../core/optics/simulate.ts';
import type { AppliedDiscProfile } from '../../../core/fit/disc/profile.ts';
import { discWithShape } from '../../../core/fit/disc/shape.ts';
import { loadFramesFromBytes } from './prepareFromBytes.ts';
import { fitPreparedSets } from './fitSets.ts';
import { fitOutcome, type AssetLimits } from './outcome.ts';
import { AppProblem } from './problems.ts';

export type Progress = (fraction: number, stage: string) => boolean | void;

export interface FitJobPayload {
  request: FitRequest;
  /** request.setup, parsed. */
  setup: BenchSetup;
  limits: AssetLimits | null;
  /** The calibrated disc profile to apply (request.disc, read from the logbook by the service), or none. */
  discProfile?: AppliedDiscProfile | null;
  /** How far the disc is turned from its calibrated position, rad (request.discAngleDeg). */
  discRotationRad?: number;
}

export interface SimulateJobPayload {
  request: SimulateRequest;
  /** request.setup, parsed. */
  setup: BenchSetup;
}

export function runFitJob(payload: FitJobPayload, onProgress: Progress = () => true): FitOutcome {
  const req = payload.request;
  if (!req.frames?.length) throw new AppProblem('frame', 'No frame was given: open or drop at least one camera frame.', undefined, 'frames');
  if (onProgress(0, 'reading the frames') === false) throw cancelled();
  const setup = payload.setup;
  const prepared = loadFramesFromBytes(req.frames, req.darks ?? [], setup, req.region ?? null);
  if (onProgress(0.02, 'fitting') === false) throw cancelled();
  const profile = payload.discProfile ?? null;
  const rotation = payload.discRotationRad ?? 0;
  const set = { setup, prepared, ...(profile ? { discRotationRad: rotation } : {}) };
  const result = fitPreparedSets([set], {
    terms: req.terms,
    options: profile ? { discProfile: profile } : undefined,
    onProgress: (f, stage) => onProgress(0.02 + 0.93 * f, stage),
  });
  if (onProgress(0.96, 'model images') === false) throw cancelled();
  // The model images are drawn with the disc shape the fit applied (the calibrated profile, turned).
  const shown = profile ? { ...set, setup: { ...setup, disc: discWithShape(setup.disc, profile.terms, rotation) } } : set;
  const outcome = fitOutcome(result, shown, payload.limits);
  onProgress(1, 'done');
  return outcome;
}

function cancelled(): Error {
  const e = new Error('cancelled');
  e.name = 'CancelledError';
  return e;
}

/** Largest simulated frame side, px. */
export const SIMULATE_MAX_PX = 2048;
export const SIMULATE_DEFAULT_PX = 256;

/**
 * Edge roughness for the simulator: 12 edge harmonics of orders 8 to 143 (spaced by about 1.3×) with
 * fixed, evenly spread phases, each of amplitude δ·√(2/12), so that the RMS edge deviation is δ. A
 * stand-in for a rough rim in the training simulator, not a measured roughness spectrum.
 */
export function roughnessHarmonics(edgeRoughnessM: number): EdgeHarmonic[] {
  if (!(edgeRoughnessM > 0)) return [];
  const orders = [8, 10, 14, 18, 23, 30, 39, 50, 65, 85, 110, 143];
  const amplitude = edgeRoughnessM * Math.sqrt(2 / orders.length);
  const golden = 0.6180339887498949;
  return orders.map((order, i) => ({ order, amplitudeM: amplitude, phaseRad: 2 * Math.PI * ((i * golden) % 1) }));
}

export function runSimulateJob(payload: SimulateJobPayload, onProgress: Progress = () => true): SimulateOutcome {
  const { request: req, setup } = payload;
  const aberrations: ZernikeTerm[] = [];
  for (const [key, value] of Object.entries(req.aberrationsWaves ?? {})) {
    const j = Number(key);
    if (!/^(0|[1-9]\d*)$/.test(key) || j > 495) throw new AppProblem('invalid-input', `aberrations: "${key}" is not an ANSI index from 0 to 495.`, undefined, `aberrationsWaves.${key}`);
    if (typeof value !== 'number' || !Number.isFinite(value)) throw new AppProblem('invalid-input', `aberrations: term j = ${key} is ${String(value)}; expected a number of waves.`, undefined, `aberrationsWaves.${key}`);
    aberrations.push({ j, waves: value });
  }
  aberrations.sort((a, b) => a.j - b.j);
  const e = req.disc?.ellipticity ?? setup.disc.ellipticity;
  const axis = req.disc?.axisRad ?? setup.disc.ellipseAngleRad;
  const rough = req.disc?.edgeRoughnessM ?? 0;
  if (!Number.isFinite(e) || Math.abs(e) >= 0.2) throw new AppProblem('invalid-input', `disc ellipticity is ${e}; expected a number between −0.2 and 0.2.`, undefined, 'disc.ellipticity');
  if (!Number.isFinite(axis)) throw new AppProblem('invalid-input', `disc ellipse axis is ${axis}; expected an angle in radians.`, undefined, 'disc.axisRad');
  if (!Number.isFinite(rough) || rough < 0) throw new AppProblem('invalid-input', `disc edge roughness is ${rough} m; expected 0 or more.`, undefined, 'disc.edgeRoughnessM');
  const harmonics = [...setup.disc.edgeHarmonics, ...roughnessHarmonics(rough)];
  const disc: DiscSpec = { ...setup.disc, ellipticity: e, ellipseAngleRad: axis, edgeHarmonics: harmonics };
  const inner = disc.radiusM * (1 - Math.abs(e)) - harmonics.reduce((s, h) => s + Math.abs(h.amplitudeM), 0);
  if (!(inner > 0)) throw new AppProblem('invalid-input', `the disc edge would cross its centre: ellipticity ${e} and edge roughness ${(rough * 1e6).toFixed(1)} µm are too large for a disc of radius ${(disc.radiusM * 1e3).toFixed(3)} mm.`, undefined, 'disc.edgeRoughnessM');
  const size = (v: number | undefined, name: string) => {
    const n = v ?? SIMULATE_DEFAULT_PX;
    if (!Number.isInteger(n) || n < 8 || n > SIMULATE_MAX_PX) throw new AppProblem('invalid-input', `${name} is ${String(v)}; expected a whole number of pixels from 8 to ${SIMULATE_MAX_PX}.`, undefined, name);
    return n;
  };
  const widthPx = size(req.widthPx, 'widthPx');
  const heightPx = size(req.heightPx, 'heightPx');
  const model = req.model ?? 'fast';
  if (model !== 'fast' && model !== 'reference') throw new AppProblem('invalid-input', `model is "${String(model)}"; expected "fast" or "reference".`, undefined, 'model');
  const scene: Scene = { ...setup, disc, aberrations, frame: { widthPx, heightPx, centerM: [0, 0] }, noise: null };
  const sim = simulateIntensity(scene, { model, onProgress: (f) => onProgress(0.98 * f, model === 'fast' ? 'fast model' : 'reference model') });
  onProgress(1, 'done');
  return {
    image: { widthPx, heightPx, data: Float32Array.from(sim.intensity), pixelM: setup.camera.pixelPitchM },
    model,
    notes: [
      `Synthetic: intensity relative to the incident peak, computed by Shadowfront's ${model} model (no camera noise).`,
      ...(rough > 0 ? [`edge roughness ${(rough * 1e6).toFixed(2)} µm RMS is modelled as 12 edge harmonics of orders 8 to 143`] : []),
      ...sim.warnings,
    ],
  };
}
