/**
 * Analytic figures of a bench candidate (core/plan/figures.ts) and the Bessel function J₀ (core/math/bessel.ts).
 *
 * Sources of the checks:
 * - hand calculations from the physics notes (../shared/notes/physics.md §1–2): 1/L' = 1/L + 1/R, M = L/L',
 *   N_F = a²/(λL'), Δr = λL'/(2a) with its worked example (λ = 532 nm, point source 2 m before a 3 mm disc,
 *   camera 0.8 m after it: L' = 0.571 m, Δr ≈ 101 µm), r₀ = 2.405·L/(k·a) with its worked value (a = 1.5 mm,
 *   L = 0.8 m, λ = 632.8 nm: 129 µm; an independent reference simulation put it at 127.5 µm), the source blur S·L/G;
 * - zeros of J₀ and J₁: Abramowitz & Stegun, Table 9.5 (as listed in the physics notes §7);
 * - J₀ values: @stdlib/math-base-special-besselj0 (an independent library), and the notes' §7 values;
 * - J₁ (to find its zeros independently): @stdlib/math-base-special-besselj1;
 * - J₀²(π·δ/Δr) check values 0.95, 0.22, 0 and 0.09 at δ/Δr = 0.1, 0.5, 0.766, 1 (physics notes §2);
 * - the 10 % rim tolerance: common practice, no published source.
 */
import besselj0 from '@stdlib/math-base-special-besselj0';
import besselj1 from '@stdlib/math-base-special-besselj1';
import { describe, expect, it } from 'vitest';
import { besselJ0 } from '../../core/math/bessel.ts';
import { benchFigures, besselJ1Zero, roughnessIntensityRatio } from '../../core/plan/figures.ts';
import type { BenchSetup } from '../../core/setup/types.ts';

function setupOf(over: { wavelengthM?: number; curvatureRadiusM?: number; discRadiusM?: number; distanceM?: number; pitchM?: number; sensorPx?: [number, number] | null; sourceM?: number }): BenchSetup {
  return {
    wavelengthM: over.wavelengthM ?? 632.8e-9,
    beam: { radiusM: 4e-3, centerM: [0, 0], curvatureRadiusM: over.curvatureRadiusM ?? Infinity },
    disc: { radiusM: over.discRadiusM ?? 1.5e-3, ellipticity: 0, ellipseAngleRad: 0, edgeHarmonics: [] },
    camera: {
      distanceM: over.distanceM ?? 0.8,
      pixelPitchM: over.pitchM ?? 5e-6,
      bitDepth: 12,
      saturationCounts: 4095,
      orientation: { flipX: false, flipY: false, rotateDeg: 0 },
      sensorPx: over.sensorPx === undefined ? [1280, 1024] : over.sensorPx,
    },
    zernikeRadiusM: 4e-3,
    source: { sizeM: over.sourceM ?? 0 },
  };
}

/** Zeros of J₁ found by bisection on @stdlib's besselj1, independent of the table in core. */
function stdlibJ1Zeros(count: number): number[] {
  const zeros: number[] = [];
  let x = 0.5;
  const dx = 0.01;
  while (zeros.length < count) {
    if (Math.sign(besselj1(x)) !== Math.sign(besselj1(x + dx))) {
      let lo = x;
      let hi = x + dx;
      for (let i = 0; i < 60; i++) {
        const mid = 0.5 * (lo + hi);
        if (Math.sign(besselj1(mid)) === Math.sign(besselj1(lo))) lo = mid;
        else hi = mid;
      }
      zeros.push(0.5 * (lo + hi));
    }
    x += dx;
  }
  return zeros;
}

