/**
 * Analytic derivatives against central finite differences (standard second-order central differences,
 * e.g. Abramowitz & Stegun 25.3.21 and 25.3.23), and the compiled evaluator against term-by-term sums.
 * Rim slope reference: R_n^m'(1) = [n(n+2) − m²]/2 (/work/shared/notes/physics.md §3).
 */
import { describe, expect, it } from 'vitest';
import {
  ansiToNM,
  compileWavefront,
  evaluateGrid,
  zernikeDerivativesXY,
  zernikeNormalization,
  zernikeXY,
  type ZernikeCoefficient,
  type ZernikeDerivatives,
} from '../../core/zernike/index.ts';
import { randomDiscPoints, rng } from './helpers.ts';

const PTS: Array<[number, number]> = [
  [0, 0],
  [0.5, 0],
  [0, -0.5],
  [1, 0],
  [0, 1],
  [-0.7071, 0.7071],
  [1e-9, -2e-9],
  [1.3, 0.4], // outside the disc: polynomials are evaluated there too
  ...randomDiscPoints(25, 5),
];

function rel(a: number, b: number, scale: number): number {
  return Math.abs(a - b) / (1 + scale);
}

describe('zernikeDerivativesXY vs central differences, j ≤ 44 (n ≤ 8)', () => {
  it('value equals zernikeXY; first derivatives match differences of values', () => {
    const h = 1e-5;
    for (let j = 0; j <= 44; j++) {
      for (const [x, y] of PTS) {
        const d = zernikeDerivativesXY(j, x, y);
        const scale = Math.abs(d.dx) + Math.abs(d.dy) + Math.abs(d.value);
        expect(d.value).toBeCloseTo(zernikeXY(j, x, y), 12);
        const fdx = (zernikeXY(j, x + h, y) - zernikeXY(j, x - h, y)) / (2 * h);
        const fdy = (zernikeXY(j, x, y + h) - zernikeXY(j, x, y - h)) / (2 * h);
        expect(rel(d.dx, fdx, scale)).toBeLessThan(1e-7);
        expect(rel(d.dy, fdy, scale)).toBeLessThan(1e-7);
      }
    }
  });

  it('second derivatives match differences of the analytic first derivatives and of values', () => {
    const h = 1e-5;
    const h2 = 1e-4;
    for (let j = 0; j <= 44; j++) {
      for (const [x, y] of PTS) {
        const d = zernikeDerivativesXY(j, x, y);
        const px = zernikeDerivativesXY(j, x + h, y);
        const mx = zernikeDerivativesXY(j, x - h, y);
        const py = zernikeDerivativesXY(j, x, y + h);
        const my = zernikeDerivativesXY(j, x, y - h);
        const scale = Math.abs(d.dxx) + Math.abs(d.dyy) + Math.abs(d.dxy) + Math.abs(d.value);
        expect(rel(d.dxx, (px.dx - mx.dx) / (2 * h), scale)).toBeLessThan(1e-7);
        expect(rel(d.dyy, (py.dy - my.dy) / (2 * h), scale)).toBeLessThan(1e-7);
        expect(rel(d.dxy, (py.dx - my.dx) / (2 * h), scale)).toBeLessThan(1e-7);
        expect(rel(d.dxy, (px.dy - mx.dy) / (2 * h), scale)).toBeLessThan(1e-7);
        // From values only (A&S 25.3.23 and the 4-point mixed difference).
        const f = (a: number, b: number) => zernikeXY(j, a, b);
        const fxx = (f(x + h2, y) - 2 * f(x, y) + f(x - h2, y)) / (h2 * h2);
        const fyy = (f(x, y + h2) - 2 * f(x, y) + f(x, y - h2)) / (h2 * h2);
        const fxy = (f(x + h2, y + h2) - f(x + h2, y - h2) - f(x - h2, y + h2) + f(x - h2, y - h2)) / (4 * h2 * h2);
        expect(rel(d.dxx, fxx, scale)).toBeLessThan(1e-5);
        expect(rel(d.dyy, fyy, scale)).toBeLessThan(1e-5);
        expect(rel(d.dxy, fxy, scale)).toBeLessThan(1e-5);
      }
    }
  });

  it('known closed forms: ∇Z4 = 4√3 (x, y), ∇²Z4 = 8√3; coma Z8 = √8(3x³ + 3xy² − 2x)', () => {
    const d = zernikeDerivativesXY(4, 0.3, -0.2);
    expect(d.dx).toBeCloseTo(4 * Math.sqrt(3) * 0.3, 14);
    expect(d.dy).toBeCloseTo(4 * Math.sqrt(3) * -0.2, 14);
    expect(d.dxx + d.dyy).toBeCloseTo(8 * Math.sqrt(3), 13);
    expect(d.dxy).toBeCloseTo(0, 14);
    const [x, y] = [0.4, 0.25];
    const c = zernikeDerivativesXY(8, x, y);
    const r8 = Math.sqrt(8);
    expect(c.dx).toBeCloseTo(r8 * (9 * x * x + 3 * y * y - 2), 13);
    expect(c.dy).toBeCloseTo(r8 * 6 * x * y, 13);
    expect(c.dxx).toBeCloseTo(r8 * 18 * x, 13);
    expect(c.dxy).toBeCloseTo(r8 * 6 * y, 13);
    expect(c.dyy).toBeCloseTo(r8 * 6 * x, 13);
  });

  it('rim radial slope of cos terms is N·[n(n+2) − m²]/2 (physics notes §3)', () => {
    for (let j = 0; j <= 65; j++) {
      const { n, m } = ansiToNM(j);
      if (m < 0) continue;
      const d = zernikeDerivativesXY(j, 1, 0); // radial direction is +x at θ = 0
      expect(d.dx).toBeCloseTo((zernikeNormalization(n, m) * (n * (n + 2) - m * m)) / 2, 9);
    }
  });

  it('fills and returns a caller-supplied object', () => {
    const out: ZernikeDerivatives = { value: 9, dx: 9, dy: 9, dxx: 9, dxy: 9, dyy: 9 };
    expect(zernikeDerivativesXY(0, 0.2, 0.3, out)).toBe(out);
    expect(out).toEqual({ value: 1, dx: 0, dy: 0, dxx: 0, dxy: 0, dyy: 0 });
  });
});

