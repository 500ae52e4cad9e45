/**
 * Check 2: the Arago (Poisson) spot in the plane-wave limit.
 *
 * In the Fresnel approximation a plane wave gives, on the axis behind an opaque disc, exactly the
 * incident intensity (Born & Wolf, Principles of Optics, §8.3; Goodman, Introduction to Fourier
 * Optics). The exact Rayleigh–Sommerfeld on-axis value is I/I₀ = L²/(L² + a²) (Osterberg & Smith,
 * J. Opt. Soc. Am. 51, 1050 (1961), closed axial solutions for obstacles), which tends to the same
 * limit when a ≪ L. A beam with w = 40·a stands in for the plane wave; I₀ is the incident
 * intensity at the rim, exp(−2a²/w²).
 */
import { describe, expect, it } from 'vitest';
import { referenceIntensity } from '../../../core/optics/reference/index.ts';
import { ORIGIN, bench } from './scenes.ts';

const CASES: { a: number; L: number; lambda: number }[] = [
  { a: 1.5e-3, L: 0.8, lambda: 632.8e-9 },
  { a: 1e-3, L: 1.0, lambda: 532e-9 },
  { a: 3e-3, L: 0.5, lambda: 1064e-9 },
];

describe('Arago spot, plane-wave limit (Born & Wolf §8.3; Osterberg & Smith 1961)', () => {
  for (const c of CASES) {
    it(`a = ${c.a * 1e3} mm, L = ${c.L} m, λ = ${c.lambda * 1e9} nm, w = 40 a`, () => {
      const w = 40 * c.a;
      const setup = bench({ discRadiusM: c.a, beamRadiusM: w, distanceM: c.L, wavelengthM: c.lambda });
      const I = referenceIntensity(setup, [], ORIGIN, ORIGIN)[0];
      const Irim = Math.exp((-2 * c.a * c.a) / (w * w));
      const ratio = I / Irim;
      // Fresnel (Born & Wolf §8.3): the spot is as bright as the incident light.
      expect(Math.abs(ratio - 1)).toBeLessThan(1e-3);
      // Exact Rayleigh–Sommerfeld (Osterberg & Smith 1961); a/L ≤ 6e-3 here, so L²/(L²+a²) > 0.99996.
      const rs = (c.L * c.L) / (c.L * c.L + c.a * c.a);
      expect(Math.abs(ratio - rs)).toBeLessThan(1e-3);
    });
  }
});
