/**
 * The setup ("shadowfront-setup/1") and scene ("shadowfront-scene/1") file formats.
 *
 * Sources of the checks:
 * - unit conversions: SI Brochure, 9th ed. (BIPM 2019), Table 7 (prefixes) and Table 8 (1° = π/180 rad);
 * - largest count of an unsigned n-bit integer, 2^n − 1 (C11 standard, ISO/IEC 9899:2011, §6.2.6.2);
 * - accepted ranges, defaults and messages: the format rules written in core/setup/README.md
 *   (this project's specification; marked "format rule" below).
 */
import { readFileSync, readdirSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { SetupFieldError, parseSetup, setupToJson } from '../../core/setup/parseSetup.ts';
import { parseScene, sceneToJson } from '../../core/setup/parseScene.ts';
import type { BenchSetup, Scene } from '../../core/setup/types.ts';

const EXAMPLES = new URL('../../resources/examples/', import.meta.url);

function readExample(name: string): unknown {
  return JSON.parse(readFileSync(new URL(name, EXAMPLES), 'utf8'));
}

/** |a − b| ≤ 1e-15·|b|. */
function expectClose(actual: number, expected: number): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(1e-15 * Math.abs(expected));
}

/** A minimal valid setup file. */
function baseSetup(): Record<string, any> {
  return {
    format: 'shadowfront-setup/1',
    wavelength: '632.8 nm',
    beam: { radius: '4 mm', center: ['0 mm', '0 mm'], curvatureRadius: 'collimated' },
    disc: { diameter: '3 mm' },
    camera: { distance: '800 mm', pixelPitch: '5.5 um', bitDepth: 12 },
    zernike: { radius: '4 mm' },
  };
}

/** A minimal valid scene file. */
function baseScene(): Record<string, any> {
  return { ...baseSetup(), format: 'shadowfront-scene/1', frame: { width: 256, height: 256 } };
}

function catchFieldError(f: () => unknown): SetupFieldError {
  try {
    f();
  } catch (err) {
    expect(err).toBeInstanceOf(SetupFieldError);
    expect(err).toBeInstanceOf(Error);
    return err as SetupFieldError;
  }
  throw new Error('expected a SetupFieldError, got none');
}

/** Set a dotted path (array items as numbers) in a JSON object, or delete it when value is undefined. */
function withField(json: Record<string, any>, path: string, value: unknown): Record<string, any> {
  const copy = structuredClone(json);
  const keys = path.split('.');
  let node: any = copy;
  for (const key of keys.slice(0, -1)) {
    if (node[key] === undefined) node[key] = {};
    node = node[key];
  }
  const last = keys[keys.length - 1];
  if (value === undefined) delete node[last];
  else node[last] = value;
  return copy;
}

