/**
 * The bench setup file, format "shadowfront-setup/1": parse it into SI (`BenchSetup`) and write it back.
 * Field-by-field documentation: core/setup/README.md. Pure: no Node built-ins.
 */
import type { BenchSetup, CameraOrientation, EdgeHarmonic } from './types.ts';
import { FieldReader, childPath, isPlainObject } from './fieldReader.ts';
import type { Field } from './fieldReader.ts';
import { SCENE_FORMAT, SETUP_FORMAT } from './fileFormat.ts';
import type { FlipName, SetupBodyJson, SetupFileJson, ToJsonOptions } from './fileFormat.ts';
import { formatQuantity, parseLength, parseQuantity, QuantityError } from '../units/parseQuantity.ts';

export { SetupFieldError } from './fieldReader.ts';
export { SETUP_FORMAT, SCENE_FORMAT } from './fileFormat.ts';

/** Fields of a setup file, and of the setup part of a scene file. */
export const SETUP_TOP_FIELDS = ['format', 'note', 'wavelength', 'beam', 'disc', 'camera', 'zernike', 'source'] as const;
/** Fields only a scene file has. */
export const SCENE_ONLY_FIELDS = ['aberrations', 'frame', 'noise'] as const;

const BEAM_FIELDS = ['radius', 'center', 'curvatureRadius'];
const DISC_FIELDS = ['diameter', 'ellipticity', 'ellipseAngle', 'edgeHarmonics'];
const HARMONIC_FIELDS = ['order', 'amplitude', 'phase'];
const CAMERA_FIELDS = ['distance', 'pixelPitch', 'bitDepth', 'saturation', 'orientation', 'sensorSize'];
const ORIENTATION_FIELDS = ['flip', 'rotate'];
const ZERNIKE_FIELDS = ['radius'];
const SOURCE_FIELDS = ['size'];

/** Every field path of the setup part, used to suggest where a misplaced field belongs. */
export const SETUP_FIELD_PATHS: readonly string[] = [
  ...SETUP_TOP_FIELDS,
  ...BEAM_FIELDS.map((k) => `beam.${k}`),
  ...DISC_FIELDS.map((k) => `disc.${k}`),
  ...HARMONIC_FIELDS.map((k) => `disc.edgeHarmonics[].${k}`),
  ...CAMERA_FIELDS.map((k) => `camera.${k}`),
  ...ORIENTATION_FIELDS.map((k) => `camera.orientation.${k}`),
  ...ZERNIKE_FIELDS.map((k) => `zernike.${k}`),
  ...SOURCE_FIELDS.map((k) => `source.${k}`),
];

/** Wavelength range accepted by the format: 100 nm (vacuum ultraviolet) to 20 µm (far infrared). */
export const WAVELENGTH_MIN_M = parseLength('100 nm');
export const WAVELENGTH_MAX_M = parseLength('20 um');
/** |ellipticity| must stay below this. */
export const MAX_ELLIPTICITY = 0.2;
/** The disc radius must stay below this many beam radii. */
export const MAX_DISC_TO_BEAM_RADIUS = 10;
export const MAX_HARMONIC_ORDER = 200;

const FLIP_NAMES: readonly FlipName[] = ['none', 'horizontal', 'vertical', 'both'];
const ROTATIONS = [0, 90, 180, 270] as const;
/** Accepted sensor sides, pixels. */
export const SENSOR_MIN_PX = 8;
export const SENSOR_MAX_PX = 65536;

/**
 * Parse a "shadowfront-setup/1" JSON value (already decoded with JSON.parse) into SI units.
 * `sourceName` names the file in error messages, e.g. "setup.json".
 * @throws SetupFieldError naming the file, the field path, the value and what was expected.
 */
