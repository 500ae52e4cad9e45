/**
 * Least-squares fitting. Reference: exact recovery of known coefficients from noiseless samples (the model
 * is exact, so any consistent least-squares solver must return them), and the orthonormal projection
 * c_j = (1/π)∫W Z_j dA (Noll 1976 eq. 4) on our own quadrature for noisy data on a symmetric rule.
 */
import { describe, expect, it } from 'vitest';
import { compileWavefront, fitCoefficients, zernikeXY } from '../../core/zernike/index.ts';
import { randomDiscPoints, rng } from './helpers.ts';

describe('fitCoefficients', () => {
  const u = rng(5);
  const js = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 12, 14, 20, 24, 33, 40, 44];
  const truth = js.map((j) => ({ j, value: 2 * u() - 1 }));
  const w = compileWavefront(truth);

  it('recovers exact coefficients from random samples, in the order of jList', () => {
    const pts = randomDiscPoints(400, 17);
    const xs = pts.map((p) => p[0]);
    const ys = pts.map((p) => p[1]);
    const vals = pts.map(([x, y]) => w.value(x, y));
    const order = [...js].reverse();
    const fit = fitCoefficients(order, xs, ys, vals);
    expect(fit.map((t) => t.j)).toEqual(order);
    for (const t of fit) expect(t.value).toBeCloseTo(truth.find((c) => c.j === t.j)!.value, 11);
  });

  it('works with samples on a sub-disc (worse conditioned) and outside the unit disc', () => {
    for (const radius of [0.5, 1.3]) {
      const pts = randomDiscPoints(600, 31, radius);
      const fit = fitCoefficients(js, pts.map((p) => p[0]), pts.map((p) => p[1]), pts.map(([x, y]) => w.value(x, y)));
      for (const t of fit) expect(t.value).toBeCloseTo(truth.find((c) => c.j === t.j)!.value, 8);
    }
  });

  it('with noisy samples, equals the normal-equation solution (Gaussian elimination written here)', () => {
    const pts = randomDiscPoints(300, 44);
    const noise = rng(8);
    const xs = pts.map((p) => p[0]);
    const ys = pts.map((p) => p[1]);
    const vals = pts.map(([x, y]) => w.value(x, y) + 0.05 * (noise() - 0.5));
    const fitJs = Array.from({ length: 15 }, (_, j) => j); // truncated model: j = 24, 40 are in the data only
    const fit = fitCoefficients(fitJs, xs, ys, vals);
    // Normal equations AᵀA c = Aᵀb, solved by Gaussian elimination with partial pivoting.
    const J = fitJs.length;
    const M = Array.from({ length: J }, () => new Array<number>(J + 1).fill(0));
    for (let i = 0; i < pts.length; i++) {
      const a = fitJs.map((j) => zernikeXY(j, xs[i]!, ys[i]!));
      for (let r = 0; r < J; r++) {
        for (let c = 0; c < J; c++) M[r]![c]! += a[r]! * a[c]!;
        M[r]![J]! += a[r]! * vals[i]!;
      }
    }
    for (let k = 0; k < J; k++) {
      let piv = k;
      for (let r = k + 1; r < J; r++) if (Math.abs(M[r]![k]!) > Math.abs(M[piv]![k]!)) piv = r;
      [M[k], M[piv]] = [M[piv]!, M[k]!];
      for (let r = k + 1; r < J; r++) {
        const f = M[r]![k]! / M[k]![k]!;
        for (let c = k; c <= J; c++) M[r]![c]! -= f * M[k]![c]!;
      }
    }
    const sol = new Array<number>(J).fill(0);
    for (let k = J - 1; k >= 0; k--) {
      let s = M[k]![J]!;
      for (let c = k + 1; c < J; c++) s -= M[k]![c]! * sol[c]!;
      sol[k] = s / M[k]![k]!;
    }
    fit.forEach((t, k) => expect(t.value).toBeCloseTo(sol[k]!, 10));
  });

  it('throws on rank deficiency, repeated or invalid indices, and bad arrays', () => {
    expect(() => fitCoefficients([0, 4, 12], [0, 0.5], [0, 0], [1, 2])).toThrow(RangeError); // 2 samples, 3 terms
    expect(() => fitCoefficients([0, 4], [0.5, 0, -0.5], [0, 0.5, 0], [1, 1, 1])).toThrow(RangeError); // all at ρ = 0.5: Z4 ∝ Z0
    expect(() => fitCoefficients([4, 4], [0, 1], [0, 0], [1, 2])).toThrow(RangeError);
    expect(() => fitCoefficients([-1], [0], [0], [1])).toThrow(RangeError);
    expect(() => fitCoefficients([0], [0, 1], [0], [1])).toThrow(RangeError);
    expect(() => fitCoefficients([0], [0], [0], [NaN])).toThrow(RangeError);
    expect(fitCoefficients([], [0], [0], [1])).toEqual([]);
  });
});
