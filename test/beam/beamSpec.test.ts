/**
 * From beam moments to the setup's beam fields. The transfer from the camera plane to the disc plane is
 * checked against exact Gaussian-beam propagation (q-parameter, Kogelnik & Li, "Laser beams and
 * resonators", Appl. Opt. 5, 1550 (1966), from memory): w(L)² = w²·[(1 + L/R)² + (λL/(πw²))²] with R > 0
 * for a diverging wave.
 */
import { describe, expect, it } from 'vitest';
import { toBeamSpec } from '../../core/beam/beamSpec.ts';
import type { BeamMoments } from '../../core/beam/moments.ts';
import type { BenchSetup } from '../../core/setup/types.ts';

function setup(R: number, L: number, lambda = 632.8e-9): BenchSetup {
  return {
    wavelengthM: lambda,
    beam: { radiusM: 1e-3, centerM: [0, 0], curvatureRadiusM: R },
    disc: { radiusM: 0.5e-3, ellipticity: 0, ellipseAngleRad: 0, edgeHarmonics: [] },
    camera: { distanceM: L, pixelPitchM: 5e-6, bitDepth: 12, saturationCounts: 4095, orientation: { flipX: false, flipY: false, rotateDeg: 0 } },
    zernikeRadiusM: 1e-3,
    source: { sizeM: 0 },
  };
}

/** A moments result for a circular beam of D4σ `d` px centred at [col, row] of a 400 × 300 frame. */
function moments(dPx: number, centroidPx: [number, number], ellipticity = 1): BeamMoments {
  const W = 400;
  const H = 300;
  return {
    widthPx: W,
    heightPx: H,
    centroidPx,
    centroidFromCenterPx: [centroidPx[0] - (W - 1) / 2, (H - 1) / 2 - centroidPx[1]],
    sigmaX2Px2: (dPx / 4) ** 2,
    sigmaY2Px2: (dPx / 4) ** 2,
    sigmaXYPx2: 0,
    dSigmaXPx: dPx,
    dSigmaYPx: dPx * ellipticity,
    azimuthRad: 0,
    majorWidthPx: dPx,
    minorWidthPx: dPx * ellipticity,
    majorAxisAngleRad: 0,
    generalisedDiameterPx: dPx,
    ellipticity,
    backgroundCounts: 0,
    backgroundMethod: 'test',
    totalCounts: 1,
    integrationArea: { centerPx: centroidPx, halfSidesPx: [1.5 * dPx, 1.5 * dPx], angleRad: 0, pixels: 1, insideFrame: true },
    integration: 'iterative',
    iterations: 3,
    converged: true,
    warnings: [],
  };
}

/** Kogelnik & Li: the 1/e² radius after a distance L. */
function propagate(w: number, R: number, L: number, lambda: number): number {
  const geo = Number.isFinite(R) ? 1 + L / R : 1;
  return w * Math.sqrt(geo * geo + ((lambda * L) / (Math.PI * w * w)) ** 2);
}

describe('toBeamSpec', () => {
  it('diverging beam: w_disc = w_cam·R/(R + L), within the stated diffraction error of exact propagation', () => {
    const wDisc = 1.2e-3;
    const R = 2;
    const L = 0.6;
    const wCam = propagate(wDisc, R, L, 632.8e-9);
    const spec = toBeamSpec(moments((2 * wCam) / 5e-6, [199.5, 149.5]), 5e-6, setup(R, L));
    expect(spec.transferFactor).toBeCloseTo(2 / 2.6, 12);
    expect(spec.measuredRadiusM).toBeCloseTo(wCam, 12);
    const rel = spec.radiusM / wDisc - 1;
    expect(rel).toBeGreaterThan(0); // the geometric transfer ignores diffraction, which only widens the beam
    expect(Math.abs(rel - spec.diffractionErrorEstimate)).toBeLessThan(0.05 * spec.diffractionErrorEstimate + 1e-12);
    expect(rel).toBeLessThan(0.01); // below the 1 % at which a warning is given
    expect(spec.notes.join()).not.toMatch(/ignores the beam's own diffraction/);
    expect(spec.centerM).toEqual([0, 0]);
  });

  it('collimated beam: unchanged when the camera sits well inside the Rayleigh range; a warning when it does not', () => {
    const wDisc = 2e-3; // z_w = πw²/λ ≈ 19.9 m ≫ 0.8 m
    const near = toBeamSpec(moments((2 * propagate(wDisc, Infinity, 0.8, 632.8e-9)) / 5e-6, [199.5, 149.5]), 5e-6, setup(Infinity, 0.8));
    expect(near.transferFactor).toBe(1);
    expect(Math.abs(near.radiusM / wDisc - 1)).toBeLessThan(1e-3);
    expect(near.notes.join()).not.toMatch(/ignores the beam's own diffraction/);
    const small = 0.3e-3; // z_w ≈ 0.45 m: L = 0.8 m is beyond it
    const far = toBeamSpec(moments((2 * propagate(small, Infinity, 0.8, 632.8e-9)) / 5e-6, [199.5, 149.5]), 5e-6, setup(Infinity, 0.8));
    expect(far.diffractionErrorEstimate).toBeGreaterThan(0.01);
    expect(far.notes.join()).toMatch(/ignores the beam's own diffraction/);
  });

  it('transfers the centre in the lab frame (x = +column, y = −row) and from a given axis point', () => {
    const spec = toBeamSpec(moments(200, [209.5, 139.5]), 5e-6, setup(1.5, 0.3));
    // 10 px right and 10 px up of the frame centre, × R/(R + L) = 1.5/1.8.
    expect(spec.measuredCenterM[0]).toBeCloseTo(50e-6, 15);
    expect(spec.measuredCenterM[1]).toBeCloseTo(50e-6, 15);
    expect(spec.centerM[0]).toBeCloseTo((50e-6 * 1.5) / 1.8, 15);
    const axis = toBeamSpec(moments(200, [209.5, 139.5]), 5e-6, setup(1.5, 0.3), { axisPx: [209.5, 139.5] });
    expect(axis.centerM).toEqual([0, 0]);
    const atDisc = toBeamSpec(moments(200, [209.5, 139.5]), 5e-6, setup(1.5, 0.3), { recordedAt: 'disc' });
    expect(atDisc.transferFactor).toBe(1);
    expect(atDisc.radiusM).toBeCloseTo(500e-6, 15);
  });

  it('uses the mean of the two principal widths and says when the beam is elliptical', () => {
    const spec = toBeamSpec(moments(200, [199.5, 149.5], 0.5), 5e-6, setup(Infinity, 0.3), { recordedAt: 'disc' });
    expect(spec.radiusM).toBeCloseTo(((200 + 100) / 4) * 5e-6, 15);
    expect(spec.notes.join()).toMatch(/elliptical/);
  });

  it('refuses a converging beam focused before the camera', () => {
    expect(() => toBeamSpec(moments(200, [199.5, 149.5]), 5e-6, setup(-0.2, 0.3))).toThrow(/converging/);
  });
});
