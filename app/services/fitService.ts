/**
 * The "fit" job shared by every shell: read the setup and frames, prepare, locate, fit.
 */
import type { BenchSetup } from '../../core/setup/types.ts';
import type { MeasureOptions } from '../../core/fit/measure.ts';
import type { FitResult } from '../../core/fit/result.ts';
import { loadBenchSetup, loadFramesForFit } from './frames.ts';
import { fitPreparedSets } from './app/fitSets.ts';

export interface FitJob {
  framePaths: string[];
  darkPaths: string[];
  setupPath: string;
  terms?: number[];
  /** Further frame sets of the same beam (another camera distance, the disc turned), each with its own setup. */
  extraSets?: { setupPath: string; framePaths: string[]; darkPaths?: string[]; discRotationRad?: number }[];
  /** How far the disc is turned in the main frame set, rad (counter-clockwise, lab frame). */
  discRotationRad?: number;
  /** A calibrated disc of the logbook's disc library (name or id): its shape is applied in the fit. */
  disc?: string | number;
  /** The logbook holding the disc library (default: $SHADOWFRONT_DB, else the user data folder). */
  logbookPath?: string;
  /** Source diameter replacing every setup's source.size, m. */
  sourceSizeM?: number;
  options?: Omit<MeasureOptions, 'terms' | 'software'>;
  onProgress?: (fraction: number, stage: string) => boolean | void;
}

export { softwareVersion, fitPreparedSets, type PreparedFrameSet } from './app/fitSets.ts';

/** A setup file, or the setup part of a scene file. */
export function loadSetup(path: string): BenchSetup {
  return loadBenchSetup(path);
}

export async function runFit(job: FitJob): Promise<FitResult> {
  if (job.framePaths.length === 0) throw new RangeError('no frame files given');
  const main = { setupPath: job.setupPath, framePaths: job.framePaths, darkPaths: job.darkPaths, discRotationRad: job.discRotationRad };
  const sets = [main, ...(job.extraSets ?? [])].map((s) => {
    const loaded = loadSetup(s.setupPath);
    const setup = job.sourceSizeM === undefined ? loaded : { ...loaded, source: { sizeM: job.sourceSizeM } };
    const prepared = loadFramesForFit(s.framePaths, s.darkPaths ?? [], setup);
    return { setup, prepared, discRotationRad: s.discRotationRad };
  });
  let options = job.options;
  if (job.disc !== undefined) {
    const { loadDiscProfile } = await import('./discService.ts');
    options = { ...options, discProfile: await loadDiscProfile(job.logbookPath, job.disc) };
  }
  return fitPreparedSets(sets, { terms: job.terms, options, onProgress: job.onProgress });
}
