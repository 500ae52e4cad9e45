/**
 * Finite-source blur: convolution with a uniform disc of unit total weight.
 * Sources: area of a disc πR² and of a circular segment R²·acos(d/R) − d·√(R² − d²) (standard
 * geometry, e.g. CRC Standard Mathematical Tables); a square inscribed in a circle of radius R has
 * area 2R²; convolution with a kernel of unit sum keeps the total (sum) of an image whose support,
 * widened by the kernel, lies inside the frame (definition of discrete convolution); a source of size
 * S at distance G images to S·L/G at distance L (similar triangles, pinhole projection).
 */
import { describe, expect, it } from 'vitest';
import {
  blurMarginPx,
  convolveWithDisc,
  discKernel,
  discRectOverlap,
  sourceImageDiameterM,
} from '../../core/camera/blur.ts';

function sum(a: ArrayLike<number>): number {
  let s = 0;
  for (let k = 0; k < a.length; k++) s += a[k];
  return s;
}

/** Deterministic pseudo-random values (a linear congruential generator, Numerical Recipes constants). */
function lcgImage(n: number, seed = 1): Float64Array {
  let x = seed >>> 0;
  return Float64Array.from({ length: n }, () => {
    x = (Math.imul(x, 1664525) + 1013904223) >>> 0;
    return x / 2 ** 32;
  });
}

describe('discRectOverlap', () => {
  it('matches closed-form areas: whole disc, quarter disc, inscribed square, circular segment', () => {
    expect(discRectOverlap(1, -2, 2, -2, 2)).toBeCloseTo(Math.PI, 14);
    expect(discRectOverlap(2, 0, 5, 0, 5)).toBeCloseTo(Math.PI, 14); // quarter of π·2²
    const a = 1 / Math.SQRT2;
    expect(discRectOverlap(1, -a, a, -a, a)).toBeCloseTo(2, 14); // inscribed square: 2R²
    // Segment beyond the chord y = 0.5 of the unit disc: acos(0.5) − 0.5·√0.75 = π/3 − √3/4.
    expect(discRectOverlap(1, -3, 3, 0.5, 3)).toBeCloseTo(Math.PI / 3 - Math.sqrt(3) / 4, 14);
    expect(discRectOverlap(1, -3, 3, -3, -0.5)).toBeCloseTo(Math.PI / 3 - Math.sqrt(3) / 4, 14);
    expect(discRectOverlap(1, 0.5, 3, -3, 3)).toBeCloseTo(Math.PI / 3 - Math.sqrt(3) / 4, 14);
    // A rectangle whose edge only touches the circle (y0 = R) holds no area.
    expect(discRectOverlap(1, -1, 1, 1, 2)).toBe(0);
  });
});

describe('discKernel and blurMarginPx', () => {
  it('sums to 1, is the identity for diameters ≤ 1 px, and has full-pixel weight 1/(πR²)', () => {
    for (const d of [0, 0.3, 1]) {
      const k = discKernel(d);
      expect(k.sizePx).toBe(1);
      expect(k.weights[0]).toBe(1);
    }
    for (const d of [1.5, 2.5, 6, 17.3]) {
      const k = discKernel(d);
      expect(sum(k.weights)).toBeCloseTo(1, 13);
      // The centre pixel lies wholly inside the disc once R ≥ √2/2, so its weight is 1/area.
      expect(1 / Math.max(...k.weights)).toBeCloseTo((Math.PI * d * d) / 4, 9);
    }
  });

  it('grows continuously with the diameter (no jumps as pixels enter the support)', () => {
    const w = (d: number) => discKernel(d).weights[discKernel(d).halfWidthPx * (discKernel(d).sizePx + 1)];
    expect(w(1 + 1e-9)).toBeCloseTo(1, 6);
    expect(Math.abs(w(3 + 1e-9) - w(3))).toBeLessThan(1e-6);
  });

  it('gives the half-width of the support as the margin', () => {
    expect(blurMarginPx(0)).toBe(0);
    expect(blurMarginPx(1)).toBe(0);
    expect(blurMarginPx(1.01)).toBe(1);
    expect(blurMarginPx(3)).toBe(1); // R = 1.5 only touches the pixel at offset 2
    expect(blurMarginPx(3.01)).toBe(2);
    for (const d of [2.2, 5, 9.9]) {
      const k = discKernel(d);
      const hw = blurMarginPx(d);
      // Outermost column of the kernel carries weight, nothing lies beyond it.
      expect(k.weights[hw * k.sizePx + 2 * hw]).toBeGreaterThan(0);
      expect(k.sizePx).toBe(2 * hw + 1);
    }
  });
});

