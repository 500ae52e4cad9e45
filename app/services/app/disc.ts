/**
 * The disc calibration as a job of the desktop app and the local web mode: the request is checked in the
 * service (the setup parsed, each disc angle read with its unit, every angle given frames), then the job
 * worker prepares the frames from bytes and calibrates through the same service function as the CLI
 * (../discService.ts calibratePreparedSets).
 */
import type { DiscCalibrationOutcome, DiscCalibrationRequest } from '../../shared/contract.ts';
import type { BenchSetup } from '../../../core/setup/types.ts';
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
