/**
 * Camera noise model.
 * Sources: Poisson distribution — mean = variance = λ, P(0) = e^−λ, fourth central moment λ(1 + 3λ)
 * (standard results, e.g. W. Feller, An Introduction to Probability Theory and Its Applications,
 * vol. 1, ch. VI); variances of independent variables add; rounding a smooth distribution to
 * integers adds 1/12 to its variance (Sheppard's correction, W. F. Sheppard 1898); standard normal
 * CDF Φ(0.1) = 0.53983 (Abramowitz & Stegun Table 26.1, from memory; checked with Python's
 * math.erf: 0.5·(1 + erf(0.1/√2)) = 0.539828); an n-bit unsigned integer holds 0 … 2^n − 1.
 * Tolerances are 5 standard errors of the estimator (sample mean: σ/√n; sample variance:
 * √((μ4 − σ⁴)/n); proportion: √(p(1−p)/n)).
 */
import { describe, expect, it } from 'vitest';
import { applyCameraNoise, maxCounts, scaleToCounts } from '../../core/camera/noise.ts';
import type { NoiseSpec } from '../../core/setup/types.ts';

const N = 40000;
const cam16 = { bitDepth: 16, saturationCounts: 65535 };

function stats(x: Uint16Array): { mean: number; variance: number } {
  let s = 0;
  for (const v of x) s += v;
  const mean = s / x.length;
  let q = 0;
  for (const v of x) q += (v - mean) ** 2;
  return { mean, variance: q / (x.length - 1) };
}

function uniform(value: number, n = N): Float64Array {
  return new Float64Array(n).fill(value);
}