describe('compileWavefront and evaluateGrid', () => {
  const u = rng(21);
  const coeffs: ZernikeCoefficient[] = Array.from({ length: 45 }, (_, j) => ({ j, value: u() - 0.5 }));

  it('evaluate() equals the sum of zernikeDerivativesXY over the terms; value() equals evaluate().value', () => {
    const w = compileWavefront(coeffs);
    const out: ZernikeDerivatives = { value: 0, dx: 0, dy: 0, dxx: 0, dxy: 0, dyy: 0 };
    for (const [x, y] of PTS) {
      const ref = { value: 0, dx: 0, dy: 0, dxx: 0, dxy: 0, dyy: 0 };
      for (const c of coeffs) {
        const d = zernikeDerivativesXY(c.j, x, y);
        for (const k of Object.keys(ref) as Array<keyof ZernikeDerivatives>) ref[k] += c.value * d[k];
      }
      expect(w.evaluate(x, y, out)).toBe(out);
      for (const k of Object.keys(ref) as Array<keyof ZernikeDerivatives>) {
        expect(out[k]).toBeCloseTo(ref[k], 9);
      }
      expect(w.value(x, y)).toBeCloseTo(out.value, 12);
    }
  });

  it('sums duplicate indices and ignores order', () => {
    const a = compileWavefront([{ j: 4, value: 0.25 }, { j: 12, value: 1 }, { j: 4, value: 0.75 }]);
    const b = compileWavefront([{ j: 12, value: 1 }, { j: 4, value: 1 }]);
    expect(a.value(0.3, 0.6)).toBeCloseTo(b.value(0.3, 0.6), 15);
  });

  it('an empty set evaluates to zero', () => {
    const w = compileWavefront([]);
    expect(w.value(0.2, 0.1)).toBe(0);
  });

  it('rejects invalid coefficients', () => {
    expect(() => compileWavefront([{ j: -1, value: 1 }])).toThrow(RangeError);
    expect(() => compileWavefront([{ j: 2.5, value: 1 }])).toThrow(RangeError);
    expect(() => compileWavefront([{ j: 3, value: NaN }])).toThrow(RangeError);
  });

  it('evaluateGrid is row-major with the row index over ys', () => {
    const xs = [-0.5, 0, 0.25, 0.9];
    const ys = new Float64Array([0.8, 0.1, -0.6]);
    const grid = evaluateGrid(coeffs, xs, ys);
    const w = compileWavefront(coeffs);
    expect(grid.length).toBe(12);
    for (let iy = 0; iy < ys.length; iy++) {
      for (let ix = 0; ix < xs.length; ix++) {
        expect(grid[iy * xs.length + ix]).toBe(w.value(xs[ix]!, ys[iy]!));
      }
    }
    // Tilt y = 2y makes the orientation visible.
    const tilt = evaluateGrid([{ j: 1, value: 1 }], [0], [1, -1]);
    expect(Array.from(tilt)).toEqual([2, -2]);
  });
});
