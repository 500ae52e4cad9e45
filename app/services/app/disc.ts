/**
 * The disc calibration as a job of the desktop app and the local web mode: the request is checked in the
 * service (the setup parsed, each disc angle read with its unit, every angle given frames), then the job
 * worker prepares the frames from bytes and calibrates through the same service function as the CLI
 * (../discService.ts calibratePreparedSets). A later fit with a calibrated disc finds its profile here
 * (fitDiscProfile), in the service, which owns the logbook; the worker gets the profile itself.
 */
import type { DiscCalibrationOutcome, DiscCalibrationRequest } from '../../shared/contract.ts';
import type { BenchSetup } from '../../../core/setup/types.ts';
import { appliedProfile, parseDiscProfile, DISC_PROFILE_FORMAT, type AppliedDiscProfile } from '../../../core/fit/disc/profile.ts';
import type { Logbook } from '../logbook/logbook.ts';
import { parseAngle } from '../../../core/units/parseQuantity.ts';
import { loadFramesFromBytes } from './prepareFromBytes.ts';
import { AppProblem } from './problems.ts';
import type { Progress } from './jobRunners.ts';

/** Most disc angles in one calibration. */
export const MAX_DISC_ANGLES = 36;

export interface DiscJobPayload {
  /** request.setup, parsed. */
  setup: BenchSetup;
  sets: { angleRad: number; frames: { name: string; data: Uint8Array }[]; darks: { name: string; data: Uint8Array }[] }[];
  beam: 'fit' | 'ideal';
  orders: number[];
  terms?: number[];
}

const PLAIN_NUMBER = /^[-+\u2212]?(\d+\.?\d*|\.\d+)(e[-+]?\d+)?$/i;

/**
 * A disc angle typed by the user: a plain number is degrees ("90", "-45"), else a quantity with an angle
 * unit ("1.5708 rad", "90 deg"). `field` names it in the problem.
 * @throws AppProblem (kind "invalid-input") naming the field and the text.
 */
export function parseDiscAngle(text: string, field: string): number {
  const t = text.trim();
  if (t === '') throw new AppProblem('invalid-input', `${field}: the disc angle is empty; give it in degrees, e.g. 0 or 90.`, undefined, field);
  if (PLAIN_NUMBER.test(t)) return (Number(t.replace('\u2212', '-')) * Math.PI) / 180;
  try {
    return parseAngle(t, { example: '90 deg' });
  } catch (err) {
    throw new AppProblem('invalid-input', `${field}: "${t}" is not a disc angle (${(err as Error).message}); give degrees, e.g. 90, or an angle with its unit, e.g. "1.5708 rad".`, undefined, field);
  }
}

/**
 * Check a request and make the job's payload (the setup already parsed by the caller).
 * @throws AppProblem naming the field (sets[i].angle, sets[i].frames, sets).
 */
export function discJobPayload(req: DiscCalibrationRequest, setup: BenchSetup): DiscJobPayload {
  const sets = req.sets ?? [];
  if (sets.length === 0) throw new AppProblem('frame', 'No frames were given: give frames for each disc angle (at least 0° and 90°).', undefined, 'sets');
  if (sets.length > MAX_DISC_ANGLES) throw new AppProblem('invalid-input', `${sets.length} disc angles were given; at most ${MAX_DISC_ANGLES} are accepted.`, undefined, 'sets');
  const parsed = sets.map((s, i) => {
    const angleRad = parseDiscAngle(s.angle, `disc angle ${i + 1}`);
    if (!s.frames?.length) {
      throw new AppProblem('frame', `Disc angle ${i + 1} (${s.angle.trim()}): no frame was given; open the frames taken with the disc at this angle, or remove the angle.`, undefined, `sets[${i}].frames`);
    }
    return { angleRad, frames: s.frames, darks: s.darks ?? [] };
  });
  if (req.beam !== 'fit' && req.beam !== 'ideal') throw new AppProblem('invalid-input', `beam is "${String(req.beam)}"; expected "fit" or "ideal".`, undefined, 'beam');
  return { setup, sets: parsed, beam: req.beam, orders: req.harmonics ? [2, 3, 4] : [2], ...(req.terms ? { terms: req.terms } : {}) };
}

