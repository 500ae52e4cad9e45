/**
 * The bench-plan file, format "shadowfront-plan/1": the laser, the camera and the candidate discs and
 * distances to compare. Parsed into SI (`BenchPlan`) at the edge; unit strings go through core/units.
 * Errors name the file, the field path, the value and what was expected (SetupFieldError, as for setup
 * files). Field-by-field documentation: core/plan/README.md. Pure: no Node built-ins.
 */
import { FieldReader, childPath, isPlainObject, type Field } from '../setup/fieldReader.ts';
import { MAX_DISC_TO_BEAM_RADIUS, WAVELENGTH_MAX_M, WAVELENGTH_MIN_M, readCurvature, readSensorSize } from '../setup/parseSetup.ts';
import { formatQuantity } from '../units/parseQuantity.ts';
import { DEFAULT_TERMS, OPTIONAL_TERMS } from '../fit/fitShadow.ts';
import type { ZernikeTerm } from '../setup/types.ts';
import { PLAN_FORMAT, type BenchPlan } from './types.ts';

export { SetupFieldError } from '../setup/fieldReader.ts';
export { PLAN_FORMAT } from './types.ts';

const TOP_FIELDS = ['format', 'note', 'laser', 'camera', 'candidates', 'edgeRoughness', 'source', 'terms', 'zernike', 'aberrations'];
const LASER_FIELDS = ['wavelength', 'beamRadius', 'curvatureRadius'];
const CAMERA_FIELDS = ['pixelPitch', 'sensorSize', 'bitDepth', 'peakCounts', 'readNoise', 'gain', 'averagedFrames'];
const CANDIDATE_FIELDS = ['discDiameters', 'cameraDistances'];
const RANGE_FIELDS = ['from', 'to', 'steps'];
const SOURCE_FIELDS = ['size'];
const ZERNIKE_FIELDS = ['radius'];

export const PLAN_FIELD_PATHS: readonly string[] = [
  ...TOP_FIELDS,
  ...LASER_FIELDS.map((k) => `laser.${k}`),
  ...CAMERA_FIELDS.map((k) => `camera.${k}`),
  ...CANDIDATE_FIELDS.map((k) => `candidates.${k}`),
  ...CANDIDATE_FIELDS.flatMap((c) => RANGE_FIELDS.map((k) => `candidates.${c}.${k}`)),
  ...SOURCE_FIELDS.map((k) => `source.${k}`),
  ...ZERNIKE_FIELDS.map((k) => `zernike.${k}`),
];

/** Most values one list or range may give, and most candidates (discs × distances) in one plan. */
export const MAX_VALUES_PER_LIST = 50;
export const MAX_CANDIDATES = 200;
/** Terms a plan may free: those the fit accepts. */
export const PLAN_TERMS: readonly number[] = [...DEFAULT_TERMS, ...OPTIONAL_TERMS].sort((a, b) => a - b);

/**
 * Parse a "shadowfront-plan/1" JSON value (already decoded with JSON.parse) into SI units.
 * `sourceName` names the file in error messages, e.g. "plan.json".
 * @throws SetupFieldError naming the file, the field path, the value and what was expected.
 */