describe('example files', () => {
  // Bench plans ("shadowfront-plan/1") are checked in test/plan/parsePlan.test.ts.
  const files = readdirSync(EXAMPLES).filter((f) => f.endsWith('.json') && !f.startsWith('plan-'));

  it('include the four documented examples', () => {
    for (const name of ['setup-hene-collimated.json', 'scene-hene-astig.json', 'scene-diverging-green.json', 'scene-clean.json']) {
      expect(files).toContain(name);
    }
  });

  it.each(files)('%s parses, is marked synthetic and round-trips', (name) => {
    const json = readExample(name) as Record<string, unknown>;
    // Format rule: every example is marked as synthetic.
    expect(json.note).toBe('synthetic example generated for Shadowfront');
    if (json.format === 'shadowfront-setup/1') {
      const setup = parseSetup(json, name);
      const text = JSON.stringify(setupToJson(setup, { note: String(json.note) }));
      expect(parseSetup(JSON.parse(text), name)).toStrictEqual(setup);
    } else {
      expect(json.format).toBe('shadowfront-scene/1');
      const scene = parseScene(json, name);
      const text = JSON.stringify(sceneToJson(scene, { note: String(json.note) }));
      expect(parseScene(JSON.parse(text), name)).toStrictEqual(scene);
    }
  });

  it('setup-hene-collimated.json gives the SI values it states', () => {
    const setup = parseSetup(readExample('setup-hene-collimated.json'), 'setup-hene-collimated.json');
    // Prefixes: SI Brochure, 9th ed., Table 7.
    expectClose(setup.wavelengthM, 632.8e-9);
    expectClose(setup.beam.radiusM, 4e-3);
    expect(setup.beam.centerM).toStrictEqual([0, 0]);
    expect(setup.beam.curvatureRadiusM).toBe(Number.POSITIVE_INFINITY);
    expectClose(setup.disc.radiusM, 1.5e-3); // radius = diameter / 2 (format rule)
    expectClose(setup.camera.distanceM, 0.8);
    expectClose(setup.camera.pixelPitchM, 5.5e-6);
    expect(setup.camera.bitDepth).toBe(12);
    // Largest 12-bit count, 2^12 − 1 = 4095 (ISO/IEC 9899:2011 §6.2.6.2); the default saturation (format rule).
    expect(setup.camera.saturationCounts).toBe(4095);
    expectClose(setup.zernikeRadiusM, 4e-3);
    expect(setup.source.sizeM).toBe(0);
  });

  it('scene-hene-astig.json gives its aberrations, frame and noise', () => {
    const scene = parseScene(readExample('scene-hene-astig.json'), 'scene-hene-astig.json');
    expect(scene.aberrations).toStrictEqual([
      { j: 4, waves: 0.05 },
      { j: 5, waves: 0.1 },
      { j: 8, waves: 0.05 },
    ]);
    expect(scene.frame).toStrictEqual({ widthPx: 256, heightPx: 256, centerM: [0, 0] });
    expect(scene.noise).toStrictEqual({ peakCounts: 3000, readNoise: 3, offset: 20, seed: 7 });
  });

  it('scene-diverging-green.json gives a diverging beam and a finite source', () => {
    const scene = parseScene(readExample('scene-diverging-green.json'), 'scene-diverging-green.json');
    expectClose(scene.wavelengthM, 532e-9);
    expect(scene.beam.curvatureRadiusM).toBe(2);
    expectClose(scene.beam.radiusM, 2e-3);
    expectClose(scene.disc.radiusM, 1e-3);
    expectClose(scene.camera.distanceM, 0.6);
    expectClose(scene.camera.pixelPitchM, 4.8e-6);
    expectClose(scene.source.sizeM, 20e-6);
    expect(scene.frame.widthPx).toBe(256);
    expect(scene.frame.heightPx).toBe(256);
  });

  it('scene-clean.json has no aberrations and no noise', () => {
    const scene = parseScene(readExample('scene-clean.json'), 'scene-clean.json');
    expect(scene.aberrations).toStrictEqual([]);
    expect(scene.noise).toBeNull();
  });
});

describe('defaults (format rules)', () => {
  it('fills optional fields', () => {
    const json = baseSetup();
    delete json.beam.center;
    delete json.zernike;
    const setup = parseSetup(json);
    expect(setup.beam.centerM).toStrictEqual([0, 0]);
    expect(setup.zernikeRadiusM).toBe(setup.beam.radiusM);
    expect(setup.disc.ellipticity).toBe(0);
    expect(setup.disc.ellipseAngleRad).toBe(0);
    expect(setup.disc.edgeHarmonics).toStrictEqual([]);
    expect(setup.camera.orientation).toStrictEqual({ flipX: false, flipY: false, rotateDeg: 0 });
    expect(setup.source).toStrictEqual({ sizeM: 0 });
  });

  it('defaults zernike.radius to beam.radius inside an empty "zernike" object', () => {
    const setup = parseSetup(withField(baseSetup(), 'zernike', {}));
    expect(setup.zernikeRadiusM).toBe(setup.beam.radiusM);
  });

  it.each([
    // Largest unsigned n-bit count 2^n − 1 (ISO/IEC 9899:2011 §6.2.6.2).
    [8, 255],
    [10, 1023],
    [12, 4095],
    [16, 65535],
  ])('bitDepth %d → saturation %d', (bitDepth, saturation) => {
    expect(parseSetup(withField(baseSetup(), 'camera.bitDepth', bitDepth)).camera.saturationCounts).toBe(saturation);
  });

  it('defaults the noise seed to 1 and an absent or null noise to null', () => {
    const noisy = parseScene({ ...baseScene(), noise: { peakCounts: 3000, readNoise: 3, offset: 20 } });
    expect(noisy.noise?.seed).toBe(1);
    expect(parseScene(baseScene()).noise).toBeNull();
    expect(parseScene({ ...baseScene(), noise: null }).noise).toBeNull();
  });

  it('defaults the frame centre to 0 and the edge-harmonic phase to 0', () => {
    expect(parseScene(baseScene()).frame.centerM).toStrictEqual([0, 0]);
    const setup = parseSetup(withField(baseSetup(), 'disc.edgeHarmonics', [{ order: 3, amplitude: '0.5 um' }]));
    expect(setup.disc.edgeHarmonics).toHaveLength(1);
    expect(setup.disc.edgeHarmonics[0].order).toBe(3);
    expectClose(setup.disc.edgeHarmonics[0].amplitudeM, 0.5e-6); // SI Brochure, Table 7
    expect(setup.disc.edgeHarmonics[0].phaseRad).toBe(0);
  });
});

