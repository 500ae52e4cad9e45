/** Gauss–Legendre rules used by the reference model. */
import { describe, expect, it } from 'vitest';
import { gaussLegendreHalf, glNodeCount, ladder } from '../../../core/optics/reference/gauss-legendre.ts';

describe('Gauss–Legendre rules', () => {
  it('4-point rule matches Abramowitz & Stegun Table 25.4 (from memory)', () => {
    const r = gaussLegendreHalf(4);
    expect(r.t[0]).toBeCloseTo(0.339981043584856, 14);
    expect(r.t[1]).toBeCloseTo(0.861136311594053, 14);
    expect(r.w[0]).toBeCloseTo(0.652145154862546, 14);
    expect(r.w[1]).toBeCloseTo(0.347854845137454, 14);
  });

  it('n-point rule integrates x^(2n−2) exactly (∫_{−1}^{1} x^{2m} dx = 2/(2m+1)); weights sum to 2 up to n = 2000', () => {
    for (const n of [2, 6, 10, 40, 200]) {
      const r = gaussLegendreHalf(n);
      let s = 0;
      for (let i = 0; i < r.t.length; i++) s += 2 * r.w[i] * r.t[i] ** (2 * n - 2);
      expect(Math.abs(s - 2 / (2 * n - 1))).toBeLessThan(1e-13);
    }
    for (const n of [200, 2000]) {
      const r = gaussLegendreHalf(n);
      let s = 0;
      for (let i = 0; i < r.t.length; i++) s += 2 * r.w[i];
      expect(Math.abs(s - 2)).toBeLessThan(1e-13);
    }
  });

  it('glNodeCount integrates e^{iΩt} to ~1e-11 (∫_{−1}^{1} cos Ωt dt = 2 sin Ω / Ω)', () => {
    for (const omega of [3, 30, 300, 3000]) {
      const n = glNodeCount(omega, 'normal');
      const r = gaussLegendreHalf(n);
      let s = 0;
      for (let i = 0; i < r.t.length; i++) s += 2 * r.w[i] * Math.cos(omega * r.t[i]);
      expect(Math.abs(s - (2 * Math.sin(omega)) / omega)).toBeLessThan(1e-10);
      // …and the count is not wasteful: a rule 15 % smaller fails by orders of magnitude.
      const small = gaussLegendreHalf(Math.max(2, 2 * Math.floor((0.85 * (omega / 2)) / 2)));
      let s2 = 0;
      for (let i = 0; i < small.t.length; i++) s2 += 2 * small.w[i] * Math.cos(omega * small.t[i]);
      if (omega >= 30) expect(Math.abs(s2 - (2 * Math.sin(omega)) / omega)).toBeGreaterThan(1e-6);
    }
  });

  it('ladder sizes are even and not smaller than asked', () => {
    for (let n = 1; n < 3000; n += 7) {
      const s = ladder(n);
      expect(s % 2).toBe(0);
      expect(s).toBeGreaterThanOrEqual(n);
      expect(s).toBeLessThan(1.07 * n + 6);
    }
  });
});