describe('J₀ (core/math/bessel.ts)', () => {
  it('matches @stdlib besselj0 to 1e-14 from 0 to 200 and to 1e-12 far out', () => {
    let worst = 0;
    for (let i = 0; i <= 20000; i++) {
      const x = i * 0.01;
      worst = Math.max(worst, Math.abs(besselJ0(x) - besselj0(x)), Math.abs(besselJ0(-x) - besselj0(x)));
    }
    expect(worst).toBeLessThan(1e-14);
    for (const x of [300.5, 1234.5, 1e5]) expect(Math.abs(besselJ0(x) - besselj0(x))).toBeLessThan(1e-12);
  });

  it('gives the physics notes §7 values and the zeros of A&S Table 9.5', () => {
    expect(besselJ0(1)).toBeCloseTo(0.7651976866, 10);
    expect(besselJ0(2)).toBeCloseTo(0.2238907791, 10);
    expect(besselJ0(5)).toBeCloseTo(-0.1775967713, 10);
    for (const z of [2.4048255577, 5.5200781103, 8.6537279129]) expect(Math.abs(besselJ0(z))).toBeLessThan(1e-10);
    expect(besselJ0(0)).toBe(1);
  });
});

describe('zeros of J₁ (bright rings of J₀²)', () => {
  it('match A&S Table 9.5 and @stdlib besselj1 by bisection to 1e-6 for the first 40', () => {
    expect(besselJ1Zero(1)).toBeCloseTo(3.8317059702, 9);
    expect(besselJ1Zero(2)).toBeCloseTo(7.0155866698, 9);
    const ref = stdlibJ1Zeros(40);
    ref.forEach((z, i) => expect(Math.abs(besselJ1Zero(i + 1) - z)).toBeLessThan(1e-6));
  });
});

describe('benchFigures', () => {
  it("gives the physics notes' worked example: λ = 532 nm, G = 2 m, 3 mm disc, L = 0.8 m → L' = 0.571 m, Δr ≈ 101 µm", () => {
    const f = benchFigures(setupOf({ wavelengthM: 532e-9, curvatureRadiusM: 2, discRadiusM: 1.5e-3, distanceM: 0.8 }));
    // Hand calculation: L' = L·R/(R + L) = 0.8·2/2.8; M = (R + L)/R = 1.4; Δr = λL'/(2a); N_F = a²/(λL').
    const lp = (0.8 * 2) / 2.8;
    expect(f.effectiveDistanceM).toBeCloseTo(lp, 12);
    expect(f.effectiveDistanceM).toBeCloseTo(0.571, 3);
    expect(f.magnification).toBeCloseTo(1.4, 12);
    expect(f.zoneWidthM).toBeCloseTo((532e-9 * lp) / 3e-3, 15);
    expect(Math.round(f.zoneWidthM * 1e6)).toBe(101);
    expect(f.fresnelNumber).toBeCloseTo((1.5e-3) ** 2 / (532e-9 * lp), 10);
    // 10 % rule (common practice, no published source).
    expect(f.rimToleranceM).toBeCloseTo(0.1 * f.zoneWidthM, 15);
  });

  it('uses L itself for a collimated beam (M = 1)', () => {
    const f = benchFigures(setupOf({ distanceM: 1.2 }));
    expect(f.effectiveDistanceM).toBe(1.2);
    expect(f.magnification).toBe(1);
    expect(f.zoneWidthM).toBeCloseTo((632.8e-9 * 1.2) / 3e-3, 15);
  });

  it("puts the first dark ring at 2·2.405·L/(k·a): the notes' 129 µm radius for a = 1.5 mm, L = 0.8 m, 632.8 nm", () => {
    const f = benchFigures(setupOf({ discRadiusM: 1.5e-3, distanceM: 0.8, pitchM: 5e-6, curvatureRadiusM: 2 }));
    const k = (2 * Math.PI) / 632.8e-9;
    // J₀'s first zero: A&S Table 9.5; checked against @stdlib besselj0 here.
    const j01 = 2.404825557695773;
    expect(Math.abs(besselj0(j01))).toBeLessThan(1e-15);
    const r0 = (j01 * 0.8) / (k * 1.5e-3);
    expect(f.spotDiameterPx).toBeCloseTo((2 * r0) / 5e-6, 10);
    expect(Math.round((f.spotDiameterPx * 5e-6 * 1e6) / 2)).toBe(129);
    // Independent reference simulation (physics notes §2): 127.5 µm, within 2 %; it does not depend on G.
    expect(Math.abs((f.spotDiameterPx * 5e-6) / 2 - 127.5e-6) / 127.5e-6).toBeLessThan(0.02);
    expect(benchFigures(setupOf({ discRadiusM: 1.5e-3, distanceM: 0.8, pitchM: 5e-6, curvatureRadiusM: 0.5 })).spotDiameterPx).toBe(f.spotDiameterPx);
  });

  it('compares the shadow 2·a·M with the sensor, and reports null without a sensor size', () => {
    // a = 1.5 mm, R = 2 m, L = 0.8 m: shadow 2·1.5 mm·1.4 = 4.2 mm = 840 px at 5 µm.
    const fits = benchFigures(setupOf({ curvatureRadiusM: 2, sensorPx: [1280, 1024] }));
    expect(fits.shadowDiameterPx).toBeCloseTo(840, 9);
    expect(fits.sensorMinSidePx).toBe(1024);
    expect(fits.shadowFits).toBe(true);
    const tooSmall = benchFigures(setupOf({ curvatureRadiusM: 2, sensorPx: [1280, 800] }));
    expect(tooSmall.shadowFits).toBe(false);
    const unknown = benchFigures(setupOf({ curvatureRadiusM: 2, sensorPx: null }));
    expect(unknown.shadowFits).toBeNull();
    expect(unknown.sensorMinSidePx).toBeNull();
  });

  it('counts the bright rings (zeros of J₁, found with @stdlib besselj1) out to the shadow or the sensor edge', () => {
    const k = (2 * Math.PI) / 632.8e-9;
    const zeros = stdlibJ1Zeros(200);
    const count = (reachM: number, a: number, L: number) => zeros.filter((z) => (z * L) / (k * a) < reachM).length;
    // Shadow-limited: a = 1.5 mm collimated, sensor large.
    const big = benchFigures(setupOf({ sensorPx: [4000, 4000] }));
    expect(big.visibleRings).toBe(count(1.5e-3, 1.5e-3, 0.8));
    expect(big.visibleRings).toBeGreaterThan(5);
    // Sensor-limited: 200 px of 5 µm → reach 0.5 mm.
    const small = benchFigures(setupOf({ sensorPx: [200, 300] }));
    expect(small.visibleRings).toBe(count(0.5e-3, 1.5e-3, 0.8));
    expect(small.visibleRings).toBeLessThan(big.visibleRings);
  });

  it('gives the source blur S·L/G in pixels (physics notes §2)', () => {
    // S = 20 µm, G = 2 m, L = 0.8 m → 8 µm = 1.6 px at 5 µm.
    expect(benchFigures(setupOf({ curvatureRadiusM: 2, sourceM: 20e-6 })).sourceBlurPx).toBeCloseTo(1.6, 12);
    expect(benchFigures(setupOf({})).sourceBlurPx).toBe(0);
  });
});

