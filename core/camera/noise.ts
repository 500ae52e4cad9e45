/**
 * Camera noise model and count scaling.
 *
 * Model: a pixel whose relative intensity is I (1 = the incident beam's peak at the disc plane)
 * expects S = peakCounts·I photo-electron counts above the offset. The recorded value is
 *
 *   counts = round(offset + Poisson(S) + Normal(0, readNoise)),  clipped to [0, min(saturation, 2^bits − 1)]
 *
 * i.e. shot noise (Poisson statistics: variance = mean) plus Gaussian read noise, added independently,
 * so the variance of an unclipped pixel is S + readNoise² (plus 1/12 from rounding to integers).
 *
 * Random numbers: @stdlib/random-base-poisson and @stdlib/random-base-normal, each driven by its own
 * seeded Mersenne Twister (MT19937). Both seeds derive from NoiseSpec.seed, so a seed fixes the frame.
 */
import normal from '@stdlib/random-base-normal';
import poisson from '@stdlib/random-base-poisson';
import type { NoiseSpec } from '../setup/types.ts';

/** Stream tags that keep the shot-noise and read-noise generators independent for one seed. */
const SHOT_STREAM = 0x5bd1e995;
const READ_STREAM = 0x1b873593;

/**
 * MT19937 seed array for one stream: any safe integer seed (negative and zero included) maps to
 * distinct uint32 words [low 32 bits, high bits, sign, stream tag].
 */
function seedWords(seed: number, stream: number): number[] {
  if (!Number.isSafeInteger(seed)) throw new RangeError(`noise seed must be an integer (got ${seed})`);
  const a = Math.abs(seed);
  return [a % 2 ** 32, Math.floor(a / 2 ** 32), seed < 0 ? 1 : 0, stream];
}

/** Largest count a camera can record: min(saturationCounts, 2^bitDepth − 1). */
export function maxCounts(camera: { bitDepth: number; saturationCounts: number }): number {
  const { bitDepth, saturationCounts } = camera;
  if (!Number.isInteger(bitDepth) || bitDepth < 1 || bitDepth > 16) {
    throw new RangeError(`bitDepth must be an integer in 1..16 (got ${bitDepth})`);
  }
  if (!(saturationCounts >= 0)) throw new RangeError(`saturationCounts must be ≥ 0 (got ${saturationCounts})`);
  return Math.floor(Math.min(saturationCounts, 2 ** bitDepth - 1));
}

/**
 * Turn a relative intensity frame into noisy camera counts (see the model above).
 * Negative intensities (round-off from a convolution) count as zero; non-finite values are an error.
 * Reproducible: the same intensity, noise spec and camera give the identical frame.
 */
export function applyCameraNoise(
  intensity: Float64Array,
  noise: NoiseSpec,
  camera: { bitDepth: number; saturationCounts: number },
): Uint16Array {
  const top = maxCounts(camera);
  const { peakCounts, readNoise, offset } = noise;
  if (!(peakCounts >= 0) || !Number.isFinite(peakCounts)) throw new RangeError(`peakCounts must be ≥ 0 (got ${peakCounts})`);
  if (!(readNoise >= 0) || !Number.isFinite(readNoise)) throw new RangeError(`readNoise must be ≥ 0 (got ${readNoise})`);
  if (!Number.isFinite(offset)) throw new RangeError(`offset must be finite (got ${offset})`);

  const shot = poisson.factory({ seed: seedWords(noise.seed, SHOT_STREAM) });
  const read = readNoise > 0 ? normal.factory(0, readNoise, { seed: seedWords(noise.seed, READ_STREAM) }) : null;

  const out = new Uint16Array(intensity.length);
  for (let k = 0; k < intensity.length; k++) {
    const rel = intensity[k];
    if (!Number.isFinite(rel)) throw new RangeError(`intensity at index ${k} is not finite (${rel})`);
    const mean = rel > 0 ? peakCounts * rel : 0;
    // stdlib's Poisson returns NaN for λ = 0; a zero mean gives zero events.
    const events = mean > 0 ? shot(mean) : 0;
    const value = Math.round(offset + events + (read ? read() : 0));
    out[k] = value <= 0 ? 0 : value >= top ? top : value;
  }
  return out;
}

/**
 * Noiseless counts: scaled linearly so the frame maximum maps to 2^bitDepth − 1, rounded to integers.
 * Negative values map to 0; an all-zero (or all-negative) frame stays zero.
 */
export function scaleToCounts(intensity: Float64Array, bitDepth: number): Uint16Array {
  if (!Number.isInteger(bitDepth) || bitDepth < 1 || bitDepth > 16) {
    throw new RangeError(`bitDepth must be an integer in 1..16 (got ${bitDepth})`);
  }
  let peak = 0;
  for (let k = 0; k < intensity.length; k++) {
    const x = intensity[k];
    if (!Number.isFinite(x)) throw new RangeError(`intensity at index ${k} is not finite (${x})`);
    if (x > peak) peak = x;
  }
  const out = new Uint16Array(intensity.length);
  if (peak === 0) return out;
  const full = 2 ** bitDepth - 1;
  const scale = full / peak;
  for (let k = 0; k < intensity.length; k++) {
    const x = intensity[k];
    out[k] = x > 0 ? Math.min(full, Math.round(x * scale)) : 0;
  }
  return out;
}
