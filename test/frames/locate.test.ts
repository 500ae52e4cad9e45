/**
 * locatePattern and chooseRegion on frames simulated by the project's own simulator (core/optics/simulate.ts,
 * fast model) with camera noise, the pattern moved off the frame centre by up to ±80 µm.
 *
 * Truth: the pattern centre is where the disc axis meets the sensor, pixel column (W−1)/2 − fx/p and row
 * (H−1)/2 + fy/p for a frame centred at (fx, fy) (core/camera/pixels.ts; physics notes section 5). With
 * coma the Arago spot moves off that point: a rim phase A·cos θ acts like a tilt, whose rays land displaced
 * by L·∇W = L·A/a (physics notes section 3: "The ray from rim point Q lands at M·Q + L·∇W(Q)", and
 * coma "varies as cos θ along the rim, exactly like tilt"). Required accuracy: 1 pixel.
 */
import { describe, expect, it } from 'vitest';
import { parseScene } from '../../core/setup/parseScene.ts';
import { simulateIntensity } from '../../core/optics/simulate.ts';
import { applyCameraNoise } from '../../core/camera/noise.ts';
import { prepareFrames, type PreparedFrame } from '../../core/frames/prepare.ts';
import { expectedPattern, locatePattern } from '../../core/frames/locate.ts';
import { chooseRegion } from '../../core/frames/region.ts';
import { FrameError } from '../../core/frames/errors.ts';
import type { Scene } from '../../core/setup/types.ts';
import { bump, camera12, frameOf, gaussianNoise } from './helpers.ts';

function scene(over: Record<string, unknown>): Scene {
  return parseScene({
    format: 'shadowfront-scene/1',
    wavelength: '632.8 nm',
    beam: { radius: '3 mm', curvatureRadius: 'collimated' },
    disc: { diameter: '2 mm' },
    camera: { distance: '400 mm', pixelPitch: '10 um', bitDepth: 12 },
    frame: { width: 256, height: 256 },
    ...over,
  });
}

function prepared(s: Scene, peakCounts = 3000, seed = 5, name = 'sim.png'): PreparedFrame {
  const sim = simulateIntensity(s, { oversample: 1 });
  const counts = applyCameraNoise(sim.intensity, { peakCounts, readNoise: 3, offset: 20, seed }, s.camera);
  return prepareFrames([frameOf(counts, s.frame.widthPx, s.frame.heightPx)], [], s.camera, [name]);
}

function truthPx(s: Scene): [number, number] {
  const p = s.camera.pixelPitchM;
  return [(s.frame.widthPx - 1) / 2 - s.frame.centerM[0] / p, (s.frame.heightPx - 1) / 2 + s.frame.centerM[1] / p];
}

const um = (x: number) => `${x} um`;