export function parseSetup(json: unknown, sourceName = 'setup'): BenchSetup {
  const reader = new FieldReader(sourceName, SETUP_FIELD_PATHS);
  const sceneHint = 'only scene files ("shadowfront-scene/1") have this field';
  const root = readRoot(reader, json, SETUP_FORMAT, [...SETUP_TOP_FIELDS], {
    aberrations: sceneHint,
    frame: sceneHint,
    noise: sceneHint,
  });
  return readSetupBody(reader, root);
}

/**
 * Check the top level: a JSON object with the right "format" and only known fields.
 * Shared by parseSetup and parseScene.
 */
export function readRoot(
  reader: FieldReader,
  json: unknown,
  format: string,
  known: readonly string[],
  hints: Record<string, string> = {},
): Record<string, unknown> {
  const top: Field = { value: json, path: '', present: json !== undefined };
  const example = `{"format": "${format}", ...}`;
  if (!isPlainObject(json)) reader.fail(top, `a JSON object such as ${example}`);
  const formatField = reader.at(json, 'format', '');
  if (!formatField.present) reader.missing(formatField, `"${format}"`);
  if (formatField.value !== format) {
    let detail: string | undefined;
    if (formatField.value === SCENE_FORMAT) detail = 'this is a scene file; read it as a scene';
    else if (formatField.value === SETUP_FORMAT) detail = 'this is a bench setup file; a scene file also has "frame" and optionally "aberrations" and "noise"';
    else if (typeof formatField.value === 'string' && formatField.value.startsWith('shadowfront-')) detail = 'a format or version this program does not read';
    reader.fail(formatField, `"${format}"`, detail);
  }
  const root = reader.object(top, known, example, hints);
  const note = reader.at(root, 'note', '');
  if (note.present && typeof note.value !== 'string') reader.fail(note, 'free text (a JSON string)');
  return root;
}

