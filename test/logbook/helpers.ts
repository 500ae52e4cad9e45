/**
 * Synthetic fit results for the logbook tests ("shadowfront-result/1"). They are made-up inputs for
 * storage and statistics, not physics checks: RMS = √Σc² over j ≥ 3 (Parseval for the orthonormal
 * ANSI basis), Strehl by the Maréchal approximation exp(−(2π·RMS)²), uncertainties by first-order
 * propagation.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { FitResult } from '../../core/fit/result.ts';
import { RESULT_FORMAT } from '../../core/fit/result.ts';
import { zernikeName } from '../../core/zernike/index.ts';

const made: string[] = [];

/** A new temporary folder; removeTempDirs() deletes the ones made so far. */
export function tempDir(prefix = 'shadowfront-logbook-'): string {
  const d = mkdtempSync(join(tmpdir(), prefix));
  made.push(d);
  return d;
}

export function removeTempDirs(): void {
  for (const d of made.splice(0)) rmSync(d, { recursive: true, force: true });
}

export interface SyntheticResultOptions {
  /** ANSI j → waves */
  terms: Record<number, number>;
  /** 1σ of every coefficient, waves (default 0.002) */
  sigma?: number;
  wavelengthM?: number;
  radiusM?: number;
  software?: string;
  settings?: Record<string, unknown>;
  trusted?: boolean;
}

export function syntheticResult(o: SyntheticResultOptions): FitResult {
  const sigma = o.sigma ?? 0.002;
  const wl = o.wavelengthM ?? 632.8e-9;
  const js = Object.keys(o.terms).map(Number).sort((a, b) => a - b);
  const terms = js.map((j) => ({ j, name: zernikeName(j), waves: o.terms[j], sigmaWaves: sigma, nm: o.terms[j] * wl * 1e9, sigmaNm: sigma * wl * 1e9 }));
  const high = terms.filter((t) => t.j >= 3);
  const rms = Math.sqrt(high.reduce((s, t) => s + t.waves ** 2, 0));
  const sigmaRms = rms > 0 ? Math.sqrt(high.reduce((s, t) => s + (t.waves / rms) ** 2 * sigma ** 2, 0)) : sigma;
  const k = (2 * Math.PI) ** 2;
  const strehl = Math.exp(-k * rms * rms);
  return {
    format: RESULT_FORMAT,
    software: o.software ?? 'shadowfront 0.1.0',
    wavelength_m: wl,
    zernike: { radius_m: o.radiusM ?? 4e-3, basis: 'ANSI Z80.28 unit-RMS', terms, correlation: terms.map((_, a) => terms.map((__, b) => (a === b ? 1 : 0))) },
    rmsWaves: rms,
    sigmaRmsWaves: sigmaRms,
    pvWaves: 3.5 * rms,
    strehl,
    sigmaStrehl: strehl * k * 2 * rms * sigmaRms,
    residualCurvatureRadius_m: null,
    center_m: [0, 0],
    centers_m: [[0, 0]],
    chi2PerDof: 1.02,
    dof: 65000,
    termination: 'converged',
    iterations: 12,
    elapsedMs: 850,
    regions: [{ centerPx: [128, 128], radiusPx: 120, binning: 1 }],
    settings: o.settings ?? { solver: 'levenberg-marquardt', model: 'fast', terms: js },
    warnings: [],
    trusted: o.trusted ?? true,
  };
}
