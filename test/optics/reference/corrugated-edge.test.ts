/**
 * Check 5: a sinusoidally corrugated rim, r(θ) = a + δ·cos(nθ − φ) with many periods (n = 40).
 * Physics notes §2 derives (rim-phase argument; derived there, NOT from a published source) that
 * the on-axis intensity falls to J₀²(π·δ/Δr) of the smooth disc's, with Δr = λL'/(2a).
 * J₀ from @stdlib/math-base-special-besselj0.
 */
import { describe, expect, it } from 'vitest';
import besselj0 from '@stdlib/math-base-special-besselj0';
import { referenceIntensity } from '../../../core/optics/reference/index.ts';
import { ORIGIN, bench } from './scenes.ts';

describe('corrugated rim: on-axis ratio J₀²(πδ/Δr) (physics notes §2, derived there, no published source)', () => {
  const a = 1.5e-3;
  const L = 0.8;
  const lambda = 632.8e-9;
  const w = 20e-3; // broad beam: the amplitude change across the corrugation is negligible

  for (const R of [Infinity, 2]) {
    const Lp = 1 / (1 / L + 1 / R);
    const dr = (lambda * Lp) / (2 * a);
    const smooth = referenceIntensity(bench({ discRadiusM: a, distanceM: L, wavelengthM: lambda, beamRadiusM: w, curvatureRadiusM: R }), [], ORIGIN, ORIGIN)[0];
    for (const f of [0.1, 0.3, 0.5]) {
      it(`R = ${R} m, δ = ${f}·Δr (Δr = ${(dr * 1e6).toFixed(1)} µm)`, () => {
        const setup = bench({
          discRadiusM: a,
          distanceM: L,
          wavelengthM: lambda,
          beamRadiusM: w,
          curvatureRadiusM: R,
          edgeHarmonics: [{ order: 40, amplitudeM: f * dr, phaseRad: 0.2 }],
        });
        const I = referenceIntensity(setup, [], ORIGIN, ORIGIN)[0];
        const ratio = I / smooth;
        // The δ² term of the rim phase enters only at second order (measured |error| ≤ 2.1e-5).
        expect(Math.abs(ratio - besselj0((Math.PI * f * dr) / dr) ** 2)).toBeLessThan(1e-3);
      });
    }
  }

  it('check values quoted in physics notes §2: 0.95 at 0.1Δr, 0.22 at 0.5Δr, 0.09 at Δr (stdlib J₀)', () => {
    expect(besselj0(Math.PI * 0.1) ** 2).toBeCloseTo(0.95, 2);
    expect(besselj0(Math.PI * 0.5) ** 2).toBeCloseTo(0.22, 2);
    expect(besselj0(Math.PI * 1.0) ** 2).toBeCloseTo(0.09, 2);
    // The notes' "0 at 0.766·Δr" is J₀'s first zero (A&S Table 9.5) over π = 0.76548 (0.765 when
    // rounded to three places).
    expect(2.404825557695773 / Math.PI).toBeCloseTo(0.7655, 4);
  });

  it('rule of thumb: δ ≤ 0.1·Δr keeps ≥ 90 % of the ideal spot (common practice, no published source)', () => {
    const dr = (lambda * L) / (2 * a);
    const smooth = referenceIntensity(bench({ discRadiusM: a, beamRadiusM: w }), [], ORIGIN, ORIGIN)[0];
    for (const f of [0.05, 0.1]) {
      const I = referenceIntensity(bench({ discRadiusM: a, beamRadiusM: w, edgeHarmonics: [{ order: 40, amplitudeM: f * dr, phaseRad: 0 }] }), [], ORIGIN, ORIGIN)[0];
      expect(I / smooth).toBeGreaterThanOrEqual(0.9);
    }
    // …and it is a real threshold: at 0.3·Δr the spot has lost more than a third.
    const I3 = referenceIntensity(bench({ discRadiusM: a, beamRadiusM: w, edgeHarmonics: [{ order: 40, amplitudeM: 0.3 * dr, phaseRad: 0 }] }), [], ORIGIN, ORIGIN)[0];
    expect(I3 / smooth).toBeLessThan(0.67);
  });
});
