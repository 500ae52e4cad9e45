/**
 * Check 6: numerical convergence. Doubling every node count (and halving the free-beam grid
 * spacing) must change the intensity by less than 1e-6 of the peak, for each quadrature route:
 * closed-form free beam + row–chord circle, trapezoid free beam (non-separable aberration), and
 * the polar edge strip (ellipticity, edge harmonics). Plus symmetry and internal consistency checks.
 */
import { describe, expect, it } from 'vitest';
import type { BenchSetup, ZernikeTerm } from '../../../core/setup/types.ts';
import { referenceField, referenceIntensity } from '../../../core/optics/reference/index.ts';
import { referenceFieldWithInfo } from '../../../core/optics/reference/field.ts';
import { axis, bench, centredAxis, intensityOf, maxOf } from './scenes.ts';

interface Case {
  name: string;
  setup: BenchSetup;
  aberrations: ZernikeTerm[];
  route: 'closed-form' | 'trapezoid';
  strip: boolean;
}

const CASES: Case[] = [
  { name: 'round disc, centred collimated beam', setup: bench(), aberrations: [], route: 'closed-form', strip: false },
  {
    name: 'decentred diverging beam, defocus + astigmatism + tilt',
    setup: bench({ beamCenterM: [0.4e-3, -0.25e-3], curvatureRadiusM: 2 }),
    aberrations: [{ j: 4, waves: 0.3 }, { j: 5, waves: -0.15 }, { j: 2, waves: 0.2 }],
    route: 'closed-form',
    strip: false,
  },
  {
    name: 'coma + oblique astigmatism (non-separable)',
    setup: bench({ beamCenterM: [0.2e-3, 0.1e-3] }),
    aberrations: [{ j: 7, waves: 0.08 }, { j: 3, waves: 0.1 }],
    route: 'trapezoid',
    strip: false,
  },
  {
    name: 'elliptical disc with edge harmonics, converging beam',
    setup: bench({
      ellipticity: 0.02,
      ellipseAngleRad: 0.4,
      curvatureRadiusM: -3,
      edgeHarmonics: [
        { order: 3, amplitudeM: 8e-6, phaseRad: 1.1 },
        { order: 40, amplitudeM: 15e-6, phaseRad: 0.3 },
      ],
    }),
    aberrations: [{ j: 5, waves: 0.1 }],
    route: 'closed-form',
    strip: true,
  },
];

// A small patch around the spot and a cut across the shadow edge (a = 1.5 mm).
const PATCH_X = centredAxis(16, 60e-6);
const PATCH_Y = centredAxis(15, 64e-6);
const CUT_X = axis(48, 0, 45e-6); // 0 … 2.1 mm
const CUT_Y = new Float64Array([0.07e-3]);

describe('convergence: doubling the node counts (< 1e-6 of the peak)', () => {
  for (const c of CASES) {
    it(c.name, () => {
      for (const [xs, ys] of [
        [PATCH_X, PATCH_Y],
        [CUT_X, CUT_Y],
      ] as const) {
        const base = referenceFieldWithInfo(c.setup, c.aberrations, xs, ys);
        expect(base.info.freeBeam).toBe(c.route);
        expect(base.info.strip !== null).toBe(c.strip);
        const doubled = referenceFieldWithInfo(c.setup, c.aberrations, xs, ys, { nodeScale: 2 });
        const I1 = intensityOf(base.field.re, base.field.im);
        const I2 = intensityOf(doubled.field.re, doubled.field.im);
        const peak = maxOf(I2);
        let worst = 0;
        for (let i = 0; i < I1.length; i++) worst = Math.max(worst, Math.abs(I1[i] - I2[i]));
        expect(worst / peak).toBeLessThan(1e-6);
        // The complex field converges too (what the fast model is compared against).
        let worstField = 0;
        for (let i = 0; i < I1.length; i++) {
          worstField = Math.max(worstField, Math.hypot(base.field.re[i] - doubled.field.re[i], base.field.im[i] - doubled.field.im[i]));
        }
        expect(worstField / Math.sqrt(peak)).toBeLessThan(1e-6);
      }
    });
  }

  it("'high' accuracy agrees with 'normal' to < 1e-6 of the peak", () => {
    const c = CASES[3];
    const I1 = referenceIntensity(c.setup, c.aberrations, CUT_X, CUT_Y);
    const I2 = referenceIntensity(c.setup, c.aberrations, CUT_X, CUT_Y, { accuracy: 'high' });
    const peak = maxOf(I2);
    for (let i = 0; i < I1.length; i++) expect(Math.abs(I1[i] - I2[i]) / peak).toBeLessThan(1e-6);
  });
});