export function parsePlan(json: unknown, sourceName = 'plan'): BenchPlan {
  const reader: FieldReader = new FieldReader(sourceName, PLAN_FIELD_PATHS);
  const example = `{"format": "${PLAN_FORMAT}", ...}`;
  const top: Field = { value: json, path: '', present: json !== undefined };
  if (!isPlainObject(json)) reader.fail(top, `a JSON object such as ${example}`);
  const formatField = reader.at(json, 'format', '');
  if (!formatField.present) reader.missing(formatField, `"${PLAN_FORMAT}"`);
  if (formatField.value !== PLAN_FORMAT) {
    const other = typeof formatField.value === 'string' && formatField.value.startsWith('shadowfront-');
    reader.fail(formatField, `"${PLAN_FORMAT}"`, other ? 'this is another kind of Shadowfront file, or a version this program does not read' : undefined);
  }
  const root = reader.object(top, TOP_FIELDS, example);
  const note = reader.at(root, 'note', '');
  if (note.present && typeof note.value !== 'string') reader.fail(note, 'free text (a JSON string)');

  // Laser.
  const laserField = reader.at(root, 'laser', '');
  const laser = reader.object(laserField, LASER_FIELDS, '{"wavelength": "632.8 nm", "beamRadius": "4 mm", "curvatureRadius": "collimated"}');
  const wavelengthField = reader.at(laser, 'wavelength', 'laser');
  const wavelengthM = reader.length(wavelengthField, '632.8 nm');
  if (!(wavelengthM >= WAVELENGTH_MIN_M * (1 - 1e-12) && wavelengthM <= WAVELENGTH_MAX_M * (1 + 1e-12))) {
    reader.fail(wavelengthField, 'a wavelength between 100 nm and 20 um, such as "632.8 nm"');
  }
  const beamRadiusM = reader.positiveLength(reader.at(laser, 'beamRadius', 'laser'), '4 mm');
  const curvatureField = reader.at(laser, 'curvatureRadius', 'laser');
  const curvatureRadiusM = readCurvature(reader, curvatureField);

  // Camera.
  const cameraField = reader.at(root, 'camera', '');
  const camera = reader.object(
    cameraField,
    CAMERA_FIELDS,
    '{"pixelPitch": "5.5 um", "sensorSize": [1280, 1024], "bitDepth": 12, "peakCounts": 3000, "readNoise": 3}',
  );
  const pixelPitchM = reader.positiveLength(reader.at(camera, 'pixelPitch', 'camera'), '5.5 um');
  const sensorPx = readSensorSize(reader, reader.at(camera, 'sensorSize', 'camera'), true) as [number, number];
  const bitDepth = reader.number(reader.at(camera, 'bitDepth', 'camera'), { example: '12', integer: true, min: 1, max: 16 });
  const fullScale = 2 ** bitDepth - 1;
  const peakCounts = reader.number(reader.at(camera, 'peakCounts', 'camera'), {
    example: String(Math.round(0.75 * fullScale)),
    what: `the counts of the brightest pixel (at most the full scale of ${bitDepth} bits)`,
    min: 0,
    minExclusive: true,
    max: fullScale,
  });
  const readNoiseCounts = reader.number(reader.at(camera, 'readNoise', 'camera'), { example: '3', what: 'RMS counts', min: 0 });
  const gainCountsPerElectron = reader.number(
    reader.at(camera, 'gain', 'camera'),
    { example: '1', what: 'counts per photo-electron', min: 0, minExclusive: true, max: 1000 },
    1,
  );
  const averagedFrames = reader.number(reader.at(camera, 'averagedFrames', 'camera'), { example: '1', integer: true, min: 1, max: 10000 }, 1);

  // Candidates.
  const candidatesField = reader.at(root, 'candidates', '');
  const candidates = reader.object(
    candidatesField,
    CANDIDATE_FIELDS,
    '{"discDiameters": ["2 mm", "3 mm"], "cameraDistances": {"from": "0.4 m", "to": "1.2 m", "steps": 5}}',
  );
  const discField = reader.at(candidates, 'discDiameters', 'candidates');
  const discDiametersM = readLengthList(reader, discField, ['2 mm', '3 mm', '4 mm']);
  const distanceField = reader.at(candidates, 'cameraDistances', 'candidates');
  const cameraDistancesM = readLengthList(reader, distanceField, ['0.5 m', '0.8 m', '1.2 m']);
  if (discDiametersM.length * cameraDistancesM.length > MAX_CANDIDATES) {
    reader.fail(
      distanceField,
      `fewer values: at most ${MAX_CANDIDATES} candidates (discs × distances) in one plan`,
      `${discDiametersM.length} discs × ${cameraDistancesM.length} distances = ${discDiametersM.length * cameraDistancesM.length}`,
    );
  }

  // Roughness and source.
  const roughField = reader.at(root, 'edgeRoughness', '');
  const edgeRoughnessM = reader.length(roughField, '1 um', 0);
  if (!(edgeRoughnessM >= 0)) reader.fail(roughField, 'a length of 0 or more, such as "1 um" (the amplitude of the edge roughness)');
  const sourceField = reader.at(root, 'source', '');
  let sourceSizeM = 0;
  if (sourceField.present) {
    const source = reader.object(sourceField, SOURCE_FIELDS, '{"size": "20 um"}');
    const sizeField = reader.at(source, 'size', 'source');
    sourceSizeM = reader.length(sizeField, '20 um');
    if (!(sourceSizeM >= 0)) reader.fail(sizeField, 'a length of 0 or more, such as "20 um" (the diameter of a uniform disc source)');
    if (sourceSizeM > 0 && !Number.isFinite(curvatureRadiusM)) {
      reader.fail(
        sizeField,
        '"0 mm" while "laser.curvatureRadius" is "collimated"',
        'a finite source needs a finite source distance: set laser.curvatureRadius to the distance G from the source to the disc',
      );
    }
  }

  // Terms, normalisation radius, working point.
  const termsField = reader.at(root, 'terms', '');
  const terms = readTerms(reader, termsField);
  const zernikeField = reader.at(root, 'zernike', '');
  let zernikeRadiusM = beamRadiusM;
  if (zernikeField.present) {
    const zernike = reader.object(zernikeField, ZERNIKE_FIELDS, '{"radius": "4 mm"}');
    zernikeRadiusM = reader.positiveLength(reader.at(zernike, 'radius', 'zernike'), '4 mm', beamRadiusM);
  }
  const aberrations = readAberrations(reader, reader.at(root, 'aberrations', ''), terms);

  // Checks between fields.
  const largestDiscM = Math.max(...discDiametersM);
  const smallestDistanceM = Math.min(...cameraDistancesM);
  if (!(largestDiscM / 2 < MAX_DISC_TO_BEAM_RADIUS * beamRadiusM)) {
    reader.fail(
      { path: discField.path, value: discField.value },
      `diameters below ${formatQuantity(2 * MAX_DISC_TO_BEAM_RADIUS * beamRadiusM, 'mm')}`,
      `the disc radius must stay below ${MAX_DISC_TO_BEAM_RADIUS} × laser.beamRadius`,
    );
  }
  if (!(largestDiscM < smallestDistanceM)) {
    reader.fail(
      { path: discField.path, value: discField.value },
      `diameters below the smallest camera distance, ${formatQuantity(smallestDistanceM, 'mm')}`,
      'the Fresnel (paraxial) model needs a disc much smaller than its distance to the camera',
    );
  }
  if (Number.isFinite(curvatureRadiusM) && curvatureRadiusM < 0) {
    const largestDistanceM = Math.max(...cameraDistancesM);
    if (!(largestDistanceM < -curvatureRadiusM * (1 - 1e-9))) {
      reader.fail(
        { path: distanceField.path, value: distanceField.value },
        `camera distances below ${formatQuantity(-curvatureRadiusM, 'mm')}, where the converging beam focuses`,
        'no shadow forms at or beyond the focus',
      );
    }
  }

  return {
    wavelengthM,
    beamRadiusM,
    curvatureRadiusM,
    camera: { pixelPitchM, sensorPx, bitDepth, peakCounts, readNoiseCounts, gainCountsPerElectron, averagedFrames },
    discDiametersM,
    cameraDistancesM,
    edgeRoughnessM,
    sourceSizeM,
    terms,
    zernikeRadiusM,
    aberrations,
  };
}