describe('field values', () => {
  it.each([
    ['collimated', Number.POSITIVE_INFINITY],
    ['inf', Number.POSITIVE_INFINITY],
    ['Infinity', Number.POSITIVE_INFINITY],
    ['2 m', 2],
    ['-1.5 m', -1.5],
    ['500 mm', 0.5],
  ])('beam.curvatureRadius %j → %d m', (text, metres) => {
    expect(parseSetup(withField(baseSetup(), 'beam.curvatureRadius', text)).beam.curvatureRadiusM).toBe(metres);
  });

  it.each([
    ['none', '0 deg', { flipX: false, flipY: false, rotateDeg: 0 }],
    ['horizontal', '90 deg', { flipX: true, flipY: false, rotateDeg: 90 }],
    ['vertical', '180 deg', { flipX: false, flipY: true, rotateDeg: 180 }],
    ['both', '270 deg', { flipX: true, flipY: true, rotateDeg: 270 }],
    ['none', '-90 deg', { flipX: false, flipY: false, rotateDeg: 270 }],
    ['none', '3.141592653589793 rad', { flipX: false, flipY: false, rotateDeg: 180 }], // π rad = 180° (SI Brochure, Table 8)
  ])('orientation flip %s rotate %s', (flip, rotate, expected) => {
    const setup = parseSetup(withField(baseSetup(), 'camera.orientation', { flip, rotate }));
    expect(setup.camera.orientation).toStrictEqual(expected);
  });

  it('reads the disc shape in SI', () => {
    const json = withField(baseSetup(), 'disc', {
      diameter: '3 mm',
      ellipticity: 0.01,
      ellipseAngle: '30 deg',
      edgeHarmonics: [{ order: 200, amplitude: '0.25 \u00B5m', phase: '90 deg' }],
    });
    const { disc } = parseSetup(json);
    expect(disc.ellipticity).toBe(0.01);
    // 1° = π/180 rad (SI Brochure, Table 8); µ = 1e-6 (Table 7).
    expectClose(disc.ellipseAngleRad, Math.PI / 6);
    expect(disc.edgeHarmonics[0].order).toBe(200);
    expectClose(disc.edgeHarmonics[0].amplitudeM, 0.25e-6);
    expectClose(disc.edgeHarmonics[0].phaseRad, Math.PI / 2);
  });

  it('accepts a finite source with a finite source distance', () => {
    const json = withField(withField(baseSetup(), 'beam.curvatureRadius', '2 m'), 'source', { size: '50 um' });
    expectClose(parseSetup(json).source.sizeM, 50e-6);
  });

  it('accepts the wavelength range limits (format rule: 100 nm to 20 um)', () => {
    expectClose(parseSetup(withField(baseSetup(), 'wavelength', '100 nm')).wavelengthM, 100e-9);
    expectClose(parseSetup(withField(baseSetup(), 'wavelength', '0.1 um')).wavelengthM, 100e-9);
    expectClose(parseSetup(withField(baseSetup(), 'wavelength', '20 um')).wavelengthM, 20e-6);
    expectClose(parseSetup(withField(baseSetup(), 'wavelength', '10.6 um')).wavelengthM, 10.6e-6);
  });

  it('sorts the aberrations by j and keeps explicit zeros', () => {
    const scene = parseScene({ ...baseScene(), aberrations: { '12': -0.02, '0': 0, '3': 0.1 } });
    expect(scene.aberrations).toStrictEqual([
      { j: 0, waves: 0 },
      { j: 3, waves: 0.1 },
      { j: 12, waves: -0.02 },
    ]);
  });

  it('allows a free-text note in both formats', () => {
    expect(() => parseSetup({ ...baseSetup(), note: 'bench 2, morning' })).not.toThrow();
    expect(() => parseScene({ ...baseScene(), note: '' })).not.toThrow();
  });
});