function cancelled(): Error {
  const e = new Error('cancelled');
  e.name = 'CancelledError';
  return e;
}

/** The job: prepare every angle's frames, then calibrate (progress 0..1; returning false cancels). */
export async function runDiscJob(payload: DiscJobPayload, onProgress: Progress = () => true): Promise<DiscCalibrationOutcome> {
  const { calibratePreparedSets } = await import('../discService.ts');
  const n = payload.sets.length;
  const prepared = payload.sets.map((s, i) => {
    if (onProgress((0.04 * i) / n, `reading the frames of angle ${i + 1}`) === false) throw cancelled();
    return { setup: payload.setup, prepared: loadFramesFromBytes(s.frames, s.darks, payload.setup), discRotationRad: s.angleRad };
  });
  if (onProgress(0.05, 'calibrating') === false) throw cancelled();
  const calibration = calibratePreparedSets(prepared, {
    beam: payload.beam,
    orders: payload.orders,
    terms: payload.terms,
    onProgress: (f, stage) => onProgress(0.05 + 0.94 * f, stage),
  });
  onProgress(1, 'done');
  return calibration;
}

/** "3", "#3" or 3 → the id 3; any other text is a name. */
function discKeyOf(disc: string | number): string | number {
  if (typeof disc === 'number') return disc;
  const m = /^#?(\d+)$/.exec(disc.trim());
  return m ? Number(m[1]) : disc.trim();
}

/**
 * The stored profile of a disc of the library (id or name), in the form the fit applies
 * (core/fit/disc/profile.ts AppliedDiscProfile); `lb` is null when there is no logbook yet.
 * @throws AppProblem naming the disc: kind "not-found" (no such disc), "not-calibrated" (no trusted profile);
 *   SetupFieldError naming the disc, the field and the value when its stored profile is damaged.
 */
export function fitDiscProfile(lb: Logbook | null, logbookPath: string, disc: string | number): AppliedDiscProfile {
  const key = discKeyOf(disc);
  const asked = typeof key === 'number' ? `#${key}` : `"${key}"`;
  if (key === '') throw new AppProblem('invalid-input', 'The disc to use is empty: choose a calibrated disc of the library, or none.', undefined, 'disc');
  if (!lb) {
    throw new AppProblem('not-found', `Disc ${asked} cannot be used: there is no logbook (and so no disc library) at ${logbookPath} yet. Calibrate the disc on the Discs screen and save it first.`, logbookPath, 'disc');
  }
  const d = lb.getDisc(key);
  if (!d) {
    const known = lb.listDiscs().map((x) => `#${x.id} "${x.name}"`);
    throw new AppProblem(
      'not-found',
      `There is no disc ${asked} in the disc library of ${logbookPath}; ${known.length ? `its discs are ${known.join(', ')}` : 'it has no discs yet'}. Choose a calibrated disc, or none.`,
      logbookPath,
      'disc',
    );
  }
  const source = `disc #${d.id} "${d.name}"`;
  if (!d.calibration || (d.calibration as { format?: unknown }).format !== DISC_PROFILE_FORMAT) {
    throw new AppProblem('not-calibrated', `Disc #${d.id} "${d.name}" has no calibrated shape, so the fit cannot apply it: calibrate it on the Discs screen, or fit without a disc profile.`, undefined, 'disc');
  }
  const profile = parseDiscProfile(d.calibration, source);
  if (!profile.trusted) {
    throw new AppProblem(
      'not-calibrated',
      `Disc #${d.id} "${d.name}": its calibration is marked not trustworthy (${profile.degenerate ? 'the disc shape was not told apart from the beam' : 'the calibration fit was suspect'}), so the fit does not use it. Calibrate the disc again.`,
      undefined,
      'disc',
    );
  }
  return appliedProfile(profile, d.id, d.name);
}
