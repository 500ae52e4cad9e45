/**
 * The bench-plan file, "shadowfront-plan/1" (core/plan/parsePlan.ts).
 *
 * Sources of the checks:
 * - unit conversions: SI Brochure, 9th ed. (BIPM 2019), Table 7 (prefixes);
 * - largest count of an unsigned n-bit integer, 2^n − 1 (C11 standard, ISO/IEC 9899:2011, §6.2.6.2);
 * - accepted ranges, defaults and messages: the format rules written in core/plan/README.md
 *   (this project's specification; marked "format rule" below).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { SetupFieldError, parsePlan } from '../../core/plan/parsePlan.ts';

const EXAMPLE = new URL('../../resources/examples/plan-example.json', import.meta.url);

function basePlan(): Record<string, any> {
  return {
    format: 'shadowfront-plan/1',
    laser: { wavelength: '632.8 nm', beamRadius: '4 mm', curvatureRadius: 'collimated' },
    camera: { pixelPitch: '5.5 um', sensorSize: [1280, 1024], bitDepth: 12, peakCounts: 3000, readNoise: 3 },
    candidates: { discDiameters: ['2 mm', '3 mm'], cameraDistances: { from: '0.4 m', to: '1.2 m', steps: 5 } },
  };
}

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

function fieldError(json: unknown): SetupFieldError {
  try {
    parsePlan(json, 'bench-plan.json');
  } catch (err) {
    expect(err).toBeInstanceOf(SetupFieldError);
    return err as SetupFieldError;
  }
  throw new Error('expected a SetupFieldError, got none');
}

describe('the example plan', () => {
  it('parses, is marked synthetic, and expands its distance range', () => {
    const json = JSON.parse(readFileSync(EXAMPLE, 'utf8'));
    // Format rule: every bundled example says it is synthetic.
    expect(json.note).toBe('synthetic example generated for Shadowfront');
    const plan = parsePlan(json, 'plan-example.json');
    expect(plan.wavelengthM).toBeCloseTo(632.8e-9, 20);
    expect(plan.discDiametersM).toEqual([2e-3, 3e-3, 4e-3]);
    expect(plan.cameraDistancesM.length).toBe(5);
    [0.3, 0.6, 0.9, 1.2, 1.5].forEach((L, i) => expect(plan.cameraDistancesM[i]).toBeCloseTo(L, 14));
    expect(plan.camera.sensorPx).toEqual([1280, 1024]);
    expect(plan.terms).toEqual([3, 4, 5, 7, 8]);
  });
});

describe('parsePlan', () => {
  it('reads SI values and the defaults (format rules)', () => {
    const plan = parsePlan(basePlan(), 'p.json');
    expect(plan.beamRadiusM).toBeCloseTo(4e-3, 18);
    expect(plan.curvatureRadiusM).toBe(Infinity);
    expect(plan.camera.pixelPitchM).toBeCloseTo(5.5e-6, 20);
    expect(plan.camera.gainCountsPerElectron).toBe(1);
    expect(plan.camera.averagedFrames).toBe(1);
    expect(plan.edgeRoughnessM).toBe(0);
    expect(plan.sourceSizeM).toBe(0);
    expect(plan.zernikeRadiusM).toBe(plan.beamRadiusM);
    expect(plan.terms).toEqual([3, 4, 5, 7, 8]);
    expect(plan.aberrations).toEqual([]);
    expect(plan.cameraDistancesM[0]).toBeCloseTo(0.4, 15);
    expect(plan.cameraDistancesM[4]).toBe(1.2);
    expect(plan.cameraDistancesM[2]).toBeCloseTo(0.8, 15);
  });

  it('reads the optional fields', () => {
    const json = {
      ...basePlan(),
      laser: { wavelength: '532 nm', beamRadius: '3 mm', curvatureRadius: '2 m' },
      edgeRoughness: '0.5 um',
      source: { size: '20 um' },
      terms: [8, 3, 5],
      zernike: { radius: '2.5 mm' },
      aberrations: { '5': 0.05 },
    };
    const plan = parsePlan(json);
    expect(plan.curvatureRadiusM).toBe(2);
    expect(plan.edgeRoughnessM).toBeCloseTo(5e-7, 20);
    expect(plan.sourceSizeM).toBeCloseTo(2e-5, 20);
    expect(plan.terms).toEqual([3, 5, 8]);
    expect(plan.zernikeRadiusM).toBeCloseTo(2.5e-3, 18);
    expect(plan.aberrations).toEqual([{ j: 5, waves: 0.05 }]);
    expect(parsePlan(withField(basePlan(), 'candidates.discDiameters', { from: '3 mm', to: '3 mm', steps: 1 })).discDiametersM).toEqual([3e-3]);
  });

  it.each([
    ['laser.wavelength', '632.8 parsecs', '"632.8 parsecs"'],
    ['laser.beamRadius', 4, '4'],
    ['laser.curvatureRadius', '0 m', '"0 m"'],
    ['camera.sensorSize', [1280], '[1280]'],
    ['camera.sensorSize', undefined, 'missing'],
    ['camera.bitDepth', 12.5, '12.5'],
    ['camera.peakCounts', 5000, '5000'],
    ['camera.readNoise', -1, '-1'],
    ['candidates.discDiameters', [], '[]'],
    ['candidates.cameraDistances.steps', 2.5, '2.5'],
    ['candidates.cameraDistances.from', '0.4', '"0.4"'],
    ['candidates.cameraDistances.to', '0.2 m', '"0.2 m"'],
    ['edgeRoughness', '-1 um', '"-1 um"'],
    ['terms', [1, 4], '1'],
  ])('names the file, the field and the value: %s = %j', (path, value, shown) => {
    const err = fieldError(withField(basePlan(), path, value));
    expect(err.file).toBe('bench-plan.json');
    expect(err.path.startsWith(path.replace(/\.$/, ''))).toBe(true);
    expect(err.message.startsWith(`bench-plan.json: field "${err.path}"`)).toBe(true);
    expect(err.message).toContain(`is ${shown}`);
  });

  it('refuses peak counts above the full scale of the bit depth (2^12 − 1 = 4095)', () => {
    expect(parsePlan(withField(basePlan(), 'camera.peakCounts', 4095)).camera.peakCounts).toBe(4095);
    const err = fieldError(withField(basePlan(), 'camera.peakCounts', 4096));
    expect(err.path).toBe('camera.peakCounts');
    expect(err.expected).toContain('4095');
  });

  it('catches typos with a suggestion', () => {
    const err = fieldError(withField(basePlan(), 'camera.readNoize', 3));
    expect(err.problem).toBe('unknown');
    expect(err.suggestion).toBe('camera.readNoise');
    const misplaced = fieldError({ ...basePlan(), pixelPitch: '5 um' });
    expect(misplaced.suggestion).toBe('camera.pixelPitch');
  });

  it('refuses a disc as large as the nearest camera distance (Fresnel model) or above 10 beam radii', () => {
    const wide = withField(basePlan(), 'laser.beamRadius', '100 mm');
    const err = fieldError(withField(wide, 'candidates.discDiameters', ['2 mm', '500 mm']));
    expect(err.path).toBe('candidates.discDiameters');
    expect(err.message).toContain('"500 mm"');
    expect(err.expected).toContain('400 mm');
    const beam = fieldError(withField(basePlan(), 'candidates.discDiameters', ['2 mm', '90 mm']));
    expect(beam.path).toBe('candidates.discDiameters');
    expect(beam.expected).toContain('80 mm');
  });

  it('refuses camera distances at or beyond the focus of a converging beam', () => {
    const err = fieldError(withField(basePlan(), 'laser.curvatureRadius', '-1 m'));
    expect(err.path).toBe('candidates.cameraDistances');
    expect(err.detail).toContain('focus');
    expect(parsePlan(withField(basePlan(), 'laser.curvatureRadius', '-1.5 m')).curvatureRadiusM).toBe(-1.5);
  });

  it('refuses a finite source with a collimated beam, and aberrations of terms not fitted', () => {
    const src = fieldError({ ...basePlan(), source: { size: '20 um' } });
    expect(src.path).toBe('source.size');
    expect(src.message).toContain('"20 um"');
    const ab = fieldError({ ...basePlan(), aberrations: { '12': 0.1 } });
    expect(ab.path).toBe('aberrations.12');
    expect(ab.message).toContain('0.1');
  });

  it('refuses another format and content that is not an object', () => {
    expect(fieldError({ ...basePlan(), format: 'shadowfront-setup/1' }).path).toBe('format');
    expect(fieldError([1, 2]).path).toBe('');
    const many = fieldError(withField(basePlan(), 'candidates.discDiameters', { from: '1 mm', to: '5 mm', steps: 50 }));
    expect(many.path).toBe('candidates.cameraDistances');
    expect(many.detail).toContain('250');
  });
});
