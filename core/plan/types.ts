/**
 * Types of the bench planner (choosing a disc, a distance and a camera that can see the aberrations).
 * SI units throughout; names carry the unit.
 */

/** One candidate probe: a disc diameter at a camera distance, with the camera and laser of the plan. */
export interface PlanCandidate {
  discDiameterM: number;
  cameraDistanceM: number;
}

/** Analytic figures of a candidate (physics notes §2). */
export interface CandidateFigures {
  /** L' = L·R/(R + L) for a beam of curvature radius R (∞ for collimated). */
  effectiveDistanceM: number;
  /** (R + L)/R: the pattern's scale on the sensor against the disc plane. */
  magnification: number;
  /** a²/(λL'). */
  fresnelNumber: number;
  /** Δr = λL'/(2a) at the rim. */
  zoneWidthM: number;
  /** Rim tolerance from the 10 % rule (common practice, no published source): 0.1·Δr. */
  rimToleranceM: number;
  /** On-axis intensity kept for the plan's edge roughness δ: J₀²(π·δ/Δr). */
  roughnessIntensityRatio: number;
  /** First dark ring diameter of the spot on the sensor, pixels. */
  spotDiameterPx: number;
  /** Shadow diameter on the sensor, pixels, and whether it fits on the sensor. */
  shadowDiameterPx: number;
  shadowFits: boolean;
  /** Bright rings of the spot pattern visible inside the sensor (and inside the shadow). */
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

export interface CandidateReport {
  candidate: PlanCandidate;
  figures: CandidateFigures;
  predicted: PredictedSigma[];
  /** |correlation| between defocus and the camera distance when the distance is freed (1 = fully degenerate); null when not computed. */
  defocusDistanceCorrelation: number | null;
  /** Warnings in plain words (e.g. the source blur approaches the spot size, the shadow does not fit). */
  warnings: string[];
  /** Rank from 1 (best); null for unusable candidates. */
  rank: number | null;
  /** Why it ranks where it does, in one sentence. */
  reason: string;
}

export interface PlanReport {
  format: 'shadowfront-plan-report/1';
  candidates: CandidateReport[];
  /** The recommended candidate's index in `candidates`, or null when none is usable. */
  recommended: number | null;
  recommendation: string;
  warnings: string[];
}
