/**
 * The fast rim-integral model against the independent reference model (Babinet with spectrally
 * accurate quadratures) on the documented scene set in test/fixtures/agreement-scenes.json.
 * Requirement: ≤ 2e-3 of the peak, RMS over the shadow interior (|P| < 0.9·a·M).
 * The two models share only the physical definition of the Fresnel integral (physics notes §1).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseScene } from '../../core/setup/parseScene.ts';
import { fastField } from '../../core/optics/fast/rimModel.ts';
import { rayCheck } from '../../core/optics/fast/rayCheck.ts';
import { referenceField } from '../../core/optics/reference/index.ts';
import { benchFigures } from '../../core/optics/geometry.ts';
import { simulateIntensity } from '../../core/optics/simulate.ts';
import { intensityOf, linspace } from './helpers.ts';

const set = JSON.parse(readFileSync(new URL('../fixtures/agreement-scenes.json', import.meta.url), 'utf8')) as {
  scenes: { name: string; scene: unknown }[];
};

describe('fast model agrees with the reference model', () => {
  it('the scene set spans what the agreement claim covers', () => {
    const scenes = set.scenes.map((s) => parseScene(s.scene, s.name));
    expect(scenes.length).toBeGreaterThanOrEqual(6);
    const lam = scenes.map((s) => s.wavelengthM);
    const d = scenes.map((s) => 2 * s.disc.radiusM);
    const L = scenes.map((s) => s.camera.distanceM);
    expect(Math.min(...lam)).toBeLessThanOrEqual(405e-9);
    expect(Math.max(...lam)).toBeGreaterThanOrEqual(1100e-9);
    expect(Math.min(...d)).toBeLessThanOrEqual(1e-3);
    expect(Math.max(...d)).toBeGreaterThanOrEqual(5e-3);
    expect(Math.min(...L)).toBeLessThanOrEqual(0.3);
    expect(Math.max(...L)).toBeGreaterThanOrEqual(2);
    expect(scenes.some((s) => s.beam.curvatureRadiusM === Infinity)).toBe(true);
    expect(scenes.some((s) => Number.isFinite(s.beam.curvatureRadiusM))).toBe(true);
    expect(Math.max(...scenes.flatMap((s) => s.aberrations.map((t) => Math.abs(t.waves))))).toBeGreaterThanOrEqual(0.3);
  });

  for (const entry of set.scenes) {
    it(`${entry.name}`, () => {
      const scene = parseScene(entry.scene, entry.name);
      const shadowRadiusM = scene.disc.radiusM * benchFigures(scene).magnification;
      const n = 40;
      const xs = linspace(-1.25 * shadowRadiusM, 1.25 * shadowRadiusM, n);
      const ys = xs.slice().reverse();
      const ref = intensityOf(referenceField(scene, scene.aberrations, xs, ys));
      const fast = intensityOf(fastField(scene, scene.aberrations, xs, ys));
      let peak = 0;
      let sumInterior = 0;
      let countInterior = 0;
      let sumAll = 0;
      for (let iy = 0; iy < n; iy++) {
        for (let ix = 0; ix < n; ix++) {
          const k = iy * n + ix;
          peak = Math.max(peak, ref[k]);
          const d2 = (ref[k] - fast[k]) ** 2;
          sumAll += d2;
          if (Math.hypot(xs[ix], ys[iy]) < 0.9 * shadowRadiusM) {
            sumInterior += d2;
            countInterior++;
          }
        }
      }
      const interior = Math.sqrt(sumInterior / countInterior) / peak;
      const whole = Math.sqrt(sumAll / (n * n)) / peak;
      expect(interior).toBeLessThanOrEqual(2e-3);
      // Including the shadow edge and the lit beam around it (a documented, looser claim).
      expect(whole).toBeLessThanOrEqual(4e-3);
    });
  }
});

describe('fast model knows where it is not valid (physics notes §3, ray check)', () => {
  const caustic = parseScene(
    {
      format: 'shadowfront-scene/1',
      wavelength: '1064 nm',
      beam: { radius: '6 mm', center: ['0 mm', '0 mm'], curvatureRadius: 'collimated' },
      disc: { diameter: '5 mm' },
      camera: { distance: '2 m', pixelPitch: '50 um', bitDepth: 12 },
      aberrations: { '8': 0.3, '9': 0.1 },
      frame: { width: 128, height: 128 },
    },
    'caustic scene',
  );
  it('flags light folded into the analysed region', () => {
    const r = 1.25 * caustic.disc.radiusM;
    const check = rayCheck(caustic, caustic.aberrations, { xMinM: -r, xMaxM: r, yMinM: -r, yMaxM: r });
    expect(check.ok).toBe(false);
    expect(check.message).toMatch(/rim model/);
  });
  it('refuses to simulate it with the fast model and names the reference model', () => {
    expect(() => simulateIntensity(caustic, { model: 'fast' })).toThrow(/reference model/);
  });
  it('passes a mildly aberrated scene', () => {
    const r = 1.25 * caustic.disc.radiusM;
    const mild = { ...caustic, aberrations: [{ j: 8, waves: 0.05 }] };
    expect(rayCheck(mild, mild.aberrations, { xMinM: -r, xMaxM: r, yMinM: -r, yMaxM: r }).ok).toBe(true);
  });
});