describe('round trip', () => {
  const awkward: Scene = {
    wavelengthM: 1064.2e-9,
    beam: { radiusM: 0.1e-3 + 0.2e-3, centerM: [-1.2345678901234567e-4, 3e-5], curvatureRadiusM: -3.3333333333333335 },
    disc: {
      radiusM: 1.23456789e-4,
      ellipticity: -0.012345,
      ellipseAngleRad: 0.7,
      edgeHarmonics: [
        { order: 2, amplitudeM: 1.1e-7, phaseRad: -0.3 },
        { order: 17, amplitudeM: -2.2e-8, phaseRad: 1 },
      ],
    },
    camera: {
      distanceM: 1.2345,
      pixelPitchM: 3.45e-6,
      bitDepth: 10,
      saturationCounts: 1000,
      orientation: { flipX: true, flipY: false, rotateDeg: 270 },
      sensorPx: [5472, 3648],
    },
    zernikeRadiusM: Math.SQRT2 * 1e-3,
    source: { sizeM: 1 / 3e4 },
    aberrations: [
      { j: 3, waves: 1 / 3 },
      { j: 24, waves: -1e-9 },
    ],
    frame: { widthPx: 4096, heightPx: 8, centerM: [1e-4, -2e-4] },
    noise: { peakCounts: 123.456, readNoise: 0, offset: 0, seed: 4294967295 },
  };

  it('parseScene(sceneToJson(x)) reproduces x exactly, also through JSON text', () => {
    const text = JSON.stringify(sceneToJson(awkward));
    expect(parseScene(JSON.parse(text))).toStrictEqual(awkward);
  });

  it('parseSetup(setupToJson(x)) reproduces x exactly', () => {
    const { aberrations: _a, frame: _f, noise: _n, ...setup } = awkward;
    const back: BenchSetup = parseSetup(JSON.parse(JSON.stringify(setupToJson(setup))));
    expect(back).toStrictEqual(setup);
  });

  it('leaves out a null noise and keeps a note', () => {
    const json = sceneToJson({ ...awkward, noise: null }, { note: 'n' });
    expect('noise' in json).toBe(false);
    expect(json.note).toBe('n');
    expect(parseScene(json).noise).toBeNull();
  });

  it('writes readable units (nm, mm, um, deg)', () => {
    const json = setupToJson(parseSetup(readExample('setup-hene-collimated.json')));
    expect(json).toStrictEqual({
      format: 'shadowfront-setup/1',
      wavelength: '632.8 nm',
      beam: { radius: '4 mm', center: ['0 mm', '0 mm'], curvatureRadius: 'collimated' },
      disc: { diameter: '3 mm', ellipticity: 0, ellipseAngle: '0 deg', edgeHarmonics: [] },
      camera: { distance: '800 mm', pixelPitch: '5.5 um', bitDepth: 12, saturation: 4095, orientation: { flip: 'none', rotate: '0 deg' } },
      zernike: { radius: '4 mm' },
      source: { size: '0 mm' },
    });
    const green = sceneToJson(parseScene(readExample('scene-diverging-green.json')));
    expect(green.beam.curvatureRadius).toBe('2000 mm');
    expect(green.source.size).toBe('0.02 mm');
    expect(green.wavelength).toBe('532 nm');
    expect(green.camera.pixelPitch).toBe('4.8 um');
    const shaped = setupToJson(
      parseSetup(withField(baseSetup(), 'disc.edgeHarmonics', [{ order: 4, amplitude: '0.5 um', phase: '30 deg' }])),
    );
    expect(shaped.disc.edgeHarmonics).toStrictEqual([{ order: 4, amplitude: '0.5 um', phase: '30 deg' }]);
  });
});