/** Read the fields shared by setup and scene files. */
export function readSetupBody(reader: FieldReader, root: Record<string, unknown>): BenchSetup {
  // Wavelength.
  const wavelengthField = reader.at(root, 'wavelength', '');
  const wavelengthM = reader.length(wavelengthField, '632.8 nm');
  if (!withinRelative(wavelengthM, WAVELENGTH_MIN_M, WAVELENGTH_MAX_M)) {
    reader.fail(wavelengthField, 'a wavelength between 100 nm and 20 um, such as "632.8 nm"', wavelengthM > 0 ? 'outside the range this format covers' : undefined);
  }

  // Beam.
  const beamField = reader.at(root, 'beam', '');
  const beam = reader.object(beamField, BEAM_FIELDS, '{"radius": "4 mm"}');
  const beamRadiusM = reader.positiveLength(reader.at(beam, 'radius', 'beam'), '4 mm');
  const beamCenterM = reader.lengthPair(reader.at(beam, 'center', 'beam'), ['0 mm', '0 mm'], [0, 0]);
  const curvatureField = reader.at(beam, 'curvatureRadius', 'beam');
  const curvatureRadiusM = readCurvature(reader, curvatureField);

  // Disc.
  const discField = reader.at(root, 'disc', '');
  const disc = reader.object(discField, DISC_FIELDS, '{"diameter": "3 mm"}');
  const diameterField = reader.at(disc, 'diameter', 'disc');
  const discRadiusM = reader.positiveLength(diameterField, '3 mm') / 2;
  const ellipticityField = reader.at(disc, 'ellipticity', 'disc');
  const ellipticity = reader.number(
    ellipticityField,
    { example: '0.01', what: 'a plain number', min: -MAX_ELLIPTICITY, max: MAX_ELLIPTICITY, minExclusive: true, maxExclusive: true },
    0,
  );
  const ellipseAngleRad = reader.angle(reader.at(disc, 'ellipseAngle', 'disc'), '30 deg', 0);
  const harmonicsField = reader.at(disc, 'edgeHarmonics', 'disc');
  const edgeHarmonics = readEdgeHarmonics(reader, harmonicsField);

  // Camera.
  const cameraField = reader.at(root, 'camera', '');
  const camera = reader.object(cameraField, CAMERA_FIELDS, '{"distance": "800 mm", "pixelPitch": "5.5 um", "bitDepth": 12}');
  const distanceM = reader.positiveLength(reader.at(camera, 'distance', 'camera'), '800 mm');
  const pixelPitchM = reader.positiveLength(reader.at(camera, 'pixelPitch', 'camera'), '5.5 um');
  const bitDepth = reader.number(reader.at(camera, 'bitDepth', 'camera'), { example: '12', integer: true, min: 1, max: 16 });
  const fullScale = 2 ** bitDepth - 1;
  const saturationCounts = reader.number(
    reader.at(camera, 'saturation', 'camera'),
    { example: String(fullScale), what: 'an integer count', integer: true, min: 1, max: fullScale },
    fullScale,
  );
  const orientation = readOrientation(reader, reader.at(camera, 'orientation', 'camera'));
  const sensorPx = readSensorSize(reader, reader.at(camera, 'sensorSize', 'camera'));

  // Zernike normalisation.
  const zernikeField = reader.at(root, 'zernike', '');
  let zernikeRadiusM = beamRadiusM;
  if (zernikeField.present) {
    const zernike = reader.object(zernikeField, ZERNIKE_FIELDS, '{"radius": "4 mm"}');
    zernikeRadiusM = reader.positiveLength(reader.at(zernike, 'radius', 'zernike'), '4 mm', beamRadiusM);
  }

  // Source.
  const sourceField = reader.at(root, 'source', '');
  let sourceSizeM = 0;
  if (sourceField.present) {
    const source = reader.object(sourceField, SOURCE_FIELDS, '{"size": "50 um"}');
    const sizeField = reader.at(source, 'size', 'source');
    sourceSizeM = reader.length(sizeField, '50 um');
    if (!(sourceSizeM >= 0)) reader.fail(sizeField, 'a length of 0 or more, such as "50 um" (the diameter of a uniform disc source)');
    if (sourceSizeM > 0 && !Number.isFinite(curvatureRadiusM)) {
      reader.fail(
        sizeField,
        '"0 mm" while "beam.curvatureRadius" is "collimated"',
        'a finite source needs a finite source distance: set beam.curvatureRadius to the distance G from the source to the disc',
      );
    }
  }

  // Checks between fields.
  if (!(discRadiusM < MAX_DISC_TO_BEAM_RADIUS * beamRadiusM)) {
    reader.fail(
      diameterField,
      `a diameter below ${formatQuantity(2 * MAX_DISC_TO_BEAM_RADIUS * beamRadiusM, 'mm')}`,
      `the disc radius must stay below ${MAX_DISC_TO_BEAM_RADIUS} × beam.radius`,
    );
  }
  if (!(2 * discRadiusM < distanceM)) {
    reader.fail(
      diameterField,
      `a diameter below camera.distance, ${formatQuantity(distanceM, 'mm')}`,
      'the Fresnel (paraxial) model needs a disc much smaller than its distance to the camera',
    );
  }
  const harmonicSumM = edgeHarmonics.reduce((sum, h) => sum + Math.abs(h.amplitudeM), 0);
  const minEdgeRadiusM = discRadiusM * (1 - Math.abs(ellipticity)) - harmonicSumM;
  if (!(minEdgeRadiusM > 0)) {
    reader.fail(
      harmonicsField,
      `edge harmonics whose amplitudes add up to less than ${formatQuantity(discRadiusM * (1 - Math.abs(ellipticity)), 'um')}`,
      'the edge radius a·(1 − |e|) − Σ|amplitude| must stay positive',
    );
  }
  if (Number.isFinite(curvatureRadiusM) && Math.abs(1 + distanceM / curvatureRadiusM) < 1e-9) {
    reader.fail(
      curvatureField,
      `a curvature radius other than ${formatQuantity(-distanceM, 'mm')}, minus camera.distance`,
      'the beam would focus exactly on the camera',
    );
  }

  return {
    wavelengthM,
    beam: { radiusM: beamRadiusM, centerM: beamCenterM, curvatureRadiusM },
    disc: { radiusM: discRadiusM, ellipticity, ellipseAngleRad, edgeHarmonics },
    camera: { distanceM, pixelPitchM, bitDepth, saturationCounts, orientation, sensorPx },
    zernikeRadiusM,
    source: { sizeM: sourceSizeM },
  };
}

