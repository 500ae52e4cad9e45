/** Options shared by the commands that run a fit (`fit`, `disc calibrate`): parsing and checks, one place. */
import { UsageError } from './output.ts';

/** parseArgs definitions of the fit's tuning options. */
export const FIT_TUNING_OPTIONS = {
  binning: { type: 'string', default: 'auto' },
  gain: { type: 'string' },
  'read-noise': { type: 'string' },
} as const;

/** "3,4,5,7,8" → ANSI indices. */
export function parseFitTerms(text: string): number[] {
  const parts = text.split(',').map((s) => s.trim()).filter(Boolean);
  const out = parts.map((p) => Number(p));
  if (out.length === 0 || out.some((j) => !Number.isInteger(j))) throw new UsageError(`--terms must be a comma-separated list of ANSI indices such as 3,4,5,7,8, not "${text}"`);
  return out;
}

/** The fit's binning, gain and read noise from the tuning options (undefined = the fit's default). */
export function fitTuning(values: { binning?: string; gain?: string; 'read-noise'?: string }): {
  binning: number | 'auto';
  gainCountsPerElectron: number | undefined;
  readNoiseCounts: number | undefined;
} {
  const binning = values.binning === undefined || values.binning === 'auto' ? 'auto' : Number(values.binning);
  if (binning !== 'auto' && (!Number.isInteger(binning) || binning < 1 || binning > 32)) throw new UsageError(`--binning must be "auto" or a whole number 1..32, not "${values.binning}"`);
  return { binning, gainCountsPerElectron: positiveNumber('gain', values.gain), readNoiseCounts: positiveNumber('read-noise', values['read-noise']) };
}

function positiveNumber(name: string, v: string | undefined): number | undefined {
  if (v === undefined) return undefined;
  const x = Number(v);
  if (!(x > 0) || !Number.isFinite(x)) throw new UsageError(`--${name} must be a positive number, not "${v}"`);
  return x;
}
