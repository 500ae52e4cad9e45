/**
 * RMS and peak-to-valley.
 * Sources:
 * - Parseval for an orthonormal set (Noll 1976, eq. 3 ff.; Born & Wolf §9.2): RMS² = Σ c_j²; checked
 *   against our own disc quadrature (test/zernike/helpers.ts).
 * - RMS wavefront error excludes piston and tilt (physics notes §5): checked against the RMS of W minus its
 *   least-squares plane a + bx + cy, with 1, x, y orthogonal on the disc (∫x² dA = π/4).
 * - P-V of single terms from the polar forms of ANSI Z80.28: defocus √3(2ρ²−1) spans [−√3, √3] → 2√3|c|;
 *   astigmatism √6ρ²cos2θ spans [−√6, √6]; spherical √5(6ρ⁴−6ρ²+1) spans [−√5/2, √5] → 1.5√5.
 */
import { describe, expect, it } from 'vitest';
import { compileWavefront, peakToValley, rms, type ZernikeCoefficient } from '../../core/zernike/index.ts';
import { discRule, rng } from './helpers.ts';

const u = rng(99);
const COEFFS: ZernikeCoefficient[] = Array.from({ length: 28 }, (_, j) => ({ j, value: 2 * u() - 1 }));
const q = discRule(16, 64);

function quadRms(f: (x: number, y: number) => number): number {
  let s = 0;
  for (let i = 0; i < q.w.length; i++) s += q.w[i]! * f(q.x[i]!, q.y[i]!) ** 2;
  return Math.sqrt(s / Math.PI);
}

describe('rms', () => {
  it('Parseval equals the numerical RMS over the disc', () => {
    const w = compileWavefront(COEFFS);
    expect(rms(COEFFS)).toBeCloseTo(quadRms((x, y) => w.value(x, y)), 12);
    expect(rms(COEFFS)).toBeCloseTo(Math.sqrt(COEFFS.reduce((s, c) => s + c.value ** 2, 0)), 14);
  });

  it('excludePistonTilt equals the RMS about the best-fit plane', () => {
    const w = compileWavefront(COEFFS);
    let a = 0;
    let b = 0;
    let c = 0;
    for (let i = 0; i < q.w.length; i++) {
      const v = w.value(q.x[i]!, q.y[i]!);
      a += q.w[i]! * v;
      b += q.w[i]! * v * q.x[i]!;
      c += q.w[i]! * v * q.y[i]!;
    }
    a /= Math.PI;
    b /= Math.PI / 4;
    c /= Math.PI / 4;
    const ref = quadRms((x, y) => w.value(x, y) - a - b * x - c * y);
    expect(rms(COEFFS, { excludePistonTilt: true })).toBeCloseTo(ref, 12);
    expect(rms(COEFFS, { excludePistonTilt: true })).toBeLessThan(rms(COEFFS));
  });

  it('units carry through; duplicates are summed; empty set is 0', () => {
    expect(rms([{ j: 4, value: 3 }, { j: 12, value: 4 }])).toBeCloseTo(5, 15);
    expect(rms([{ j: 4, value: 1 }, { j: 4, value: 2 }])).toBeCloseTo(3, 15);
    expect(rms([{ j: 1, value: 7 }], { excludePistonTilt: true })).toBe(0);
    expect(rms([])).toBe(0);
    expect(() => rms([{ j: 4, value: Infinity }])).toThrow(RangeError);
  });
});

describe('peakToValley', () => {
  it('pure defocus: P-V = 2√3·|c|', () => {
    expect(peakToValley([{ j: 4, value: 0.37 }])).toBeCloseTo(2 * Math.sqrt(3) * 0.37, 13);
    expect(peakToValley([{ j: 4, value: -0.8 }])).toBeCloseTo(2 * Math.sqrt(3) * 0.8, 13);
  });

  it('astigmatism 2√6·c and primary spherical 1.5√5·c (interior minimum at ρ² = 1/2)', () => {
    expect(peakToValley([{ j: 5, value: 1 }])).toBeCloseTo(2 * Math.sqrt(6), 13);
    expect(peakToValley([{ j: 3, value: 1 }])).toBeCloseTo(2 * Math.sqrt(6), 13);
    expect(peakToValley([{ j: 12, value: 1 }])).toBeCloseTo(1.5 * Math.sqrt(5), 13);
    // The refinement finds the interior ring even from a very coarse grid.
    expect(peakToValley([{ j: 12, value: 1 }], { samples: 4 })).toBeCloseTo(1.5 * Math.sqrt(5), 12);
  });

  it('defocus + spherical against the exact extremes of the quadratic in s = ρ²', () => {
    const [a, b] = [0.3, 0.2];
    const f = (s: number) => Math.sqrt(3) * a * (2 * s - 1) + Math.sqrt(5) * b * (6 * s * s - 6 * s + 1);
    const sStar = (6 * Math.sqrt(5) * b - 2 * Math.sqrt(3) * a) / (12 * Math.sqrt(5) * b);
    const cand = [f(0), f(1), f(sStar)];
    const ref = Math.max(...cand) - Math.min(...cand);
    expect(peakToValley([{ j: 4, value: a }, { j: 12, value: b }])).toBeCloseTo(ref, 12);
  });

  it('excludePistonTilt drops j = 0, 1, 2', () => {
    const c = [
      { j: 0, value: 3 },
      { j: 1, value: 5 },
      { j: 2, value: -3 },
      { j: 4, value: 0.5 },
    ];
    expect(peakToValley(c, { excludePistonTilt: true })).toBeCloseTo(Math.sqrt(3), 13);
    expect(peakToValley(c)).toBeGreaterThan(10);
    expect(peakToValley([{ j: 0, value: 2 }])).toBe(0);
    expect(peakToValley([])).toBe(0);
  });

  it('a general set: at least the dense brute-force maximum range, and very close to it', () => {
    const w = compileWavefront(COEFFS);
    let hi = -Infinity;
    let lo = Infinity;
    const n = 600;
    for (let i = 0; i <= n; i++) {
      const r = i / n;
      const nt = Math.max(1, Math.ceil(2 * Math.PI * i));
      for (let t = 0; t < nt; t++) {
        const v = w.value(r * Math.cos((2 * Math.PI * t) / nt), r * Math.sin((2 * Math.PI * t) / nt));
        hi = Math.max(hi, v);
        lo = Math.min(lo, v);
      }
    }
    const pv = peakToValley(COEFFS);
    expect(pv).toBeGreaterThanOrEqual(hi - lo - 1e-12);
    expect(pv - (hi - lo)).toBeLessThan(1e-4 * (hi - lo));
    // Refinement makes the answer insensitive to the grid.
    expect(peakToValley(COEFFS, { samples: 200 })).toBeCloseTo(pv, 10);
  });

  it.each([1, 0, 2.5, NaN])('rejects samples = %s', (samples) => {
    expect(() => peakToValley([{ j: 4, value: 1 }], { samples })).toThrow(RangeError);
  });
});