describe('error messages name file, field, value and expectation', () => {
  it('gives the documented message for a bad unit', () => {
    const err = catchFieldError(() => parseSetup(withField(baseSetup(), 'beam.radius', '4 parsecs'), 'setup.json'));
    expect(err.file).toBe('setup.json');
    expect(err.path).toBe('beam.radius');
    expect(err.value).toBe('4 parsecs');
    expect(err.expected).toBe('a length such as "4 mm"');
    expect(err.problem).toBe('invalid');
    expect(err.message.startsWith('setup.json: field "beam.radius" is "4 parsecs"; expected a length such as "4 mm"')).toBe(true);
    expect(err.message).toContain('parsecs" is not known');
  });

  it('gives the documented message for a missing field', () => {
    const err = catchFieldError(() => parseSetup(withField(baseSetup(), 'camera.distance', undefined), 'setup.json'));
    expect(err.problem).toBe('missing');
    expect(err.value).toBeUndefined();
    expect(err.message).toBe('setup.json: field "camera.distance" is missing; expected a length such as "800 mm"');
  });

  it('uses the default source names "setup" and "scene"', () => {
    expect(catchFieldError(() => parseSetup(withField(baseSetup(), 'wavelength', undefined))).file).toBe('setup');
    expect(catchFieldError(() => parseScene(withField(baseScene(), 'wavelength', undefined))).file).toBe('scene');
  });

  // [mutated path, bad value (undefined = delete), reported path, text the expectation must contain]
  const setupCases: [string, unknown, string, string][] = [
    ['wavelength', '4', 'wavelength', 'a length such as "632.8 nm"'],
    ['wavelength', '3 s', 'wavelength', 'a length'],
    ['wavelength', '50 nm', 'wavelength', 'between 100 nm and 20 um'],
    ['wavelength', '20.1 um', 'wavelength', 'between 100 nm and 20 um'],
    ['wavelength', 632.8, 'wavelength', 'a length'],
    ['beam', undefined, 'beam', 'an object'],
    ['beam', '4 mm', 'beam', 'an object'],
    ['beam.radius', '0 mm', 'beam.radius', 'a positive length'],
    ['beam.radius', '-4 mm', 'beam.radius', 'a positive length'],
    ['beam.center', ['0 mm'], 'beam.center', 'a pair of lengths'],
    ['beam.center', ['0 mm', '1 deg'], 'beam.center[1]', 'a length'],
    ['beam.center', ['0 mm', 0], 'beam.center[1]', 'a length'],
    ['beam.curvatureRadius', undefined, 'beam.curvatureRadius', '"collimated"'],
    ['beam.curvatureRadius', '0 m', 'beam.curvatureRadius', 'nonzero length'],
    ['beam.curvatureRadius', 'straight', 'beam.curvatureRadius', '"collimated"'],
    ['beam.curvatureRadius', '-800 mm', 'beam.curvatureRadius', 'other than -800 mm'],
    ['disc.diameter', undefined, 'disc.diameter', 'a length such as "3 mm"'],
    ['disc.diameter', '80 mm', 'disc.diameter', 'below 80 mm'],
    ['disc.ellipticity', 0.2, 'disc.ellipticity', 'less than 0.2'],
    ['disc.ellipticity', -0.2, 'disc.ellipticity', 'greater than -0.2'],
    ['disc.ellipticity', '0.01', 'disc.ellipticity', 'a plain number'],
    ['disc.ellipseAngle', '30', 'disc.ellipseAngle', 'an angle such as "30 deg"'],
    ['disc.edgeHarmonics', { order: 3 }, 'disc.edgeHarmonics', 'a list'],
    ['disc.edgeHarmonics', [{ order: 0, amplitude: '1 um' }], 'disc.edgeHarmonics[0].order', 'from 1 to 200'],
    ['disc.edgeHarmonics', [{ order: 201, amplitude: '1 um' }], 'disc.edgeHarmonics[0].order', 'from 1 to 200'],
    ['disc.edgeHarmonics', [{ order: 2.5, amplitude: '1 um' }], 'disc.edgeHarmonics[0].order', 'an integer'],
    ['disc.edgeHarmonics', [{ order: 3, amplitude: '1 um' }, { order: 5 }], 'disc.edgeHarmonics[1].amplitude', 'a length such as "0.5 um"'],
    ['disc.edgeHarmonics', [{ order: 3, amplitude: '1.5 mm' }], 'disc.edgeHarmonics', 'add up to less than'],
    ['disc.edgeHarmonics', [{ order: 3, amplitude: '1 um', phase: '1 mm' }], 'disc.edgeHarmonics[0].phase', 'an angle'],
    ['camera.pixelPitch', '5.5', 'camera.pixelPitch', 'a length such as "5.5 um"'],
    ['camera.distance', '2 mm', 'disc.diameter', 'below camera.distance'],
    ['camera.bitDepth', undefined, 'camera.bitDepth', 'an integer from 1 to 16'],
    ['camera.bitDepth', 0, 'camera.bitDepth', 'an integer from 1 to 16'],
    ['camera.bitDepth', 17, 'camera.bitDepth', 'an integer from 1 to 16'],
    ['camera.bitDepth', 12.5, 'camera.bitDepth', 'an integer from 1 to 16'],
    ['camera.bitDepth', '12', 'camera.bitDepth', 'an integer from 1 to 16'],
    // 2^12 − 1 = 4095 is the largest 12-bit count (ISO/IEC 9899:2011 §6.2.6.2).
    ['camera.saturation', 4096, 'camera.saturation', 'from 1 to 4095'],
    ['camera.saturation', 0, 'camera.saturation', 'from 1 to 4095'],
    ['camera.saturation', 1000.5, 'camera.saturation', 'an integer count'],
    ['camera.orientation', { flip: 'sideways' }, 'camera.orientation.flip', '"none", "horizontal", "vertical", "both"'],
    ['camera.orientation', { rotate: '45 deg' }, 'camera.orientation.rotate', '"0 deg", "90 deg", "180 deg", "270 deg"'],
    ['camera.orientation', { rotate: 90 }, 'camera.orientation.rotate', '"90 deg"'],
    ['zernike.radius', '0 mm', 'zernike.radius', 'a positive length'],
    ['source', { size: '50 um' }, 'source.size', 'collimated'],
    ['source', { size: '-1 um' }, 'source.size', 'a length of 0 or more'],
    ['source', {}, 'source.size', 'a length'],
    ['note', 7, 'note', 'free text'],
    ['format', undefined, 'format', '"shadowfront-setup/1"'],
    ['format', 'shadowfront-setup/2', 'format', '"shadowfront-setup/1"'],
    ['format', 'shadowfront-scene/1', 'format', '"shadowfront-setup/1"'],
  ];

  it.each(setupCases)('setup: %s = %j → error at %s', (path, value, reportedPath, expectedPart) => {
    const json = withField(baseSetup(), path, value);
    const err = catchFieldError(() => parseSetup(json, 'bench.json'));
    expect(err.file).toBe('bench.json');
    expect(err.path).toBe(reportedPath);
    expect(err.expected).toContain(expectedPart);
    expect(err.message.startsWith(`bench.json: field "${reportedPath}" is `)).toBe(true);
    expect(err.message).toContain(err.expected);
    if (err.problem === 'missing') {
      expect(err.value).toBeUndefined();
      expect(err.message).toContain('is missing');
    } else {
      // The value shown is the value at the reported path.
      const shown = JSON.stringify(err.value);
      expect(err.message).toContain(shown.length > 80 ? shown.slice(0, 77) : shown);
    }
  });

  const sceneCases: [string, unknown, string, string][] = [
    ['frame', undefined, 'frame', 'an object'],
    ['frame.width', 7, 'frame.width', 'from 8 to 4096'],
    ['frame.height', 4097, 'frame.height', 'from 8 to 4096'],
    ['frame.width', 256.5, 'frame.width', 'an integer'],
    ['frame.height', undefined, 'frame.height', 'an integer number of pixels'],
    ['frame.center', ['1 mm', '1'], 'frame.center[1]', 'a length'],
    ['aberrations', [0.1], 'aberrations', 'ANSI Zernike index'],
    ['aberrations', { '04': 0.1 }, 'aberrations.04', 'ANSI Zernike index'],
    ['aberrations', { '-1': 0.1 }, 'aberrations.-1', 'ANSI Zernike index'],
    ['aberrations', { '4.0': 0.1 }, 'aberrations.4.0', 'ANSI Zernike index'],
    ['aberrations', { defocus: 0.1 }, 'aberrations.defocus', 'ANSI Zernike index'],
    ['aberrations', { '496': 0.1 }, 'aberrations.496', 'from 0 to 495'],
    ['aberrations', { '4': '0.1' }, 'aberrations.4', 'a number of waves'],
    ['aberrations', { '4': null }, 'aberrations.4', 'a number of waves'],
    ['noise', 3000, 'noise', 'an object'],
    ['noise', { readNoise: 3, offset: 20 }, 'noise.peakCounts', 'greater than 0'],
    ['noise', { peakCounts: 0, readNoise: 3, offset: 20 }, 'noise.peakCounts', 'greater than 0'],
    ['noise', { peakCounts: 3000, readNoise: -1, offset: 20 }, 'noise.readNoise', 'at least 0'],
    ['noise', { peakCounts: 3000, readNoise: 3, offset: -1 }, 'noise.offset', 'at least 0'],
    ['noise', { peakCounts: 3000, readNoise: 3, offset: 4095 }, 'noise.offset', 'below camera.saturation'],
    ['noise', { peakCounts: 3000, readNoise: 3, offset: 20, seed: 0 }, 'noise.seed', 'an integer from 1 to 4294967295'],
    ['noise', { peakCounts: 3000, readNoise: 3, offset: 20, seed: 2 ** 32 }, 'noise.seed', 'an integer from 1 to 4294967295'],
    ['noise', { peakCounts: 3000, readNoise: 3, offset: 20, seed: 1.5 }, 'noise.seed', 'an integer'],
    ['format', 'shadowfront-setup/1', 'format', '"shadowfront-scene/1"'],
    ['wavelength', '4 parsecs', 'wavelength', 'a length'],
  ];

  it.each(sceneCases)('scene: %s = %j → error at %s', (path, value, reportedPath, expectedPart) => {
    const json = withField(baseScene(), path, value);
    const err = catchFieldError(() => parseScene(json, 'scene.json'));
    expect(err.file).toBe('scene.json');
    expect(err.path).toBe(reportedPath);
    expect(err.expected).toContain(expectedPart);
    expect(err.message.startsWith(`scene.json: field "${reportedPath}" is `)).toBe(true);
    expect(err.message).toContain(err.expected);
  });

  it('refuses content that is not a JSON object', () => {
    for (const value of [null, [1, 2], 'setup', 42]) {
      const err = catchFieldError(() => parseSetup(value, 'setup.json'));
      expect(err.path).toBe('');
      expect(err.message).toContain('setup.json: the file content is');
      expect(err.expected).toContain('"format": "shadowfront-setup/1"');
    }
  });

  it('reads "noise.offset" against a custom saturation', () => {
    const json = { ...withField(baseScene(), 'camera.saturation', 1000), noise: { peakCounts: 500, readNoise: 1, offset: 999 } };
    expect(parseScene(json).noise?.offset).toBe(999);
    const err = catchFieldError(() => parseScene({ ...json, noise: { peakCounts: 500, readNoise: 1, offset: 1000 } }));
    expect(err.expected).toContain('1000 counts');
  });
});