/** lo ≤ x ≤ hi, with a relative tolerance of 1e-12 so that the bounds written in other units pass. */
function withinRelative(x: number, lo: number, hi: number): boolean {
  return x >= lo * (1 - 1e-12) && x <= hi * (1 + 1e-12);
}

/** A beam's wavefront curvature radius: "collimated" (∞) or a nonzero signed length. Shared with the plan format. */
export function readCurvature(reader: FieldReader, field: Field): number {
  const expected = '"collimated" or a nonzero length such as "2 m", positive when the beam diverges and negative when it converges';
  if (!field.present) reader.missing(field, expected);
  if (typeof field.value === 'string' && field.value.trim().toLowerCase() === 'collimated') return Number.POSITIVE_INFINITY;
  let radiusM: number;
  try {
    radiusM = parseQuantity(field.value, 'length', { allowInfinity: true, example: '2 m' });
  } catch (err) {
    if (err instanceof QuantityError) reader.fail(field, expected, err.detail);
    throw err;
  }
  if (radiusM === 0) reader.fail(field, expected, 'zero curvature radius is not a beam');
  return radiusM;
}

function readEdgeHarmonics(reader: FieldReader, field: Field): EdgeHarmonic[] {
  if (!field.present) return [];
  const example = '[{"order": 3, "amplitude": "0.5 um", "phase": "0 deg"}]';
  if (!Array.isArray(field.value)) reader.fail(field, `a list such as ${example}`);
  return (field.value as unknown[]).map((item, i) => {
    const itemField: Field = { value: item, path: childPath(field.path, i), present: true };
    const obj = reader.object(itemField, HARMONIC_FIELDS, '{"order": 3, "amplitude": "0.5 um", "phase": "0 deg"}');
    const order = reader.number(reader.at(obj, 'order', itemField.path), {
      example: '3',
      integer: true,
      min: 1,
      max: MAX_HARMONIC_ORDER,
    });
    const amplitudeM = reader.length(reader.at(obj, 'amplitude', itemField.path), '0.5 um');
    const phaseRad = reader.angle(reader.at(obj, 'phase', itemField.path), '0 deg', 0);
    return { order, amplitudeM, phaseRad };
  });
}

/**
 * `camera.sensorSize`: [width, height] in pixels, whole numbers from SENSOR_MIN_PX to SENSOR_MAX_PX; null when
 * absent. Shared with the plan format (core/plan/parsePlan.ts), which requires it.
 */
export function readSensorSize(reader: FieldReader, field: Field, required = false): [number, number] | null {
  const expected = `a pair of whole pixel counts [width, height] such as [1280, 1024], each from ${SENSOR_MIN_PX} to ${SENSOR_MAX_PX}`;
  if (!field.present) {
    if (required) reader.missing(field, expected);
    return null;
  }
  if (!Array.isArray(field.value) || field.value.length !== 2) reader.fail(field, expected);
  const items = field.value as unknown[];
  return [0, 1].map((i) =>
    reader.number(
      { value: items[i], path: childPath(field.path, i), present: true },
      { example: i === 0 ? '1280' : '1024', what: `a whole number of pixels (sensor ${i === 0 ? 'width' : 'height'})`, integer: true, min: SENSOR_MIN_PX, max: SENSOR_MAX_PX },
    ),
  ) as [number, number];
}