/** A list of positive lengths, or a range {"from", "to", "steps"} of evenly spaced values (both ends included). */
function readLengthList(reader: FieldReader, field: Field, example: [string, string, string]): number[] {
  const listExample = `["${example[0]}", "${example[1]}"]`;
  const rangeExample = `{"from": "${example[0]}", "to": "${example[2]}", "steps": 3}`;
  const expected = `a list of lengths such as ${listExample}, or a range such as ${rangeExample}`;
  if (!field.present) reader.missing(field, expected);
  if (Array.isArray(field.value)) {
    const items = field.value as unknown[];
    if (items.length === 0 || items.length > MAX_VALUES_PER_LIST) {
      reader.fail(field, expected, `a list needs 1 to ${MAX_VALUES_PER_LIST} values`);
    }
    const values = items.map((item, i) => reader.positiveLength({ value: item, path: childPath(field.path, i), present: true }, example[0]));
    for (let i = 1; i < values.length; i++) {
      if (values.slice(0, i).includes(values[i])) reader.fail({ path: childPath(field.path, i), value: items[i] }, 'a value not already in the list');
    }
    return values;
  }
  if (!isPlainObject(field.value)) reader.fail(field, expected);
  const range = reader.object(field, RANGE_FIELDS, rangeExample);
  const from = reader.positiveLength(reader.at(range, 'from', field.path), example[0]);
  const toField = reader.at(range, 'to', field.path);
  const to = reader.positiveLength(toField, example[2]);
  const steps = reader.number(reader.at(range, 'steps', field.path), {
    example: '5',
    what: 'a whole number of values (both ends included)',
    integer: true,
    min: 1,
    max: MAX_VALUES_PER_LIST,
  });
  if (steps === 1) {
    if (to !== from) reader.fail(toField, `the same length as "from" when "steps" is 1`);
    return [from];
  }
  if (!(to > from)) reader.fail(toField, `a length greater than "from" (${formatQuantity(from, 'mm')})`);
  return Array.from({ length: steps }, (_, i) => (i === steps - 1 ? to : from + ((to - from) * i) / (steps - 1)));
}