describe('locatePattern on simulated frames', { timeout: 60_000 }, () => {
  it('whole shadow in the frame (2a = 0.9 mm, L = 80 mm, Fresnel number 4): centre within 1 px, region holds the shadow and its fringes', () => {
    // One offset here (simulating this frame is the slowest step); test/frames/services.test.ts runs another.
    for (const [fx, fy, seed] of [[80, -80, 1]]) {
      const s = scene({ disc: { diameter: '0.9 mm' }, beam: { radius: '1.5 mm', curvatureRadius: 'collimated' }, camera: { distance: '80 mm', pixelPitch: '10 um', bitDepth: 12 }, frame: { width: 256, height: 256, center: [um(fx), um(fy)] } });
      const p = prepared(s, 3000, seed);
      const exp = expectedPattern(s);
      const loc = locatePattern(p, exp);
      const [tx, ty] = truthPx(s);
      expect(Math.abs(loc.centerPx[0] - tx), `x, offset ${fx}, ${fy} µm`).toBeLessThanOrEqual(1);
      expect(Math.abs(loc.centerPx[1] - ty), `y, offset ${fx}, ${fy} µm`).toBeLessThanOrEqual(1);
      expect(loc.method).toMatch(/inside the shadow found by a circle fit/);
      // The geometric shadow radius a·M/p = 45 px, from the circle fit corrected to the geometric edge.
      expect(loc.shadowRadiusPx!).toBeGreaterThan(0.85 * exp.shadowRadiusPx);
      expect(loc.shadowRadiusPx!).toBeLessThan(1.15 * exp.shadowRadiusPx);
      expect(loc.confidence).toBeGreaterThan(0.8);
      const reg = chooseRegion(p, loc, exp);
      expect(reg.holdsWholeShadow).toBe(true);
      expect(reg.radiusPx).toBeGreaterThan(loc.shadowRadiusPx! + 3.9 * exp.edgeFringeScalePx);
      expect(reg.description).toMatch(/the whole shadow .* first four edge fringes/);
    }
  });

  it('shadow edge partly in the frame, beam decentred, astigmatism and defocus: centre within 1 px', () => {
    for (const [fx, fy, seed] of [
      [80, -50, 3],
      [-60, 80, 4],
    ]) {
      const s = scene({
        beam: { radius: '3 mm', center: ['0.5 mm', '-0.3 mm'], curvatureRadius: 'collimated' },
        aberrations: { '3': 0.05, '4': 0.05, '5': 0.1 },
        frame: { width: 192, height: 192, center: [um(fx), um(fy)] },
      });
      const loc = locatePattern(prepared(s, 3000, seed), expectedPattern(s));
      const [tx, ty] = truthPx(s);
      expect(Math.hypot(loc.centerPx[0] - tx, loc.centerPx[1] - ty), `offset ${fx}, ${fy} µm`).toBeLessThanOrEqual(1);
      expect(loc.spotCenterPx).not.toBe(null);
    }
  });

  it('only the inside of the shadow in the frame: the spot alone gives the centre within 1 px', () => {
    const s = scene({ frame: { width: 128, height: 128, center: ['-80 um', '80 um'] } });
    const p = prepared(s, 3000, 6);
    const exp = expectedPattern(s);
    const loc = locatePattern(p, exp);
    const [tx, ty] = truthPx(s);
    expect(Math.hypot(loc.centerPx[0] - tx, loc.centerPx[1] - ty)).toBeLessThanOrEqual(1);
    expect(loc.method).toMatch(/shadow edge is outside the frame/);
    expect(loc.shadowRadiusPx).toBe(null);
    const reg = chooseRegion(p, loc, exp);
    expect(reg.holdsWholeShadow).toBe(false);
    // Largest circle around the centre that fits: the distance to the nearest frame edge.
    expect(reg.radiusPx).toBeCloseTo(Math.min(loc.centerPx[0] + 0.5, 127.5 - loc.centerPx[0], loc.centerPx[1] + 0.5, 127.5 - loc.centerPx[1]), 9);
    expect(reg.description).toMatch(/inside of the shadow only/);
  });

  it('with coma the spot sits where the rim tilt puts it, L·A/a from the axis', () => {
    // Horizontal coma Z8 = √8·(3ρ³ − 2ρ)·cos θ (ANSI Z80.28); at the rim ρ = a / zernike.radius its cos θ part
    // has amplitude A = c·√8·(3ρ³ − 2ρ) waves; the spot moves by L·A·λ/a along x (lab), i.e. along the columns.
    const c8 = 0.05;
    const s = scene({ aberrations: { '8': c8 }, frame: { width: 128, height: 128, center: ['0 um', '0 um'] } });
    const loc = locatePattern(prepared(s, 3000, 7), expectedPattern(s));
    const rho = s.disc.radiusM / s.zernikeRadiusM;
    const A = c8 * Math.sqrt(8) * (3 * rho ** 3 - 2 * rho) * s.wavelengthM;
    const shiftPx = (s.camera.distanceM * A) / s.disc.radiusM / s.camera.pixelPitchM;
    const [tx, ty] = truthPx(s);
    expect(Math.abs(shiftPx)).toBeGreaterThan(1.5); // the effect is worth testing
    expect(loc.centerPx[0] - tx).toBeCloseTo(shiftPx, 0);
    expect(Math.abs(loc.centerPx[0] - tx - shiftPx)).toBeLessThan(0.5);
    expect(Math.abs(loc.centerPx[1] - ty)).toBeLessThan(0.5);
  });

  it('refuses a saturated Arago spot with advice', () => {
    const s = scene({ frame: { width: 128, height: 128, center: ['30 um', '0 um'] } });
    let err: unknown;
    try {
      locatePattern(prepared(s, 9000, 8, 'hot-spot.png'), expectedPattern(s));
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(FrameError);
    expect((err as FrameError).reason).toBe('mostly saturated');
    expect((err as FrameError).message).toMatch(/^hot-spot\.png: mostly saturated: the Arago spot at column .* is saturated .*; attenuate the beam or shorten the exposure$/);
  });
});

describe('locatePattern: frames without a disc shadow', () => {
  const expectations = [
    { shadowRadiusPx: 60, spotRadiusPx: 9.7 },
    { shadowRadiusPx: 300, spotRadiusPx: 20 },
    { shadowRadiusPx: 30, spotRadiusPx: 4 },
  ];
  const N = 160;
  const cases: [string, Float64Array][] = [
    ['gaussian-wide.png', bump(N, N, 3000, 20, 60)],
    ['gaussian-small.png', bump(N, N, 3000, 20, 15)],
    ['uniform.png', Float64Array.from(gaussianNoise(N * N, 20, 3), (v) => Math.round(2000 + v))],
  ];
  for (const [name, data] of cases) {
    it(`says "no disc shadow found in ${name}"`, () => {
      const noisy = data.map((v, k) => Math.max(0, Math.round(v + 3 * Math.sin(k * 12.9898) * 0.5)));
      const p = prepareFrames([frameOf(noisy, N, N)], [], camera12(), [name]);
      for (const exp of expectations) {
        let err: unknown;
        try {
          locatePattern(p, exp);
        } catch (e) {
          err = e;
        }
        expect(err, `${name} ${JSON.stringify(exp)}`).toBeInstanceOf(FrameError);
        expect((err as FrameError).reason).toBe('no disc shadow');
        expect((err as FrameError).message).toContain(`no disc shadow found in ${name}`);
      }
    });
  }
});