function readOrientation(reader: FieldReader, field: Field): CameraOrientation {
  if (!field.present) return { flipX: false, flipY: false, rotateDeg: 0 };
  const obj = reader.object(field, ORIENTATION_FIELDS, '{"flip": "none", "rotate": "0 deg"}');
  const flip = reader.choice(reader.at(obj, 'flip', field.path), FLIP_NAMES, 'none');
  const rotateField = reader.at(obj, 'rotate', field.path);
  const expected = 'one of "0 deg", "90 deg", "180 deg", "270 deg"';
  let rotateDeg: CameraOrientation['rotateDeg'] = 0;
  if (rotateField.present) {
    let rotateRad: number;
    try {
      rotateRad = parseQuantity(rotateField.value, 'angle', { example: '90 deg' });
    } catch (err) {
      if (err instanceof QuantityError) reader.fail(rotateField, expected, err.detail);
      throw err;
    }
    const quarterTurns = (rotateRad / Math.PI) * 2;
    const k = Math.round(quarterTurns);
    if (Math.abs(quarterTurns - k) > 1e-9) reader.fail(rotateField, expected, 'the camera can only be turned in quarter turns');
    rotateDeg = ROTATIONS[((k % 4) + 4) % 4];
  }
  return { flipX: flip === 'horizontal' || flip === 'both', flipY: flip === 'vertical' || flip === 'both', rotateDeg };
}

function flipName(orientation: CameraOrientation): FlipName {
  if (orientation.flipX) return orientation.flipY ? 'both' : 'horizontal';
  return orientation.flipY ? 'vertical' : 'none';
}

/** The setup part of a file, with readable units: nm, mm, um, deg. */
export function setupBodyToJson(setup: BenchSetup, options: ToJsonOptions = {}): SetupBodyJson {
  const { beam, disc, camera } = setup;
  return {
    ...(options.note !== undefined ? { note: options.note } : {}),
    wavelength: formatQuantity(setup.wavelengthM, 'nm'),
    beam: {
      radius: formatQuantity(beam.radiusM, 'mm'),
      center: [formatQuantity(beam.centerM[0], 'mm'), formatQuantity(beam.centerM[1], 'mm')],
      curvatureRadius: beam.curvatureRadiusM === Number.POSITIVE_INFINITY ? 'collimated' : formatQuantity(beam.curvatureRadiusM, 'mm'),
    },
    disc: {
      diameter: formatQuantity(2 * disc.radiusM, 'mm'),
      ellipticity: disc.ellipticity,
      ellipseAngle: formatQuantity(disc.ellipseAngleRad, 'deg'),
      edgeHarmonics: disc.edgeHarmonics.map((h) => ({
        order: h.order,
        amplitude: formatQuantity(h.amplitudeM, 'um'),
        phase: formatQuantity(h.phaseRad, 'deg'),
      })),
    },
    camera: {
      distance: formatQuantity(camera.distanceM, 'mm'),
      pixelPitch: formatQuantity(camera.pixelPitchM, 'um'),
      bitDepth: camera.bitDepth,
      saturation: camera.saturationCounts,
      orientation: { flip: flipName(camera.orientation), rotate: `${camera.orientation.rotateDeg} deg` },
      ...(camera.sensorPx ? { sensorSize: [camera.sensorPx[0], camera.sensorPx[1]] as [number, number] } : {}),
    },
    zernike: { radius: formatQuantity(setup.zernikeRadiusM, 'mm') },
    source: { size: formatQuantity(setup.source.sizeM, 'mm') },
  };
}

/**
 * Write a setup back as a "shadowfront-setup/1" JSON object (pass it to JSON.stringify), every field
 * explicit. parseSetup(setupToJson(s)) reproduces s exactly.
 */
export function setupToJson(setup: BenchSetup, options: ToJsonOptions = {}): SetupFileJson {
  return { format: SETUP_FORMAT, ...setupBodyToJson(setup, options) };
}
