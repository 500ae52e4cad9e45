/**
 * The "fit" job shared by every shell: read the setup and frames, prepare, locate, fit.
 */
import { readFileSync } from 'node:fs';
import type { BenchSetup } from '../../core/setup/types.ts';
import { measureBeam, type MeasureOptions } from '../../core/fit/measure.ts';
import type { FitResult } from '../../core/fit/result.ts';
import { loadBenchSetup, loadFramesForFit } from './frames.ts';

export interface FitJob {
  framePaths: string[];
  darkPaths: string[];
  setupPath: string;
  terms?: number[];
  /** Further frame sets of the same beam (another camera distance, the disc turned), each with its own setup. */
  extraSets?: { setupPath: string; framePaths: string[]; darkPaths?: string[] }[];
  options?: Omit<MeasureOptions, 'terms' | 'software'>;
  onProgress?: (fraction: number, stage: string) => boolean | void;
}

let versionCache: string | null = null;
export function softwareVersion(): string {
  if (!versionCache) {
    const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version: string };
    versionCache = `shadowfront ${pkg.version}`;
  }
  return versionCache;
}

/** A setup file, or the setup part of a scene file. */
export function loadSetup(path: string): BenchSetup {
  return loadBenchSetup(path);
}

export async function runFit(job: FitJob): Promise<FitResult> {
  if (job.framePaths.length === 0) throw new RangeError('no frame files given');
  const sets = [{ setupPath: job.setupPath, framePaths: job.framePaths, darkPaths: job.darkPaths }, ...(job.extraSets ?? [])].map((s) => {
    const setup = loadSetup(s.setupPath);
    const prepared = loadFramesForFit(s.framePaths, s.darkPaths ?? [], setup);
    return { setup, prepared };
  });
  const base = sets[0].setup;
  for (const s of sets.slice(1)) {
    if (s.setup.wavelengthM !== base.wavelengthM || s.setup.zernikeRadiusM !== base.zernikeRadiusM) {
      throw new RangeError('all frame sets of one fit must share the wavelength and the Zernike radius');
    }
  }
  return measureBeam(sets, {
    ...job.options,
    terms: job.terms,
    software: softwareVersion(),
    onProgress: job.onProgress,
  });
}