describe('symmetry and consistency', () => {
  it('no aberrations, centred beam, round disc: symmetric under x → −x and y → −y', () => {
    const xs = centredAxis(21, 37e-6);
    const ys = centredAxis(19, 41e-6);
    for (const setup of [bench(), bench({ curvatureRadiusM: 0.5 }), bench({ ellipticity: 0.03 })]) {
      const I = referenceIntensity(setup, [], xs, ys);
      const peak = maxOf(I);
      for (let iy = 0; iy < ys.length; iy++) {
        for (let ix = 0; ix < xs.length; ix++) {
          const v = I[iy * xs.length + ix];
          expect(Math.abs(v - I[iy * xs.length + (xs.length - 1 - ix)]) / peak).toBeLessThan(1e-12);
          expect(Math.abs(v - I[(ys.length - 1 - iy) * xs.length + ix]) / peak).toBeLessThan(1e-12);
        }
      }
    }
  });

  it('breaks that symmetry when it should (vertical coma is not symmetric under y → −y)', () => {
    const ys = centredAxis(9, 50e-6);
    const xs = new Float64Array([0]);
    const I = referenceIntensity(bench(), [{ j: 7, waves: 0.1 }], xs, ys);
    let asym = 0;
    for (let i = 0; i < ys.length; i++) asym = Math.max(asym, Math.abs(I[i] - I[ys.length - 1 - i]));
    expect(asym / maxOf(I)).toBeGreaterThan(1e-3);
  });

  it('oblique astigmatism (Z3, trapezoid route) equals vertical astigmatism (Z5, closed form) turned by 45°', () => {
    // Z3(ρ, θ) = √6 ρ² sin 2θ = Z5(ρ, θ − 45°) (ANSI Z80.28 definitions, physics notes §5); with a
    // round disc and a centred beam the field for Z3 at P equals the field for Z5 at P turned by −45°.
    const setup = bench();
    const xs = axis(12, 0, 40e-6);
    const u3 = referenceField(setup, [{ j: 3, waves: 0.12 }], xs, new Float64Array([0]));
    let peak = 0;
    let worst = 0;
    for (let i = 0; i < xs.length; i++) {
      const c = Math.SQRT1_2;
      const u5 = referenceField(setup, [{ j: 5, waves: 0.12 }], new Float64Array([xs[i] * c]), new Float64Array([-xs[i] * c]));
      peak = Math.max(peak, Math.hypot(u5.re[0], u5.im[0]));
      worst = Math.max(worst, Math.hypot(u3.re[i] - u5.re[0], u3.im[i] - u5.im[0]));
    }
    expect(worst / peak).toBeLessThan(1e-6);
  });

  it('a zero-order edge "harmonic" (strip route) equals a round disc of the enlarged radius (row–chord route)', () => {
    const xs = axis(10, 0, 0.2e-3);
    const ys = new Float64Array([0.05e-3]);
    const aberr: ZernikeTerm[] = [{ j: 4, waves: 0.2 }];
    const viaStrip = referenceFieldWithInfo(bench({ edgeHarmonics: [{ order: 0, amplitudeM: 40e-6, phaseRad: 0 }] }), aberr, xs, ys);
    expect(viaStrip.info.strip).not.toBeNull();
    const viaCircle = referenceFieldWithInfo(bench({ discRadiusM: 1.5e-3 + 40e-6 }), aberr, xs, ys);
    expect(viaCircle.info.strip).toBeNull();
    for (let i = 0; i < xs.length; i++) {
      expect(Math.abs(viaStrip.field.re[i] - viaCircle.field.re[i])).toBeLessThan(1e-9);
      expect(Math.abs(viaStrip.field.im[i] - viaCircle.field.im[i])).toBeLessThan(1e-9);
    }
  });

  it('a disc rotated by 90° with its ellipse gives the pattern rotated by 90°', () => {
    const pts = centredAxis(7, 90e-6);
    const h = [{ order: 5, amplitudeM: 10e-6, phaseRad: 0.7 }];
    const A = referenceIntensity(bench({ ellipticity: 0.03, ellipseAngleRad: 0.2, edgeHarmonics: h }), [], pts, pts);
    // Turning the disc by +90°: θe → θe + π/2, harmonic phase φ → φ + n·π/2.
    const hRot = [{ order: 5, amplitudeM: 10e-6, phaseRad: 0.7 + (5 * Math.PI) / 2 }];
    const B = referenceIntensity(bench({ ellipticity: 0.03, ellipseAngleRad: 0.2 + Math.PI / 2, edgeHarmonics: hRot }), [], pts, pts);
    // Point (x, y) of A ↔ point (−y, x) of B; the axes are symmetric, so index ix ↔ row, iy ↔ mirrored column.
    const n = pts.length;
    const peak = maxOf(A);
    for (let iy = 0; iy < n; iy++) {
      for (let ix = 0; ix < n; ix++) {
        const a = A[iy * n + ix]; // P = (pts[ix], pts[iy])
        // Rotated point (−pts[iy], pts[ix]) = (pts[n−1−iy], pts[ix]) → column n−1−iy, row ix.
        const b = B[ix * n + (n - 1 - iy)];
        expect(Math.abs(a - b) / peak).toBeLessThan(1e-8);
      }
    }
  });
});