describe('unknown fields', () => {
  it.each([
    ['beam', 'radus', 'beam.radius'],
    ['beam', 'raduis', 'beam.radius'],
    ['beam', 'curvatureRadiusM', 'beam.curvatureRadius'],
    ['camera', 'pixel_pitch', 'camera.pixelPitch'],
    ['camera', 'bitdepth', 'camera.bitDepth'],
    ['camera', 'saturaton', 'camera.saturation'],
    ['disc', 'elipticity', 'disc.ellipticity'],
    ['disc', 'diametre', 'disc.diameter'],
  ])('%s.%s → did you mean %s', (parent, typo, suggestion) => {
    const json = baseSetup();
    json[parent][typo] = '1 mm';
    const err = catchFieldError(() => parseSetup(json, 'setup.json'));
    expect(err.problem).toBe('unknown');
    expect(err.path).toBe(`${parent}.${typo}`);
    expect(err.value).toBe('1 mm');
    expect(err.suggestion).toBe(suggestion);
    expect(err.message).toContain(`setup.json: field "${parent}.${typo}" is not a known field`);
    expect(err.message).toContain(`did you mean "${suggestion}"?`);
    expect(err.message).toContain('"1 mm"');
  });

  it('suggests the right place for a field written at the wrong level', () => {
    const err = catchFieldError(() => parseSetup({ ...baseSetup(), pixelPitch: '5.5 um' }, 'setup.json'));
    expect(err.path).toBe('pixelPitch');
    expect(err.suggestion).toBe('camera.pixelPitch');
  });

  it('catches typos at the top level, in scenes and in list items', () => {
    expect(catchFieldError(() => parseSetup({ ...baseSetup(), wavelenght: '1 um' })).suggestion).toBe('wavelength');
    expect(catchFieldError(() => parseScene({ ...baseScene(), aberations: {} })).suggestion).toBe('aberrations');
    expect(catchFieldError(() => parseScene(withField(baseScene(), 'frame.widht', 256))).suggestion).toBe('frame.width');
    const noisy = { ...baseScene(), noise: { peakCounts: 1, readNoise: 1, offset: 1, sead: 3 } };
    expect(catchFieldError(() => parseScene(noisy)).suggestion).toBe('noise.seed');
    const harmonics = withField(baseSetup(), 'disc.edgeHarmonics', [{ order: 3, amplitude: '1 um', phse: '0 deg' }]);
    expect(catchFieldError(() => parseSetup(harmonics)).suggestion).toBe('disc.edgeHarmonics[0].phase');
  });

  it('reports a field with no close match without a suggestion', () => {
    const err = catchFieldError(() => parseSetup({ ...baseSetup(), colour: 'red' }, 'setup.json'));
    expect(err.problem).toBe('unknown');
    expect(err.suggestion).toBeUndefined();
    expect(err.message).not.toContain('did you mean');
    expect(err.message).toContain('"wavelength"'); // lists the known fields
  });

  it('explains that scene fields do not belong in a setup file', () => {
    const err = catchFieldError(() => parseSetup({ ...baseSetup(), frame: { width: 256, height: 256 } }, 'setup.json'));
    expect(err.path).toBe('frame');
    expect(err.detail).toContain('only scene files');
  });
});

