/**
 * Disc calibration and the disc library, shared by every shell: read the frames taken at several disc
 * angles, calibrate (core/fit/disc/calibrate.ts), store the profile in the logbook's disc library, list
 * the library, and load a stored profile for a later fit (`fit --disc`).
 */
import type { ZernikeTerm } from '../../core/setup/types.ts';
import type { FrameSet } from '../../core/fit/measure.ts';
import type { Disc } from '../../core/logbook/types.ts';
import { sharedFieldEngine } from './threads/fieldThreads.ts';
import { calibrateDisc, type CalibrateOptions, type CalibrationBeam, type DiscCalibration } from '../../core/fit/disc/calibrate.ts';
import { appliedProfile, parseDiscProfile, DISC_PROFILE_FORMAT, type AppliedDiscProfile, type DiscProfile } from '../../core/fit/disc/profile.ts';
import { RESULT_FORMAT } from '../../core/fit/result.ts';
import { SetupFieldError } from '../../core/setup/fieldReader.ts';
import { readJson } from './files.ts';
import { loadBenchSetup, loadFramesForFit } from './frames.ts';
import { softwareVersion } from './fitService.ts';
import { openLogbook, LogbookProblem, type Logbook } from './logbook/logbook.ts';
import { resolveLogbookPath } from './logbook/paths.ts';

export interface DiscAngleSet {
  /** The disc's rotation for these frames, rad (counter-clockwise, lab frame, looking downstream). */
  angleRad: number;
  framePaths: string[];
  darkPaths?: string[];
  /** This set's own setup (default: the job's). */
  setupPath?: string;
}

export interface DiscCalibrationJob {
  sets: DiscAngleSet[];
  setupPath: string;
  /** The beam: fitted (default), declared ideal, or known from a result file ("shadowfront-result/1"). */
  beam?: 'fit' | 'ideal' | { resultPath: string };
  /** Edge orders: [2] (default) or [2, 3, 4]. */
  orders?: number[];
  terms?: number[];
  options?: Omit<CalibrateOptions, 'orders' | 'beam' | 'terms' | 'software' | 'calibratedAt' | 'onProgress'>;
  onProgress?: (fraction: number, stage: string) => boolean | void;
}

/**
 * Known beam coefficients from a fit result file.
 * @throws FileProblem, or SetupFieldError naming the file, the field and the value.
 */
export function knownBeamFromResult(path: string): ZernikeTerm[] {
  const json = readJson(path) as Record<string, unknown> | null;
  if (!json || typeof json !== 'object' || json.format !== RESULT_FORMAT) {
    throw new SetupFieldError({ file: path, path: 'format', value: json && typeof json === 'object' ? json.format : json, expected: `"${RESULT_FORMAT}" (a result written by "shadowfront fit --json")` });
  }
  const z = json.zernike as { terms?: unknown } | undefined;
  if (!z || !Array.isArray(z.terms)) throw new SetupFieldError({ file: path, path: 'zernike.terms', value: z?.terms, expected: 'a list of fitted terms' });
  return z.terms.map((t, i) => {
    const r = t as Record<string, unknown>;
    if (!Number.isInteger(r?.j) || typeof r?.waves !== 'number' || !Number.isFinite(r.waves)) {
      throw new SetupFieldError({ file: path, path: `zernike.terms[${i}]`, value: t, expected: 'a term {"j": <ANSI index>, "waves": <number>, …}' });
    }
    return { j: r.j as number, waves: r.waves as number };
  });
}

/**
 * Calibrate from frame sets already prepared (the desktop app and the web mode prepare frames from bytes,
 * app/services/frames.ts loadFramesFromBytes), each with its disc rotation.
 */
export function calibratePreparedSets(
  sets: FrameSet[],
  job: { beam?: CalibrationBeam; orders?: number[]; terms?: number[]; options?: DiscCalibrationJob['options']; onProgress?: DiscCalibrationJob['onProgress'] } = {},
): DiscCalibration {
  if (sets.length === 0) throw new RangeError('no frame sets given');
  const base = sets[0].setup;
  for (const s of sets.slice(1)) {
    if (s.setup.wavelengthM !== base.wavelengthM || s.setup.zernikeRadiusM !== base.zernikeRadiusM) {
      throw new RangeError('all frame sets of one calibration must share the wavelength and the Zernike radius');
    }
  }
  return calibrateDisc(sets, { fieldEngine: sharedFieldEngine(), ...job.options, orders: job.orders, beam: job.beam ?? 'fit', terms: job.terms, software: softwareVersion(), onProgress: job.onProgress });
}

