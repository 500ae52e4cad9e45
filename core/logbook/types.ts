/**
 * Records of the beam-health logbook, as the storage service hands them to the pure logic in this
 * folder (comparison, trends, export, reports). Times are ISO 8601 strings in UTC.
 */
import type { FitResult } from '../fit/result.ts';

/** A laser or beam line whose health is tracked. */
export interface Asset {
  id: number;
  name: string;
  /** Nominal wavelength, m; null when not given. */
  wavelengthM: number | null;
  location: string;
  notes: string;
  /** User limit on the RMS wavefront error, waves (e.g. 1/14 for the Maréchal criterion); null when none. */
  limitRmsWaves: number | null;
  /** User floor on the Strehl ratio; null when none. */
  limitStrehl: number | null;
  createdAt: string;
}

/** A disc (or ball) used as the obstacle, with its calibration data. */
export interface Disc {
  id: number;
  name: string;
  nominalDiameterM: number;
  /** Free-form calibration data (JSON), e.g. a measured diameter with its uncertainty and date. */
  calibration: unknown;
  notes: string;
  createdAt: string;
}

export type FrameRole = 'frame' | 'dark';

/** A raw frame of a measurement, kept in the content-addressed store under its SHA-256. */
export interface FrameRef {
  sha256: string;
  role: FrameRole;
  /** Order among the frames of the same role, from 0. */
  position: number;
  /** The file name it was added from (its extension tells the image type). */
  name: string;
  sizeBytes: number;
}

/** One analysis of a measurement. A re-analysis adds another; older ones are kept. */
export interface StoredResult {
  id: number;
  measurementId: number;
  addedAt: string;
  /** The program that put it in the logbook, e.g. "shadowfront 0.1.0" (the fit's own version is result.software). */
  loggedBy: string;
  note: string;
  result: FitResult;
}

/** A measurement as listed: who, when, which asset, and its latest result in brief. */
export interface MeasurementSummary {
  id: number;
  assetId: number;
  assetName: string;
  takenAt: string;
  operator: string;
  tags: string[];
  notes: string;
  resultCount: number;
  latest: {
    resultId: number;
    software: string;
    rmsWaves: number;
    sigmaRmsWaves: number | null;
    strehl: number;
    sigmaStrehl: number | null;
  } | null;
}

/** A measurement in full. */
export interface MeasurementRecord extends MeasurementSummary {
  /** The bench setup as a "shadowfront-setup/1" JSON object, or null when none was stored. */
  setup: unknown;
  discId: number | null;
  createdAt: string;
  frames: FrameRef[];
  /** Every result, oldest first; the last one is the current analysis. */
  results: StoredResult[];
}

/** A measurement with the one result chosen to represent it (normally the latest). */
export interface AnalysedMeasurement {
  id: number;
  takenAt: string;
  assetName: string;
  tags: string[];
  resultId: number;
  result: FitResult;
}