describe('edge roughness: J₀²(π·δ/Δr)', () => {
  it("gives the physics notes' check values 0.95, 0.22, 0 and 0.09", () => {
    expect(roughnessIntensityRatio(0.1, 1)).toBeCloseTo(0.95, 2);
    expect(roughnessIntensityRatio(0.5, 1)).toBeCloseTo(0.22, 2);
    expect(roughnessIntensityRatio(2.404825557695773 / Math.PI, 1)).toBeLessThan(1e-25);
    expect(roughnessIntensityRatio(1, 1)).toBeCloseTo(0.09, 2);
  });

  it('equals @stdlib besselj0(π·δ/Δr)² for a candidate', () => {
    const s = setupOf({ wavelengthM: 532e-9, curvatureRadiusM: 2 });
    for (const deltaM of [0, 1e-6, 5e-6, 20e-6, 60e-6, 150e-6]) {
      const f = benchFigures(s, { edgeRoughnessM: deltaM });
      const ref = besselj0((Math.PI * deltaM) / f.zoneWidthM) ** 2;
      expect(Math.abs(f.roughnessIntensityRatio - ref)).toBeLessThan(1e-14);
      expect(f.edgeRoughnessM).toBe(deltaM);
    }
  });

  it('refuses a negative roughness', () => {
    expect(() => benchFigures(setupOf({}), { edgeRoughnessM: -1e-6 })).toThrow(RangeError);
  });
});