/** Read the frames of every angle and calibrate the disc. */
export function runDiscCalibration(job: DiscCalibrationJob): DiscCalibration {
  if (job.sets.length === 0) throw new RangeError('no frame files given');
  const baseSetup = loadBenchSetup(job.setupPath);
  const sets = job.sets.map((s) => {
    const setup = s.setupPath ? loadBenchSetup(s.setupPath) : baseSetup;
    if (setup.wavelengthM !== baseSetup.wavelengthM || setup.zernikeRadiusM !== baseSetup.zernikeRadiusM) {
      throw new RangeError(`${s.setupPath}: all frame sets of one calibration must share the wavelength and the Zernike radius`);
    }
    return { setup, prepared: loadFramesForFit(s.framePaths, s.darkPaths ?? [], setup), discRotationRad: s.angleRad };
  });
  const beam: CalibrationBeam = !job.beam || job.beam === 'fit' ? 'fit' : job.beam === 'ideal' ? 'ideal' : { known: knownBeamFromResult(job.beam.resultPath) };
  return calibratePreparedSets(sets, { beam, orders: job.orders, terms: job.terms, options: job.options, onProgress: job.onProgress });
}

/** "3", "#3" → 3; anything else is a name. */
export function discKey(idOrName: string | number): string | number {
  if (typeof idOrName === 'number') return idOrName;
  const m = /^#?(\d+)$/.exec(idOrName.trim());
  return m ? Number(m[1]) : idOrName.trim();
}

/**
 * Store a calibration in the disc library: a new disc (nominal diameter from the calibration's setup) or,
 * when the name (or id) is known, the disc's calibration — which is replaced only with `replace`, so that an
 * earlier calibration is never lost by mistake. Returns the disc with its id.
 * @throws RangeError for an existing calibration without `replace`; LogbookProblem / LogbookDataError from the logbook.
 */
export async function saveDiscProfile(
  db: string | undefined,
  name: string,
  profile: DiscProfile,
  options: { replace?: boolean; notes?: string } = {},
): Promise<{ disc: Disc; created: boolean; replaced: boolean }> {
  const path = resolveLogbookPath(db).path;
  const lb = await openLogbook(path, { write: true, command: 'disc calibrate' });
  try {
    return storeDiscProfile(lb, name, profile, options);
  } finally {
    lb.close();
  }
}

/**
 * The same as saveDiscProfile, in a logbook already open for writing (the app service opens it through its
 * own access, app/services/app/logbookAccess.ts).
 * @throws RangeError for an existing calibration without `replace`, or an unknown disc id.
 */
export function storeDiscProfile(
  lb: Logbook,
  name: string,
  profile: DiscProfile,
  options: { replace?: boolean; notes?: string } = {},
): { disc: Disc; created: boolean; replaced: boolean } {
  const existing = lb.getDisc(discKey(name));
  if (existing) {
    const had = existing.calibration !== null && existing.calibration !== undefined;
    if (had && !options.replace) {
      const when = (existing.calibration as { calibratedAt?: unknown }).calibratedAt;
      throw new RangeError(
        `disc #${existing.id} "${existing.name}" already has a calibration${typeof when === 'string' ? ` (made ${when})` : ''}: nothing was changed; replace it on purpose (--replace), or store this one under another name`,
      );
    }
    return { disc: lb.setDiscCalibration(existing.id, profile), created: false, replaced: had };
  }
  if (typeof discKey(name) === 'number') throw new RangeError(`no disc #${name} in the logbook ${lb.path}: give a name to create a new disc`);
  return { disc: lb.addDisc({ name, nominalDiameterM: 2 * profile.radiusM, calibration: profile, notes: options.notes }), created: true, replaced: false };
}