describe('applyCameraNoise', () => {
  it('has mean offset + S and variance S + readNoise² + 1/12 (Poisson + Gaussian, Sheppard)', () => {
    const noise: NoiseSpec = { peakCounts: 200, readNoise: 5, offset: 100, seed: 12345 };
    const S = 200 * 0.5;
    const { mean, variance } = stats(applyCameraNoise(uniform(0.5), noise, cam16));
    const v = S + 25 + 1 / 12;
    expect(Math.abs(mean - (100 + S))).toBeLessThan(5 * Math.sqrt(v / N));
    // Near-Gaussian sum: var(s²) ≈ 2σ⁴/(n−1) (plus a small Poisson excess, λ/n).
    expect(Math.abs(variance - v)).toBeLessThan(5 * Math.sqrt((2 * v * v + S) / N));
  });

  it('gives pure Poisson counts without read noise: mean = variance = λ, P(0) = e^−λ', () => {
    const lambda = 3;
    const out = applyCameraNoise(uniform(0.03), { peakCounts: 100, readNoise: 0, offset: 0, seed: 7 }, cam16);
    const { mean, variance } = stats(out);
    expect(Math.abs(mean - lambda)).toBeLessThan(5 * Math.sqrt(lambda / N));
    // Poisson fourth central moment μ4 = λ(1 + 3λ): var(s²) ≈ (λ + 2λ²)/n.
    expect(Math.abs(variance - lambda)).toBeLessThan(5 * Math.sqrt((lambda + 2 * lambda * lambda) / N));
    const p0 = out.filter((v) => v === 0).length / N;
    const e = Math.exp(-lambda);
    expect(Math.abs(p0 - e)).toBeLessThan(5 * Math.sqrt((e * (1 - e)) / N));
  });

  it('gives Gaussian read noise only at zero intensity, clipped at 0 (fraction Φ(0.1) = 0.53983)', () => {
    const far = applyCameraNoise(uniform(0), { peakCounts: 1000, readNoise: 3, offset: 1000, seed: 99 }, cam16);
    const { mean, variance } = stats(far);
    expect(Math.abs(mean - 1000)).toBeLessThan(5 * Math.sqrt(9 / N));
    expect(Math.abs(variance - (9 + 1 / 12))).toBeLessThan(5 * Math.sqrt((2 * 81) / N));
    // offset 0, σ = 5: round(x) ≤ 0 ⇔ x < 0.5, probability Φ(0.5/5) = Φ(0.1) = 0.53983 (A&S Table 26.1).
    const near = applyCameraNoise(uniform(0), { peakCounts: 1000, readNoise: 5, offset: 0, seed: 99 }, cam16);
    const p = near.filter((v) => v === 0).length / N;
    expect(Math.abs(p - 0.53983)).toBeLessThan(5 * Math.sqrt((0.54 * 0.46) / N));
  });

  it('scales with relative intensity: mean counts follow peakCounts·I', () => {
    const I = new Float64Array(2 * N);
    I.fill(0.25, 0, N);
    I.fill(1, N);
    const out = applyCameraNoise(I, { peakCounts: 400, readNoise: 0, offset: 0, seed: 3 }, cam16);
    const a = stats(out.subarray(0, N));
    const b = stats(out.subarray(N));
    expect(Math.abs(a.mean - 100)).toBeLessThan(5 * Math.sqrt(100 / N));
    expect(Math.abs(b.mean - 400)).toBeLessThan(5 * Math.sqrt(400 / N));
  });

  it('clips at saturationCounts and at 2^bitDepth − 1, whichever is lower', () => {
    const hot = uniform(10, 1000);
    const noise: NoiseSpec = { peakCounts: 1000, readNoise: 2, offset: 50, seed: 1 };
    expect(applyCameraNoise(hot, noise, { bitDepth: 12, saturationCounts: 4000 }).every((v) => v === 4000)).toBe(true);
    // An 8-bit camera holds 0 … 255.
    expect(applyCameraNoise(hot, noise, { bitDepth: 8, saturationCounts: 65535 }).every((v) => v === 255)).toBe(true);
    expect(maxCounts({ bitDepth: 12, saturationCounts: 65535 })).toBe(4095);
    // Below saturation nothing is clipped: values spread around the mean.
    const mid = applyCameraNoise(uniform(1, 1000), { ...noise, peakCounts: 2000 }, { bitDepth: 12, saturationCounts: 4000 });
    expect(new Set(mid).size).toBeGreaterThan(20);
    expect(Math.max(...mid)).toBeLessThan(4000);
  });

  it('quantises to integers by rounding (no noise: offset 100.4 → 100, 100.6 → 101)', () => {
    const z = uniform(0, 10);
    expect(Array.from(applyCameraNoise(z, { peakCounts: 0, readNoise: 0, offset: 100.4, seed: 1 }, cam16))).toEqual(
      new Array(10).fill(100),
    );
    expect(Array.from(applyCameraNoise(z, { peakCounts: 0, readNoise: 0, offset: 100.6, seed: 1 }, cam16))).toEqual(
      new Array(10).fill(101),
    );
  });

  it('is reproducible for a seed and changes with the seed', () => {
    const I = Float64Array.from({ length: 5000 }, (_, k) => (k % 100) / 100);
    const noise: NoiseSpec = { peakCounts: 500, readNoise: 4, offset: 20, seed: 2024 };
    const a = applyCameraNoise(I, noise, cam16);
    const b = applyCameraNoise(I, noise, cam16);
    expect(Array.from(b)).toEqual(Array.from(a));
    const c = applyCameraNoise(I, { ...noise, seed: 2025 }, cam16);
    const same = a.filter((v, k) => v === c[k]).length;
    expect(same).toBeLessThan(0.2 * a.length);
    // Zero and negative seeds are valid and distinct.
    const z = applyCameraNoise(I, { ...noise, seed: 0 }, cam16);
    const m = applyCameraNoise(I, { ...noise, seed: -2024 }, cam16);
    expect(z.filter((v, k) => v === a[k]).length).toBeLessThan(0.2 * a.length);
    expect(m.filter((v, k) => v === a[k]).length).toBeLessThan(0.2 * a.length);
    expect(() => applyCameraNoise(I, { ...noise, seed: 1.5 }, cam16)).toThrow(RangeError);
  });

  it('rejects non-finite intensities and invalid settings', () => {
    const noise: NoiseSpec = { peakCounts: 10, readNoise: 1, offset: 0, seed: 1 };
    expect(() => applyCameraNoise(Float64Array.from([0, NaN]), noise, cam16)).toThrow(RangeError);
    expect(() => applyCameraNoise(uniform(0, 2), { ...noise, readNoise: -1 }, cam16)).toThrow(RangeError);
    expect(() => applyCameraNoise(uniform(0, 2), noise, { bitDepth: 17, saturationCounts: 1 })).toThrow(RangeError);
  });
});

describe('scaleToCounts', () => {
  it('maps the maximum to 2^bitDepth − 1 linearly, rounding to integers', () => {
    const c = scaleToCounts(Float64Array.from([0, 0.25, 0.5, 1, 2]), 12);
    // 4095 · x / 2 rounded: 0, 511.875 → 512, 1023.75 → 1024, 2047.5 → 2048, 4095.
    expect(Array.from(c)).toEqual([0, 512, 1024, 2048, 4095]);
    expect(Math.max(...scaleToCounts(Float64Array.from([3e-9, 1e-9]), 16))).toBe(65535);
    expect(Array.from(scaleToCounts(Float64Array.from([1, 1]), 8))).toEqual([255, 255]);
  });

  it('leaves an all-zero frame at zero and clamps negative round-off to 0', () => {
    expect(Array.from(scaleToCounts(new Float64Array(4), 16))).toEqual([0, 0, 0, 0]);
    expect(Array.from(scaleToCounts(Float64Array.from([-1e-18, 1]), 8))).toEqual([0, 255]);
  });
});
