/**
 * Finite source: a source of size S at distance G blurs the pattern by S·L/G on the camera
 * (physics notes §2; geometric projection through the disc centre, paraxial).
 */
import { describe, expect, it } from 'vitest';
import { fastField } from '../../core/optics/fast/rimModel.ts';
import { simulateIntensity } from '../../core/optics/simulate.ts';
import { parseScene } from '../../core/setup/parseScene.ts';
import { intensityOf, linspace, makeSetup } from './helpers.ts';

describe('finite-source blur S·L/G', () => {
  it('a point source moved sideways by s moves the spot by −s·L/G (the projection behind the blur rule)', () => {
    // A source at lateral offset s and distance G adds the tilt W = −s·x/G at the disc (paraxial spherical wave).
    // ANSI Z2 = 2ρcosθ, so W = λ·c2·2x/ρz gives c2 = −s·ρz/(2λG).
    const G = 0.5;
    const L = 0.8;
    const s = 100e-6;
    const setup = makeSetup({ curvatureRadiusM: G, distanceM: L, beamRadiusM: 6e-3, zernikeRadiusM: 6e-3 });
    const c2 = (-s * setup.zernikeRadiusM) / (2 * setup.wavelengthM * G);
    const expected = (-s * L) / G;
    const xs = linspace(expected - 60e-6, expected + 60e-6, 121);
    const I = intensityOf(fastField(setup, [{ j: 2, waves: c2 }], xs, Float64Array.from([0])));
    let k = 1;
    for (let i = 1; i < xs.length - 1; i++) if (I[i] > I[k]) k = i;
    // parabolic refinement of the peak
    const dx = xs[1] - xs[0];
    const peak = xs[k] + (0.5 * dx * (I[k - 1] - I[k + 1])) / (I[k - 1] - 2 * I[k] + I[k + 1]);
    expect(Math.abs(peak - expected)).toBeLessThan(0.01 * Math.abs(expected));
  });

  it('a large source spreads the spot to a plateau of diameter ≈ S·L/G (power conservation of the blur: test/camera/blur.test.ts)', () => {
    const make = (size: string) =>
      parseScene(
        {
          format: 'shadowfront-scene/1',
          wavelength: '632.8 nm',
          beam: { radius: '6 mm', curvatureRadius: '0.5 m' },
          disc: { diameter: '3 mm' },
          camera: { distance: '0.8 m', pixelPitch: '5.5 um', bitDepth: 12 },
          source: { size },
          frame: { width: 201, height: 201 },
        },
        'blur scene',
      );
    const blurred = simulateIntensity(make('600 um'), { oversample: 1 });
    const diameterM = (600e-6 * 0.8) / 0.5; // 960 µm
    const pitch = 5.5e-6;
    const c = 100;
    const row = (img: Float64Array) => Array.from(img.subarray(c * 201, (c + 1) * 201));
    const b = row(blurred.intensity);
    // Radius where the blurred profile falls to halfway between its centre and its level 1.5 radii out.
    const rPx = diameterM / 2 / pitch;
    const centre = b[c];
    const outside = b[c + Math.round(1.1 * rPx)];
    const half = (centre + outside) / 2;
    let i = c;
    while (i < 200 && b[i] > half) i++;
    const halfRadiusM = (i - c) * pitch;
    expect(Math.abs(2 * halfRadiusM - diameterM) / diameterM).toBeLessThan(0.15);
  });
});
