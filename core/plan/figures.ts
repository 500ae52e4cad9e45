/**
 * Analytic figures of a bench candidate (physics notes §1–2), built on core/optics/geometry.ts:
 * L' from 1/L' = 1/L + 1/R, M = L/L', the Fresnel number a²/(λL'), the rim zone Δr = λL'/(2a) and the
 * 10 % rim tolerance (common practice, no published source), the on-axis intensity kept for an edge
 * roughness δ, J₀²(π·δ/Δr), the spot's first dark ring 2·2.405·L/(k·a), the shadow 2·a·M, the bright
 * rings that show, and the source blur S·L/G. Pure.
 */
import { benchFigures as setupFigures, J0_FIRST_ZERO } from '../optics/geometry.ts';
import { besselJ0 } from '../math/bessel.ts';
import type { BenchSetup } from '../setup/types.ts';
import type { CandidateFigures } from './types.ts';

/** Rim tolerance as a fraction of Δr: the 10 % rule (common practice, no published source). */
export const RIM_TOLERANCE_FRACTION = 0.1;

/** First zeros of J₁ (Abramowitz & Stegun, Table 9.5), where J₀² has its bright rings. */
const J1_ZEROS = [3.8317059702075125, 7.015586669815619];

/** s-th zero of J₁ (s ≥ 1): the table for s ≤ 2, McMahon's expansion beyond (A&S 9.5.12, μ = 4). */
export function besselJ1Zero(s: number): number {
  if (s <= J1_ZEROS.length) return J1_ZEROS[s - 1];
  const beta = (s + 0.25) * Math.PI;
  const mu = 4;
  const b8 = 8 * beta;
  return (
    beta -
    (mu - 1) / b8 -
    (4 * (mu - 1) * (7 * mu - 31)) / (3 * b8 ** 3) -
    (32 * (mu - 1) * (83 * mu * mu - 982 * mu + 3779)) / (15 * b8 ** 5)
  );
}

/** On-axis intensity kept for a sinusoidal rim corrugation of amplitude δ: J₀²(π·δ/Δr) (physics notes §2). */
export function roughnessIntensityRatio(edgeRoughnessM: number, zoneWidthM: number): number {
  const j = besselJ0((Math.PI * edgeRoughnessM) / zoneWidthM);
  return j * j;
}

/**
 * Figures of a setup. `setup.camera.sensorPx` (optional) gives the sensor size; without it `shadowFits`
 * and `sensorMinSidePx` are null and the rings are counted inside the shadow only.
 */
export function benchFigures(setup: BenchSetup, options: { edgeRoughnessM?: number } = {}): CandidateFigures {
  const g = setupFigures(setup);
  const pitch = setup.camera.pixelPitchM;
  const delta = options.edgeRoughnessM ?? 0;
  if (!(delta >= 0) || !Number.isFinite(delta)) throw new RangeError(`edge roughness must be a length of 0 or more (got ${delta} m)`);
  const sensor = setup.camera.sensorPx ?? null;
  const sensorMinSidePx = sensor ? Math.min(sensor[0], sensor[1]) : null;
  const shadowDiameterPx = g.shadowDiameterM / pitch;
  // Rings count out to the shadow edge, or to the sensor's edge when that comes first (pattern centred).
  const shadowRadiusM = g.shadowDiameterM / 2;
  const reachM = sensorMinSidePx !== null ? Math.min(shadowRadiusM, (sensorMinSidePx / 2) * pitch) : shadowRadiusM;
  // Ring s lies at j₁,ₛ·L/(k·a) = j₁,ₛ·r₀/2.405 on the camera.
  const unitM = g.firstDarkRingRadiusM / J0_FIRST_ZERO;
  let rings = 0;
  while (besselJ1Zero(rings + 1) * unitM < reachM && rings < 1e6) rings++;
  return {
    effectiveDistanceM: g.effectiveDistanceM,
    magnification: g.magnification,
    fresnelNumber: g.fresnelNumber,
    zoneWidthM: g.fresnelZoneWidthM,
    rimToleranceM: RIM_TOLERANCE_FRACTION * g.fresnelZoneWidthM,
    edgeRoughnessM: delta,
    roughnessIntensityRatio: roughnessIntensityRatio(delta, g.fresnelZoneWidthM),
    spotDiameterPx: g.firstDarkRingDiameterPx,
    shadowDiameterPx,
    sensorMinSidePx,
    shadowFits: sensorMinSidePx !== null ? shadowDiameterPx <= sensorMinSidePx : null,
    visibleRings: rings,
    sourceBlurPx: g.sourceBlurM / pitch,
  };
}
