/**
 * Check 3: the near-axis ring pattern, I(r) ≈ I(0)·J₀²(k·a·r/L), and its first dark ring at
 * r₀ = 2.404825557695773·L/(k·a), for collimated and diverging beams (physics notes §2: at this
 * order the central pattern does not depend on the wavefront curvature).
 *
 * J₀ from @stdlib/math-base-special-besselj0 (an independent library); the first zero of J₀,
 * 2.404825557695773, from Abramowitz & Stegun, Table 9.5 (also physics notes §7).
 */
import { describe, expect, it } from 'vitest';
import besselj0 from '@stdlib/math-base-special-besselj0';
import { referenceIntensity } from '../../../core/optics/reference/index.ts';
import { ORIGIN, axis, bench } from './scenes.ts';

const J0_FIRST_ZERO = 2.404825557695773; // Abramowitz & Stegun, Table 9.5

describe('stdlib J₀ agrees with the tabulated values used below', () => {
  it('J₀(1), J₀(2), J₀(5) (physics notes §7, computed independently with scipy) and J₀ at its first zero (A&S Table 9.5)', () => {
    expect(besselj0(1)).toBeCloseTo(0.7651976866, 9);
    expect(besselj0(2)).toBeCloseTo(0.2238907791, 9);
    expect(besselj0(5)).toBeCloseTo(-0.1775967713, 9);
    expect(Math.abs(besselj0(J0_FIRST_ZERO))).toBeLessThan(1e-14);
  });
});

describe('near-axis J₀² law and first dark ring (A&S Table 9.5; physics notes §2)', () => {
  const a = 1.5e-3;
  const L = 0.8;
  const lambda = 632.8e-9;
  const k = (2 * Math.PI) / lambda;
  const r0 = (J0_FIRST_ZERO * L) / (k * a);
  const step = 1e-6;
  const xs = axis(201, 0, step); // 0 … 200 µm along +x

  it('the formula gives 129 µm for a = 1.5 mm, L = 0.8 m, λ = 632.8 nm (physics notes §2)', () => {
    expect(r0 * 1e6).toBeCloseTo(129.17, 2);
  });

  for (const R of [Infinity, 0.5, 2]) {
    it(`R = ${R} m: ring law and first dark ring`, () => {
      const setup = bench({ discRadiusM: a, distanceM: L, wavelengthM: lambda, beamRadiusM: 4e-3, curvatureRadiusM: R });
      const I = referenceIntensity(setup, [], xs, ORIGIN);
      const I0 = I[0];
      // The J₀² law is the leading order of the rim integral; the next order is in |F|/a with
      // F = P·L'/L (the radial integration by parts), so the deviation grows away from the axis
      // and is smaller for diverging beams (L' < L). Measured with this model: inside r₀
      // 2.0e-3 (collimated), 2.9e-4 (R = 0.5 m), 1.0e-3 (R = 2 m) of I(0); out to 200 µm
      // 6.1e-3, 9.0e-4, 3.1e-3.
      for (let i = 0; i < xs.length; i++) {
        const predicted = I0 * besselj0((k * a * xs[i]) / L) ** 2;
        if (xs[i] <= r0) expect(Math.abs(I[i] - predicted) / I0).toBeLessThan(5e-3);
        else expect(Math.abs(I[i] - predicted) / I0).toBeLessThan(2e-2);
      }
      // First local minimum of the sampled cut: within one sample spacing of r₀.
      let iMin = 1;
      while (!(I[iMin] < I[iMin - 1] && I[iMin] <= I[iMin + 1])) iMin++;
      expect(Math.abs(xs[iMin] - r0)).toBeLessThanOrEqual(step);
      // …and it is dark: below 0.5 % of the central peak.
      expect(I[iMin] / I0).toBeLessThan(5e-3);
    });
  }
});
