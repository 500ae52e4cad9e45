/**
 * Disc calibration (issue 6 §2). Frames from the REFERENCE model (test/fixtures/make-disc-fixtures.ts): a
 * 3 mm disc with e·a = 2 µm of ellipticity (axis 25°) in a beam with astigmatism, the disc at 0° and at 90°.
 *
 * What is checked against what: the recovery of our simulator's inputs (the disc shape and the beam's
 * coefficients given to the independent reference model, itself checked against handbook values in
 * test/optics) within the fit's reported 3σ; the degeneracy of a single angle follows from physics notes §3
 * (disc ellipticity and beam astigmatism are the same cos 2θ phase on the rim; only turning the disc, or a
 * known beam, separates them).
 */
import { describe, expect, it } from 'vitest';
import { calibrateDisc } from '../../core/fit/disc/calibrate.ts';
import { appliedProfile } from '../../core/fit/disc/profile.ts';
import { measureBeam } from '../../core/fit/measure.ts';
import { beamTruth, discTruth, frameSet, KNOWN_NOISE, trueC2, trueS2 } from './disc-helpers.ts';

const truthOf = (j: number) => beamTruth.find((t) => t.j === j)?.waves ?? 0;
const within3 = (value: number, truth: number, sigma: number) => {
  expect(Number.isFinite(sigma) && sigma > 0).toBe(true);
  expect(Math.abs(value - truth)).toBeLessThan(3 * sigma);
};

describe('disc calibration from frames with the disc at 0° and 90°', { timeout: 600_000 }, () => {
  it('recovers the disc ellipticity, its axis and the beam astigmatism within 3σ, and is trusted', () => {
    const c = calibrateDisc([frameSet('disc-s0-a0.png'), frameSet('disc-s0-a90.png')], { terms: [3, 4, 5], ...KNOWN_NOISE, calibratedAt: '2024-05-01T10:00:00Z' });
    const p = c.profile;
    const c2 = p.coefficients.find((q) => q.order === 2)!;
    within3(c2.cos, trueC2, c2.sigmaCos);
    within3(c2.sin, trueS2, c2.sigmaSin);
    within3(p.ellipticity, discTruth.ellipticity, p.sigmaEllipticity);
    within3(p.axisRad, discTruth.axisRad, p.sigmaAxisRad);
    // the shape is measured, not zero: e·a = 2 µm is many σ
    expect(p.ellipticity / p.sigmaEllipticity).toBeGreaterThan(10);
    for (const j of [3, 5]) {
      const t = c.fit.zernike.terms.find((x) => x.j === j)!;
      within3(t.waves, truthOf(j), t.sigmaWaves);
    }
    expect(c.degenerate).toBe(false);
    expect(c.trusted).toBe(true);
    expect(p.separation[0].angleSpread).toBeCloseTo(1, 12);
    expect(p.separation[0].maxAbsCorrelation).toBeLessThan(0.5);
    expect(p.method).toBe('rotation');
    expect(p.anglesRad).toEqual([0, Math.PI / 2]);
    expect(c.fit.warnings.some((w) => /disc shape is not calibrated/.test(w))).toBe(false);
  });

  it('a single disc angle reports the degeneracy (flags, correlation, warning) instead of a confident answer', () => {
    const c = calibrateDisc([frameSet('disc-s0-a0.png')], { terms: [3, 4, 5], ...KNOWN_NOISE });
    expect(c.degenerate).toBe(true);
    expect(c.trusted).toBe(false);
    expect(c.profile.trusted).toBe(false);
    const s = c.profile.separation[0];
    expect(s.angleSpread).toBeLessThan(1e-12);
    expect(s.beamTerms).toEqual([3, 5]);
    // the correlation is reported, and it is strong
    expect(s.maxAbsCorrelation).toBeGreaterThan(0.8);
    expect(c.warnings.some((w) => /cannot be told apart from the beam's same-order terms \(j=3, j=5\)/.test(w) && /correlation 0\.\d{3}/.test(w))).toBe(true);
    // and its uncertainties are honest: much larger than with two angles
    const c2 = c.profile.coefficients[0];
    expect(c2.sigmaCos).toBeGreaterThan(2.5 * 3.3e-5);
  });

  it('a reference-beam calibration (the beam known) needs one angle and recovers the disc within 3σ', () => {
    const c = calibrateDisc([frameSet('disc-s1-a90.png')], { beam: { known: beamTruth }, ...KNOWN_NOISE });
    expect(c.degenerate).toBe(false);
    expect(c.trusted).toBe(true);
    expect(c.profile.method).toBe('reference-beam');
    expect(c.profile.beam).toBe('known');
    expect(c.fit.zernike.terms).toEqual([]);
    const c2 = c.profile.coefficients[0];
    within3(c2.cos, trueC2, c2.sigmaCos);
    within3(c2.sin, trueS2, c2.sigmaSin);
  });
});

describe('a later fit with the calibrated disc', { timeout: 600_000 }, () => {
  it('uses the profile (turned with the disc), drops the disc warning, records the calibration, and removes the astigmatism bias', () => {
    const cal = calibrateDisc([frameSet('disc-s1-a0.png'), frameSet('disc-s1-a90.png')], { terms: [3, 4, 5], ...KNOWN_NOISE, calibratedAt: '2024-05-02T09:00:00Z' });
    expect(cal.trusted).toBe(true);
    const profile = appliedProfile(cal.profile, 7, 'ball 3 mm #1');
    // another seed's frame with the disc at 90°
    const withProfile = measureBeam([frameSet('disc-s2-a90.png')], { terms: [3, 4, 5], ...KNOWN_NOISE, discProfile: profile });
    expect(withProfile.disc).toEqual({ id: 7, name: 'ball 3 mm #1', calibratedAt: '2024-05-02T09:00:00Z' });
    expect(withProfile.warnings.some((w) => /disc shape is not calibrated/.test(w))).toBe(false);
    const without = measureBeam([frameSet('disc-s2-a90.png')], { terms: [3, 4, 5], ...KNOWN_NOISE });
    expect(without.disc).toBeNull();
    expect(without.warnings.some((w) => /disc shape is not calibrated/.test(w))).toBe(true);
    // σ includes the profile's own uncertainty (propagated): larger than the same fit's σ without it
    expect((withProfile.settings as { discProfileUncertaintyIncluded?: boolean }).discProfileUncertaintyIncluded).toBe(true);
    for (const j of [3, 5]) {
      const t = withProfile.zernike.terms.find((x) => x.j === j)!;
      within3(t.waves, truthOf(j), t.sigmaWaves);
      expect(t.sigmaWaves).toBeGreaterThan(without.zernike.terms.find((x) => x.j === j)!.sigmaWaves);
    }
    // without the profile the disc's ellipticity shows up as astigmatism: a bias of many σ in at least one term
    const bias = Math.max(...[3, 5].map((j) => {
      const t = without.zernike.terms.find((x) => x.j === j)!;
      return Math.abs(t.waves - truthOf(j)) / t.sigmaWaves;
    }));
    expect(bias).toBeGreaterThan(5);
  });
});
