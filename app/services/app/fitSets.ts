/**
 * The fit of prepared frame sets, shared by every shell: the CLI reads files first (../fitService.ts
 * runFit), the desktop app and the local web mode prepare frames from bytes (./prepareFromBytes.ts) in
 * the job worker. No file reading and no setup parsing here (the worker stays light).
 */
import { readFileSync } from 'node:fs';
import type { BenchSetup } from '../../../core/setup/types.ts';
import { measureBeam, type MeasureOptions } from '../../../core/fit/measure.ts';
import type { FitResult } from '../../../core/fit/result.ts';
import type { FramesForFit } from '../frames.ts';
import { sharedFieldEngine } from '../threads/fieldThreads.ts';

let versionCache: string | null = null;
/** "shadowfront <version>" from package.json. */
export function softwareVersion(): string {
  if (!versionCache) {
    const pkg = JSON.parse(readFileSync(new URL('../../../package.json', import.meta.url), 'utf8')) as { version: string };
    versionCache = `shadowfront ${pkg.version}`;
  }
  return versionCache;
}

/** A frame set ready for the fit: its setup and its prepared frames (with the pattern located and the region chosen). */
export interface PreparedFrameSet {
  setup: BenchSetup;
  prepared: FramesForFit;
  /** How far the disc is turned in these frames, rad (core/fit/measure.ts FrameSet). */
  discRotationRad?: number;
}

export interface PreparedFitJob {
  terms?: number[];
  options?: Omit<MeasureOptions, 'terms' | 'software'>;
  onProgress?: (fraction: number, stage: string) => boolean | void;
}

/**
 * Fit prepared frame sets (core/fit/measure.ts measureBeam).
 * @throws RangeError when the sets do not share the wavelength and the Zernike radius; the fit's own errors.
 */
export function fitPreparedSets(sets: PreparedFrameSet[], job: PreparedFitJob = {}): FitResult {
  if (sets.length === 0) throw new RangeError('no frame files given');
  const base = sets[0].setup;
  for (const s of sets.slice(1)) {
    if (s.setup.wavelengthM !== base.wavelengthM || s.setup.zernikeRadiusM !== base.zernikeRadiusM) {
      throw new RangeError('all frame sets of one fit must share the wavelength and the Zernike radius');
    }
  }
  return measureBeam(sets, {
    // the model grids are shared with helper threads (../threads/fieldThreads.ts); the result is the same
    fieldEngine: sharedFieldEngine(),
    ...job.options,
    terms: job.terms,
    software: softwareVersion(),
    onProgress: job.onProgress,
  });
}