function readTerms(reader: FieldReader, field: Field): number[] {
  const expected = `a list of ANSI Zernike indices from ${PLAN_TERMS.join(', ')}, such as [3, 4, 5, 7, 8]`;
  if (!field.present) return [...DEFAULT_TERMS];
  if (!Array.isArray(field.value) || field.value.length === 0) reader.fail(field, expected);
  const terms: number[] = [];
  (field.value as unknown[]).forEach((item, i) => {
    const itemField: Field = { value: item, path: childPath(field.path, i), present: true };
    if (typeof item !== 'number' || !PLAN_TERMS.includes(item)) {
      reader.fail(itemField, `one of ${PLAN_TERMS.join(', ')}`, 'piston and tilt are absorbed by the pattern centre; the fit frees only these terms');
    }
    if (terms.includes(item)) reader.fail(itemField, 'a term not already in the list');
    terms.push(item);
  });
  return terms.sort((a, b) => a - b);
}

function readAberrations(reader: FieldReader, field: Field, terms: number[]): ZernikeTerm[] {
  if (!field.present) return [];
  const example = '{"5": 0.05, "8": -0.02}';
  if (!isPlainObject(field.value)) reader.fail(field, `an object of ANSI Zernike index j → waves, such as ${example}`);
  const obj = field.value;
  const out: ZernikeTerm[] = [];
  for (const key of Object.keys(obj)) {
    const path = childPath(field.path, key);
    if (!/^(0|[1-9]\d*)$/.test(key) || !terms.includes(Number(key))) {
      reader.fail(
        { path, value: obj[key] },
        `one of the plan's terms as the key (${terms.map((j) => `"${j}"`).join(', ')})`,
        `"${key}" is not one of the terms listed in "terms"`,
      );
    }
    const waves = reader.number({ value: obj[key], path, present: true }, { example: '0.05', what: 'a number of waves over zernike.radius', min: -2, max: 2 });
    out.push({ j: Number(key), waves });
  }
  return out.sort((a, b) => a.j - b.j);
}