/**
 * Check, before a long calibration, that its profile could be stored under `name`: a new name, or a disc
 * without a calibration, or `replace`. Does nothing when the logbook does not exist yet.
 * @throws RangeError naming the disc and its calibration's date.
 */
export async function checkDiscProfileTarget(db: string | undefined, name: string, replace = false): Promise<void> {
  const path = resolveLogbookPath(db).path;
  let lb: Awaited<ReturnType<typeof openLogbook>>;
  try {
    lb = await openLogbook(path, { write: false });
  } catch (err) {
    // no logbook yet: a new one will be made when the profile is stored
    if (err instanceof LogbookProblem && err.kind === 'missing' && typeof discKey(name) !== 'number') return;
    throw err;
  }
  try {
    const existing = lb.getDisc(discKey(name));
    if (!existing) {
      if (typeof discKey(name) === 'number') throw new RangeError(`no disc #${name} in the logbook ${lb.path}: give a name to create a new disc`);
      return;
    }
    if (existing.calibration !== null && existing.calibration !== undefined && !replace) {
      const when = (existing.calibration as { calibratedAt?: unknown }).calibratedAt;
      throw new RangeError(
        `disc #${existing.id} "${existing.name}" already has a calibration${typeof when === 'string' ? ` (made ${when})` : ''}: nothing was changed; replace it on purpose (--replace), or store this one under another name`,
      );
    }
  } finally {
    lb.close();
  }
}

export interface DiscLibraryEntry {
  id: number;
  name: string;
  nominalDiameterM: number;
  /** The disc profile, or null when the disc has no calibration of that format. */
  profile: DiscProfile | null;
  /** Why a calibration that is present could not be read as a profile. */
  problem: string | null;
}

/** The discs of the library with their profiles. */
export async function listDiscProfiles(db: string | undefined): Promise<DiscLibraryEntry[]> {
  const lb = await openLogbook(resolveLogbookPath(db).path, { write: false });
  try {
    return lb.listDiscs().map((d) => {
      if (d.calibration === null || d.calibration === undefined) return { id: d.id, name: d.name, nominalDiameterM: d.nominalDiameterM, profile: null, problem: null };
      try {
        return { id: d.id, name: d.name, nominalDiameterM: d.nominalDiameterM, profile: parseDiscProfile(d.calibration, `disc #${d.id} "${d.name}"`), problem: null };
      } catch (err) {
        return { id: d.id, name: d.name, nominalDiameterM: d.nominalDiameterM, profile: null, problem: (err as Error).message };
      }
    });
  } finally {
    lb.close();
  }
}

/**
 * A stored disc's profile in the form a fit applies (`discProfile` of measureBeam / fitService options).
 * @throws RangeError when the disc is unknown or has no profile; SetupFieldError when the profile is damaged.
 */
export async function loadDiscProfile(db: string | undefined, idOrName: string | number): Promise<AppliedDiscProfile> {
  const lb = await openLogbook(resolveLogbookPath(db).path, { write: false });
  try {
    const key = discKey(idOrName);
    const d = lb.getDisc(key);
    if (!d) {
      const known = lb.listDiscs().map((x) => `#${x.id} "${x.name}"`);
      throw new RangeError(`no disc ${typeof key === 'number' ? `#${key}` : `named "${key}"`} in the logbook ${lb.path}; ${known.length ? `known discs: ${known.join(', ')}` : 'it has no discs yet'}`);
    }
    const source = `disc #${d.id} "${d.name}"`;
    if (!d.calibration || (d.calibration as { format?: unknown }).format !== DISC_PROFILE_FORMAT) {
      throw new RangeError(`${source} has no disc profile (its calibration is not "${DISC_PROFILE_FORMAT}"): calibrate it with "shadowfront disc calibrate … --name ${JSON.stringify(d.name)}"`);
    }
    const profile = parseDiscProfile(d.calibration, source);
    if (!profile.trusted) throw new RangeError(`${source}: its disc profile is marked not trusted (${profile.degenerate ? 'the disc shape was not told apart from the beam' : 'the calibration fit was suspect'}); calibrate it again`);
    return appliedProfile(profile, d.id, d.name);
  } finally {
    lb.close();
  }
}