describe('convolveWithDisc', () => {
  it('keeps the total power when the content stays away from the borders (within 1e-9)', () => {
    const w = 96;
    const h = 80;
    for (const d of [2.7, 8, 23.5]) {
      const m = blurMarginPx(d);
      const img = lcgImage(w * h, 5);
      for (let r = 0; r < h; r++) for (let c = 0; c < w; c++) if (r < m || r >= h - m || c < m || c >= w - m) img[r * w + c] = 0;
      for (const method of ['direct', 'fft'] as const) {
        const out = convolveWithDisc(img, w, h, d, method);
        expect(Math.abs(sum(out) - sum(img)) / sum(img)).toBeLessThan(1e-9);
      }
    }
  });

  it('spreads a single bright pixel into a disc of area πD²/4', () => {
    const w = 64;
    const D = 20;
    const img = new Float64Array(w * w);
    img[32 * w + 32] = 1;
    const out = convolveWithDisc(img, w, w, D);
    const peak = Math.max(...out);
    // Fully covered pixels all carry the peak value; fractional pixels their covered share.
    expect(sum(out) / peak).toBeCloseTo((Math.PI * D * D) / 4, 6);
    // Pixels at more than half the peak: the disc's area within a few per cent.
    const count = out.filter((v) => v > 0.5 * peak).length;
    expect(Math.abs(count / ((Math.PI * D * D) / 4) - 1)).toBeLessThan(0.03);
    // Round: no value beyond the radius (plus a pixel's half-diagonal).
    for (let r = 0; r < w; r++)
      for (let c = 0; c < w; c++) if (Math.hypot(r - 32, c - 32) > D / 2 + Math.SQRT1_2) expect(out[r * w + c]).toBe(0);
  });

  it('leaves a uniform image uniform away from the edges', () => {
    const w = 50;
    const h = 40;
    const D = 7.4;
    const m = blurMarginPx(D);
    const out = convolveWithDisc(new Float64Array(w * h).fill(3), w, h, D, 'fft');
    for (let r = m; r < h - m; r++) for (let c = m; c < w - m; c++) expect(out[r * w + c]).toBeCloseTo(3, 12);
    // Zero padding outside: the corner sees only part of the disc.
    expect(out[0]).toBeLessThan(3 * 0.5);
  });

  it('gives the same result by the direct and the FFT paths', () => {
    const w = 45;
    const h = 33;
    const img = lcgImage(w * h, 9);
    for (const d of [1.6, 5.5, 12]) {
      const a = convolveWithDisc(img, w, h, d, 'direct');
      const b = convolveWithDisc(img, w, h, d, 'fft');
      let e = 0;
      for (let k = 0; k < a.length; k++) e = Math.max(e, Math.abs(a[k] - b[k]));
      expect(e).toBeLessThan(1e-12);
    }
  });

  it('returns a copy for diameter 0 and refuses bad input', () => {
    const img = lcgImage(12);
    const out = convolveWithDisc(img, 4, 3, 0);
    expect(out).not.toBe(img);
    expect(Array.from(out)).toEqual(Array.from(img));
    expect(() => convolveWithDisc(img, 4, 4, 2)).toThrow(RangeError);
    expect(() => convolveWithDisc(img, 4, 3, -1)).toThrow(RangeError);
    expect(() => convolveWithDisc(img, 4, 3, NaN)).toThrow(RangeError);
    expect(() => convolveWithDisc(Float64Array.from([0, NaN, 0, 0]), 2, 2, 3)).toThrow(RangeError);
  });
});

describe('sourceImageDiameterM', () => {
  it('is S·L/G (similar triangles)', () => {
    expect(sourceImageDiameterM(50e-6, 0.2, 0.5)).toBeCloseTo(125e-6, 18);
    expect(sourceImageDiameterM(0, 0.2, 0.5)).toBe(0);
    expect(sourceImageDiameterM(1e-3, Infinity, 0.5)).toBe(0);
  });
});
