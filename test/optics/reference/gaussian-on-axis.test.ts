/**
 * Check 1: on-axis intensity behind a disc in a collimated, unaberrated Gaussian beam.
 *
 * Closed-form Fresnel integral of a Gaussian outside a disc (physics notes §7; the integral
 * ∫_a^∞ e^{−ρ²(1/w² − ik/2L)} 2πρ dρ is elementary, cf. Goodman, Introduction to Fourier Optics,
 * Fresnel diffraction of a Gaussian):  I(0) = exp(−2a²/w²) / (1 + (L/z_w)²),  z_w = π w² / λ.
 */
import { describe, expect, it } from 'vitest';
import { referenceIntensity } from '../../../core/optics/reference/index.ts';
import { referenceFieldWithInfo } from '../../../core/optics/reference/field.ts';
import { ORIGIN, bench } from './scenes.ts';

function closedForm(a: number, w: number, L: number, lambda: number): number {
  const zw = (Math.PI * w * w) / lambda;
  return Math.exp((-2 * a * a) / (w * w)) / (1 + (L / zw) ** 2);
}

const CASES: { a: number; w: number; L: number; lambda: number }[] = [
  { a: 1.5e-3, w: 4e-3, L: 0.8, lambda: 632.8e-9 },
  { a: 1e-3, w: 2e-3, L: 0.3, lambda: 532e-9 },
  { a: 3e-3, w: 3e-3, L: 2.0, lambda: 1064e-9 },
  { a: 0.5e-3, w: 10e-3, L: 0.1, lambda: 405e-9 },
  // Small beam far away: L/z_w is not small, so the (1 + (L/z_w)²) factor is really tested.
  { a: 0.2e-3, w: 0.5e-3, L: 3.0, lambda: 1550e-9 },
];

describe('on-axis intensity of a Gaussian beam behind a disc (closed form, physics notes §7 / Goodman)', () => {
  for (const c of CASES) {
    it(`a = ${c.a * 1e3} mm, w = ${c.w * 1e3} mm, L = ${c.L} m, λ = ${c.lambda * 1e9} nm`, () => {
      const setup = bench({ discRadiusM: c.a, beamRadiusM: c.w, distanceM: c.L, wavelengthM: c.lambda });
      const I = referenceIntensity(setup, [], ORIGIN, ORIGIN)[0];
      const expected = closedForm(c.a, c.w, c.L, c.lambda);
      expect(Math.abs(I - expected) / expected).toBeLessThan(1e-4);
    });
  }

  it('the trapezoid-grid free beam (the route used for non-separable aberrations) meets the same target', () => {
    for (const c of CASES.slice(0, 3)) {
      const setup = bench({ discRadiusM: c.a, beamRadiusM: c.w, distanceM: c.L, wavelengthM: c.lambda });
      const { field, info } = referenceFieldWithInfo(setup, [], ORIGIN, ORIGIN, { freeBeam: 'numeric' });
      expect(info.freeBeam).toBe('trapezoid');
      const I = field.re[0] ** 2 + field.im[0] ** 2;
      const expected = closedForm(c.a, c.w, c.L, c.lambda);
      expect(Math.abs(I - expected) / expected).toBeLessThan(1e-4);
    }
  });

  it('piston and a pure phase offset do not change the intensity', () => {
    const setup = bench();
    const I = referenceIntensity(setup, [{ j: 0, waves: 0.37 }], ORIGIN, ORIGIN)[0];
    const expected = closedForm(1.5e-3, 4e-3, 0.8, 632.8e-9);
    expect(Math.abs(I - expected) / expected).toBeLessThan(1e-4);
  });
});
