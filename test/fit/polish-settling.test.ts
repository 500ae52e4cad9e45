/**
 * The reference-model polish (core/fit/referencePolish.ts) is a defect correction: it converges in one round
 * where the fast model's derivatives match the reference model's, and slowly where they do not, which happens
 * at Fresnel numbers near 1. An unsettled polish must be reported, not passed off as a clean result.
 * Frames: trials of the accuracy study (test/fixtures/trials.ts), made with the REFERENCE model plus the
 * camera noise model, seeded. The Fresnel number is the usual a²/(λL) (Born & Wolf, Principles of Optics,
 * §8.2; from memory); it is recomputed here from the trial's own setup.
 */
import { describe, expect, it } from 'vitest';
import { drawTrial, renderTrial } from '../fixtures/trials.ts';
import { prepareFrames } from '../../core/frames/prepare.ts';
import { measureBeam } from '../../core/fit/measure.ts';

function fitTrial(i: number) {
  const trial = drawTrial('whole', i);
  const { counts } = renderTrial(trial);
  const decoded = { data: Float64Array.from(counts), widthPx: 256, heightPx: 256, bitDepth: 16, warnings: [], format: 'png' as const };
  const prepared = prepareFrames([decoded], [], trial.scene.camera, [`${trial.id}.png`]);
  const s = trial.scene;
  const fresnel = s.disc.radiusM ** 2 / (s.wavelengthM * s.camera.distanceM);
  return { result: measureBeam([{ setup: s, prepared }], { terms: [3, 4, 5, 7, 8], gainCountsPerElectron: 1, readNoiseCounts: 3 }), fresnel };
}

describe('reference-model polish: settled or said so', () => {
  it('warns at a Fresnel number near 1 (trial whole-17, N_F = 0.96), naming the Fresnel number', () => {
    const { result, fresnel } = fitTrial(17);
    expect(fresnel).toBeGreaterThan(0.9);
    expect(fresnel).toBeLessThan(1.0);
    const warning = result.warnings.find((w) => w.includes('polish had not settled'));
    expect(warning).toBeDefined();
    expect(warning).toContain(`a²/(λL) = ${fresnel.toFixed(2)}`);
    expect(String(result.settings.referencePolish)).toMatch(/^reference-model polish: [23] round/);
  });

  it('does not warn where one round settles it (trial whole-5, N_F = 1.54)', () => {
    const { result, fresnel } = fitTrial(5);
    expect(fresnel).toBeGreaterThan(1.5);
    expect(String(result.settings.referencePolish)).toMatch(/^reference-model polish: /);
    expect(result.warnings.some((w) => w.includes('polish had not settled'))).toBe(false);
  });
});