describe('camera.sensorSize (optional)', () => {
  it('is null when absent and [width, height] in pixels when given (format rule)', () => {
    expect(parseSetup(baseSetup()).camera.sensorPx).toBeNull();
    expect(parseSetup(withField(baseSetup(), 'camera.sensorSize', [1280, 1024])).camera.sensorPx).toStrictEqual([1280, 1024]);
    expect(parseScene(withField(baseScene(), 'camera.sensorSize', [8, 65536])).camera.sensorPx).toStrictEqual([8, 65536]);
  });

  it('is written back only when known', () => {
    const known = setupToJson(parseSetup(withField(baseSetup(), 'camera.sensorSize', [1920, 1200])));
    expect(known.camera.sensorSize).toStrictEqual([1920, 1200]);
    expect(parseSetup(JSON.parse(JSON.stringify(known))).camera.sensorPx).toStrictEqual([1920, 1200]);
    expect('sensorSize' in setupToJson(parseSetup(baseSetup())).camera).toBe(false);
  });

  it.each([
    ['camera.sensorSize', [1280], '[1280]'],
    ['camera.sensorSize', '1280 x 1024', '"1280 x 1024"'],
    ['camera.sensorSize[0]', [1280.5, 1024], '1280.5'],
    ['camera.sensorSize[1]', [1280, 4], '4'],
    ['camera.sensorSize[1]', [1280, '1024 px'], '"1024 px"'],
  ])('refuses a bad value at %s, naming the file, the field and the value', (path, value, shown) => {
    const err = catchFieldError(() => parseSetup(withField(baseSetup(), 'camera.sensorSize', value), 'bench.json'));
    expect(err.file).toBe('bench.json');
    expect(err.path).toBe(path);
    expect(err.message).toContain(`bench.json: field "${path}" is ${shown}`);
    expect(err.message).toContain('pixel');
  });
});
