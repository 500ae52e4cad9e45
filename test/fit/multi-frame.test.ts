/**
 * Several frames of one beam: two camera distances a known step apart share the aberrations, and the
 * distance error that a single frame cannot tell from defocus (physics notes §3) becomes measurable.
 * Frames come from the reference model plus camera noise.
 */
import { describe, expect, it } from 'vitest';
import { simulateFrame } from '../../core/optics/simulate.ts';
import { prepareFrames } from '../../core/frames/prepare.ts';
import { measureBeam } from '../../core/fit/measure.ts';
import type { Scene } from '../../core/setup/types.ts';

function scene(distanceM: number, seed: number): Scene {
  return {
    wavelengthM: 632.8e-9,
    beam: { radiusM: 3e-3, centerM: [0, 0], curvatureRadiusM: Infinity },
    disc: { radiusM: 1e-3, ellipticity: 0, ellipseAngleRad: 0, edgeHarmonics: [] },
    camera: { distanceM, pixelPitchM: 24e-6, bitDepth: 12, saturationCounts: 4095, orientation: { flipX: false, flipY: false, rotateDeg: 0 } },
    zernikeRadiusM: 3e-3,
    source: { sizeM: 0 },
    aberrations: [
      { j: 4, waves: 0.1 },
      { j: 5, waves: 0.05 },
    ],
    frame: { widthPx: 128, heightPx: 128, centerM: [10e-6, -15e-6] },
    noise: { peakCounts: 3500, readNoise: 3, offset: 20, seed },
  };
}

describe('two camera distances a known step apart', { timeout: 600_000 }, () => {
  it('recover the distance error and the defocus together', () => {
    const trueError = 0.012; // the tape measure was 12 mm short
    const sets = [0.6, 0.66].map((nominal, i) => {
      const truth = scene(nominal + trueError, 31 + i);
      const sim = simulateFrame(truth, { model: 'reference' });
      const nominalSetup = scene(nominal, 31 + i);
      const prepared = prepareFrames([{ data: Float64Array.from(sim.counts), widthPx: 128, heightPx: 128, bitDepth: 16, warnings: [], format: 'png' }], [], nominalSetup.camera, [`L${nominal}.png`]);
      return { setup: nominalSetup, prepared };
    });
    const r = measureBeam(sets, { terms: [3, 4, 5], freeDistance: true, gainCountsPerElectron: 1, readNoiseCounts: 3 });
    const dL = (r.settings as { distanceOffsetM?: number }).distanceOffsetM;
    expect(dL).toBeDefined();
    const sigmaL = (r.settings as { sigmaDistanceOffsetM: number }).sigmaDistanceOffsetM;
    expect(Math.abs(dL! - trueError)).toBeLessThan(Math.max(3 * sigmaL, 1e-3));
    const z4 = r.zernike.terms.find((t) => t.j === 4)!;
    expect(Math.abs(z4.waves - 0.1)).toBeLessThan(3 * z4.sigmaWaves + 0.005);
    expect(r.centers_m.length).toBe(2);
    expect(r.warnings.some((w) => /camera distance was freed/.test(w))).toBe(true);
  });
});
