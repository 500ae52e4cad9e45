/**
 * Fitting from the logbook: add a measurement from raw frames (fitting them first), and re-analyse a
 * stored measurement with the current solver (a new result beside the old ones). The fit itself is
 * the shared fit service (app/services/fitService.ts, `runFit`); it is loaded on demand, and until it
 * exists these functions say so plainly.
 *
 * The fit runs without the write lock (it can take a while); the lock is taken only to store.
 */
import { existsSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import type { FitResult } from '../../../core/fit/result.ts';
import type { BenchSetup } from '../../../core/setup/types.ts';
import type { MeasurementRecord, StoredResult } from '../../../core/logbook/types.ts';
import { LogbookDataError } from '../../../core/logbook/errors.ts';
import { openLogbook } from './logbook.ts';
import type { NewMeasurement } from './logbook.ts';
import { LogbookProblem } from './problem.ts';

/** The job of the shared fit service (app/services/fitService.ts). */
export interface FitJob {
  framePaths: string[];
  darkPaths: string[];
  setupPath: string;
  terms?: number[];
}

export type RunFit = (job: FitJob) => Promise<FitResult>;

const FIT_SERVICE = new URL('../fitService.ts', import.meta.url);

/** The fit service's runFit, or a LogbookProblem of kind "not-available" when it is not there yet. */
export async function loadRunFit(): Promise<RunFit> {
  const file = fileURLToPath(FIT_SERVICE);
  if (!existsSync(file)) {
    throw new LogbookProblem(file, 'fitting from the logbook is not available yet in this version (the fit service is missing); fit with "shadowfront fit --json" and add the result with "shadowfront log add --result"', 'not-available');
  }
  let mod: { runFit?: unknown };
  try {
    mod = (await import(pathToFileURL(file).href)) as { runFit?: unknown };
  } catch (err) {
    throw new LogbookProblem(file, `fitting from the logbook is not available yet in this version (the fit service could not be loaded: ${(err as Error).message})`, 'not-available');
  }
  if (typeof mod.runFit !== 'function') {
    throw new LogbookProblem(file, 'fitting from the logbook is not available yet in this version (the fit service has no runFit)', 'not-available');
  }
  return mod.runFit as RunFit;
}

export interface FramesToFit {
  framePaths: string[];
  darkPaths: string[];
  setupPath: string;
  /** The setup file's content and its SI form (see ./setupFile.ts readSetupFile). */
  setup: { json: unknown; bench: BenchSetup };
  terms?: number[];
}

/** Fit frames with the fit service, then log the measurement with its frames, setup and result. */
export async function addMeasurementFromFrames(
  dbPath: string,
  fit: FramesToFit,
  details: Omit<NewMeasurement, 'frames' | 'result' | 'setup' | 'setupSI'>,
  runFit?: RunFit,
): Promise<{ record: MeasurementRecord; warnings: string[] }> {
  if (!fit.framePaths.length) throw new LogbookDataError('no frames to fit');
  const fitFn = runFit ?? (await loadRunFit());
  const result = await fitFn({ framePaths: fit.framePaths, darkPaths: fit.darkPaths, setupPath: fit.setupPath, terms: fit.terms });
  const lb = await openLogbook(dbPath, { write: true, command: 'log add' });
  try {
    const record = lb.addMeasurement({
      ...details,
      setup: fit.setup.json,
      setupSI: fit.setup.bench,
      result,
      resultSource: 'fit',
      frames: [...fit.framePaths.map((path) => ({ path, role: 'frame' as const })), ...fit.darkPaths.map((path) => ({ path, role: 'dark' as const }))],
    });
    return { record, warnings: lb.takeWarnings() };
  } finally {
    lb.close();
  }
}

/**
 * Re-analyse a stored measurement: its stored frames and setup are written to a temporary folder, fitted
 * with the fit service, and the new result is added; older results stay.
 * @param terms the terms to fit; default: those of the latest result
 */
export async function refitMeasurement(dbPath: string, measurementId: number, options: { terms?: number[]; note?: string } = {}, runFit?: RunFit): Promise<{ previous: StoredResult | null; added: StoredResult }> {
  const reader = await openLogbook(dbPath, { write: false });
  let record: MeasurementRecord;
  const work = mkdtempSync(join(tmpdir(), 'shadowfront-refit-'));
  const framePaths: string[] = [];
  const darkPaths: string[] = [];
  const setupPath = join(work, 'setup.json');
  try {
    record = reader.requireMeasurement(measurementId);
    if (record.setup === null) throw new LogbookDataError(`measurement #${measurementId} has no stored setup, so it cannot be re-analysed`);
    const frames = record.frames.filter((f) => f.role === 'frame');
    if (!frames.length) throw new LogbookDataError(`measurement #${measurementId} has no stored frames, so it cannot be re-analysed`);
    const missing = reader.verifyFrames().filter((p) => record.frames.some((f) => f.sha256 === p.sha256));
    if (missing.length) throw new LogbookDataError(`measurement #${measurementId}: stored frame ${missing[0].sha256} is ${missing[0].state}`);
    writeFileSync(setupPath, JSON.stringify(record.setup, null, 2));
    for (const f of record.frames) {
      // Each frame under its original name (its extension tells the image type), one folder per frame.
      const sub = join(work, `${f.role}-${f.position + 1}`);
      mkdirSync(sub);
      const p = join(sub, basename(f.name));
      writeFileSync(p, reader.readFrame(f.sha256));
      (f.role === 'frame' ? framePaths : darkPaths).push(p);
    }
  } catch (err) {
    rmSync(work, { recursive: true, force: true });
    throw err;
  } finally {
    reader.close();
  }
  try {
    const fitFn = runFit ?? (await loadRunFit());
    const previous = record.results.length ? record.results[record.results.length - 1] : null;
    const terms = options.terms ?? previous?.result.zernike.terms.map((t) => t.j);
    const result = await fitFn({ framePaths, darkPaths, setupPath, terms });
    const lb = await openLogbook(dbPath, { write: true, command: 'log refit' });
    try {
      const added = lb.addResult(measurementId, result, options.note ?? (previous ? `re-analysis (previous result #${previous.id}, ${previous.result.software})` : 'analysis of stored frames'), 'fit');
      return { previous, added };
    } finally {
      lb.close();
    }
  } finally {
    rmSync(work, { recursive: true, force: true });
  }
}
