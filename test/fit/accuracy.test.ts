/**
 * The solver on synthetic frames from the reference model plus camera noise (never the fast model it
 * uses). Fixtures: test/fixtures/generate.ts. The long study with many trials is test/bench/fit-accuracy.ts.
 * Caps on the absolute error come from the project's requirements (0.005 waves for astigmatism, 0.01 for
 * coma, 0.03 for defocus, or 3× the Cramér–Rao bound); the 3σ coverage is the usual Gaussian criterion.
 */
import { describe, expect, it } from 'vitest';
import { cramerRaoBound } from '../../core/fit/crb.ts';
import type { FitFrameInput } from '../../core/fit/frameModel.ts';
import { fitFixture, fixtures, truthOf } from './helpers.ts';

const CAPS: Record<number, number> = { 3: 0.005, 5: 0.005, 4: 0.03, 7: 0.01, 8: 0.01 };

describe('fit accuracy on reference-model frames', { timeout: 300_000 }, () => {
  for (const e of fixtures.filter((f) => f.group === 'accuracy')) {
    it(`${e.file}: every coefficient within 3σ and within max(cap, 3×CRB)`, () => {
      const { result, scene } = fitFixture(e);
      expect(result.termination).toBe('converged');
      expect(result.trusted).toBe(true);
      expect(result.chi2PerDof).toBeGreaterThan(0.8);
      expect(result.chi2PerDof).toBeLessThan(1.3);
      const terms = result.zernike.terms.map((t) => t.j);
      const g = result.regions[0];
      const input: FitFrameInput = {
        setup: scene,
        counts: new Float64Array(scene.frame.widthPx * scene.frame.heightPx),
        widthPx: scene.frame.widthPx,
        heightPx: scene.frame.heightPx,
        mask: null,
        frameCount: 1,
        darkCount: 0,
        readNoiseCounts: 3,
        gainCountsPerElectron: 1,
        regionCenterPx: g.centerPx,
        regionRadiusPx: g.radiusPx,
      };
      const truthParams = Float64Array.from([...terms.map((j) => truthOf(e, j)), e.trueCenterM[0], e.trueCenterM[1], e.peakCounts, 20]);
      const crb = cramerRaoBound([input], { terms, nFrames: 1, freeDistance: false, freeDiscRadius: false }, truthParams, g.binning);
      result.zernike.terms.forEach((t, k) => {
        const err = Math.abs(t.waves - truthOf(e, t.j));
        expect(err).toBeLessThanOrEqual(3 * t.sigmaWaves);
        expect(err).toBeLessThanOrEqual(Math.max(CAPS[t.j], 3 * crb.sigma[k]));
        // the reported σ is close to the Cramér–Rao bound of the binned data (within 1.5×)
        expect(t.sigmaWaves / crb.sigma[k]).toBeLessThan(1.5);
      });
      // the fitted centre is the true one within 3σ-ish (2 µm here)
      expect(Math.abs(result.center_m[0] - e.trueCenterM[0])).toBeLessThan(2e-6);
      expect(Math.abs(result.center_m[1] - e.trueCenterM[1])).toBeLessThan(2e-6);
    });
  }

  it('a frame holding the whole shadow determines defocus and coma much better than the interior alone', () => {
    const interior = fitFixture(fixtures.find((f) => f.file === 'pair-interior.png')!).result;
    const whole = fitFixture(fixtures.find((f) => f.file === 'pair-whole.png')!).result;
    const sig = (r: typeof interior, j: number) => r.zernike.terms.find((t) => t.j === j)!.sigmaWaves;
    expect(sig(whole, 4)).toBeLessThan(sig(interior, 4) / 3);
    expect(sig(whole, 7)).toBeLessThan(sig(interior, 7) / 2);
    expect(sig(whole, 8)).toBeLessThan(sig(interior, 8) / 2);
    expect(interior.warnings.some((w) => /only the inside of the shadow/.test(w))).toBe(true);
  });
});

describe('both signs of every term, and a clean beam (physics notes §3, "Sign")', { timeout: 300_000 }, () => {
  for (const e of fixtures.filter((f) => f.group === 'sign')) {
    it(`${e.file}`, () => {
      const { result } = fitFixture(e);
      const j = e.truth[0].j;
      const t = result.zernike.terms.find((x) => x.j === j)!;
      expect(Math.sign(t.waves)).toBe(Math.sign(e.truth[0].waves));
      // Within 3σ (the usual Gaussian criterion). These high-signal frames hold the whole shadow, where the fast
      // model alone is off by up to ~4e-4 of the peak for coma (core/optics/README.md) — more than σ(coma) ≈ 0.4 %
      // of 0.06 waves; the reference-model polish (core/fit/referencePolish.ts) removes that bias.
      expect(Math.abs(t.waves - e.truth[0].waves)).toBeLessThanOrEqual(3 * t.sigmaWaves);
      expect(result.settings.referencePolish).toMatch(/reference-model polish: \d round/);
      for (const other of result.zernike.terms) if (other.j !== j) expect(Math.abs(other.waves)).toBeLessThanOrEqual(3 * other.sigmaWaves + 1e-9);
    });
  }
  it('zero aberration gives coefficients consistent with zero', () => {
    const { result } = fitFixture(fixtures.find((f) => f.group === 'zero')!);
    for (const t of result.zernike.terms) expect(Math.abs(t.waves)).toBeLessThanOrEqual(3 * t.sigmaWaves);
    expect(result.rmsWaves).toBeLessThan(0.01);
  });
});

describe('a wrong setup is not reported as a good result', { timeout: 300_000 }, () => {
  it('a camera distance 30 % off gives a poor χ² or an untrusted fit', () => {
    const e = fixtures.find((f) => f.file === 'sign-z5-plus.png')!;
    const { result } = fitFixture(e, {}, (s) => ({ ...s, camera: { ...s.camera, distanceM: s.camera.distanceM * 1.3 } }));
    const flagged = !result.trusted || result.warnings.some((w) => /does not explain the residuals/.test(w));
    expect(flagged).toBe(true);
    expect(result.chi2PerDof).toBeGreaterThan(1.5);
  });
});
