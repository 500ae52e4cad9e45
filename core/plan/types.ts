/**
 * Types of the bench planner (choosing a disc, a distance and a camera that can see the aberrations).
 * SI units throughout; names carry the unit. The plan file format ("shadowfront-plan/1") is read by
 * ./parsePlan.ts; its fields are documented in ./README.md.
 */
import type { ZernikeTerm } from '../setup/types.ts';

export const PLAN_FORMAT = 'shadowfront-plan/1';
export const PLAN_REPORT_FORMAT = 'shadowfront-plan-report/1';

/** The camera of a plan: geometry and noise. */
export interface PlanCamera {
  pixelPitchM: number;
  /** [width, height] in pixels. */
  sensorPx: [number, number];
  bitDepth: number;
  /** Counts of the brightest pixel of a frame, as the technician sets the exposure (above the offset). */
  peakCounts: number;
  /** Read noise of one frame, RMS counts. */
  readNoiseCounts: number;
  /** Counts per photo-electron (shot-noise variance = gain·signal); default 1. */
  gainCountsPerElectron: number;
  /** Frames averaged per measurement; default 1. */
  averagedFrames: number;
}

/** A parsed plan file, in SI. */
export interface BenchPlan {
  wavelengthM: number;
  /** 1/e² intensity radius of the beam at the disc. */
  beamRadiusM: number;
  /** Nominal wavefront radius R at the disc (+∞ collimated, > 0 diverging; a point source G before the disc gives G). */
  curvatureRadiusM: number;
  camera: PlanCamera;
  /** Candidate disc diameters and camera distances; every pair is a candidate (discs outer, distances inner). */
  discDiametersM: number[];
  cameraDistancesM: number[];
  /** Edge roughness amplitude δ of the discs (0 = ideal). */
  edgeRoughnessM: number;
  /** Diameter S of the source (0 = point source); the source distance is the curvature radius. */
  sourceSizeM: number;
  /** ANSI indices of the terms the fit would free. */
  terms: number[];
  /** Normalisation radius of the coefficients (default: the beam radius). */
  zernikeRadiusM: number;
  /** The beam the bound is evaluated for (default: an ideal beam, no terms). */
  aberrations: ZernikeTerm[];
}

/** One candidate probe: a disc diameter at a camera distance, with the camera and laser of the plan. */
export interface PlanCandidate {
  discDiameterM: number;
  cameraDistanceM: number;
}

/** Analytic figures of a candidate (physics notes §2). */
export interface CandidateFigures {
  /** L' = L·R/(R + L) for a beam of curvature radius R (L for collimated). */
  effectiveDistanceM: number;
  /** M = L/L' = (R + L)/R: the pattern's scale on the sensor against the disc plane. */
  magnification: number;
  /** a²/(λL'). */
  fresnelNumber: number;
  /** Δr = λL'/(2a) at the rim. */
  zoneWidthM: number;
  /** Rim tolerance from the 10 % rule (common practice, no published source): 0.1·Δr. */
  rimToleranceM: number;
  /** Edge roughness δ the ratio below was computed for (0 = ideal disc). */
  edgeRoughnessM: number;
  /** On-axis intensity kept for the edge roughness δ: J₀²(π·δ/Δr) (physics notes §2). */
  roughnessIntensityRatio: number;
  /** First dark ring diameter of the spot on the sensor, 2·2.405·L/(k·a) / pixel pitch. */
  spotDiameterPx: number;
  /** Geometric shadow diameter on the sensor, 2·a·M / pixel pitch. */
  shadowDiameterPx: number;
  /** The sensor's smaller side, pixels; null when the sensor size is not known. */
  sensorMinSidePx: number | null;
  /** Whether the shadow's diameter fits within the sensor's smaller side; null when the sensor size is not known. */
  shadowFits: boolean | null;
  /** Bright rings around the spot (J₀² maxima, at the zeros of J₁) inside the shadow and, when known, inside the sensor. */
  visibleRings: number;
  /** Spot blur by a finite source, S·L/G on the sensor, pixels (0 for a point source). */
  sourceBlurPx: number;
}

/** Predicted 1σ of one Zernike coefficient (Cramér–Rao bound of the fast model with the camera noise model). */
export interface PredictedSigma {
  j: number;
  name: string;
  sigmaWaves: number;
}

/** How the bound was computed for a candidate: the region the fit would analyse, and the binning. */
export interface BoundSettings {
  /**
   * 'radial': an ideal beam gives a round pattern, and the Fisher information of the whole region comes from
   * radial profiles at the fit's binning (core/plan/symmetricFisher.ts); 'frame': the fast model over the
   * whole region (core/fit/crb.ts), used when the plan states working-point aberrations.
   */
  method: 'radial' | 'frame';
  /** Circle around the pattern (centred on the sensor) that the fit would analyse, pixels. */
  regionRadiusPx: number;
  /** True when the circle holds the whole shadow and its first four edge fringes (core/frames/region.ts). */
  holdsWholeShadow: boolean;
  /** Super-pixel size the fit would choose (about 1/5 of the ring period λL/(2a)). */
  fitBinning: number;
  /** Super-pixel size used for the bound: the fit's; coarser only for 'frame' regions above MAX_BOUND_SUPERPIXELS (the σ are then on the safe side). */
  binning: number;
  /** Super-pixels in the region at that binning. */
  superPixels: number;
  /** Expected counts per unit relative intensity, so that the brightest pixel of the sensor reaches camera.peakCounts. */
  countsPerUnitIntensity: number;
}

export interface CandidateReport {
  candidate: PlanCandidate;
  figures: CandidateFigures;
  /** Predicted 1σ per fitted term (distance known); empty when the bound could not be computed. */
  predicted: PredictedSigma[];
  /** Predicted 1σ of defocus when the camera distance is freed too; null when defocus is not fitted or not computed. */
  defocusSigmaFreeDistanceWaves: number | null;
  /** |correlation| between defocus and the camera distance when the distance is freed (1 = fully degenerate); null when not computed. */
  defocusDistanceCorrelation: number | null;
  bound: BoundSettings | null;
  /** Whether the candidate takes part in the ranking. */
  usable: boolean;
  /** Warnings in plain words (e.g. the source blur approaches the spot size, the shadow does not fit). */
  warnings: string[];
  /** Rank from 1 (best); null for unusable candidates. */
  rank: number | null;
  /** Why it ranks where it does, in one sentence. */
  reason: string;
}

export interface PlanReport {
  format: 'shadowfront-plan-report/1';
  wavelengthM: number;
  zernikeRadiusM: number;
  terms: number[];
  /** The rule the candidates are ranked by, in words. */
  rankingRule: string;
  candidates: CandidateReport[];
  /** The recommended candidate's index in `candidates`, or null when none is usable. */
  recommended: number | null;
  recommendation: string;
  warnings: string[];
}
