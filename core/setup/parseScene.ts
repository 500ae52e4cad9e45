/**
 * The simulation scene file, format "shadowfront-scene/1": every setup field plus aberrations, the
 * camera frame and optional noise. Parse it into SI (`Scene`) and write it back.
 * Field-by-field documentation: core/setup/README.md. Pure: no Node built-ins.
 */
import type { FrameSpec, NoiseSpec, Scene, ZernikeTerm } from './types.ts';
import { FieldReader, childPath } from './fieldReader.ts';
import type { Field } from './fieldReader.ts';
import { SCENE_FORMAT } from './fileFormat.ts';
import type { SceneFileJson, ToJsonOptions } from './fileFormat.ts';
import { SCENE_ONLY_FIELDS, SETUP_FIELD_PATHS, SETUP_TOP_FIELDS, readRoot, readSetupBody, setupBodyToJson } from './parseSetup.ts';
import { formatQuantity } from '../units/parseQuantity.ts';

export { SetupFieldError } from './fieldReader.ts';
export { SCENE_FORMAT } from './fileFormat.ts';

const FRAME_FIELDS = ['width', 'height', 'center'];
const NOISE_FIELDS = ['peakCounts', 'readNoise', 'offset', 'seed'];

export const SCENE_FIELD_PATHS: readonly string[] = [
  ...SETUP_FIELD_PATHS,
  ...SCENE_ONLY_FIELDS,
  ...FRAME_FIELDS.map((k) => `frame.${k}`),
  ...NOISE_FIELDS.map((k) => `noise.${k}`),
];

/** Frame width and height limits, pixels. */
export const MIN_FRAME_PX = 8;
export const MAX_FRAME_PX = 4096;
/** Highest ANSI index accepted: j = 495 is the last term of radial order n = 30. */
export const MAX_ZERNIKE_J = 495;
/** Noise seeds are integers 1 .. 2^32 − 1 (the seed range of the Mersenne Twister in @stdlib/random). */
export const MAX_NOISE_SEED = 4294967295;

/**
 * Parse a "shadowfront-scene/1" JSON value (already decoded with JSON.parse) into SI units.
 * `sourceName` names the file in error messages, e.g. "scene.json".
 * @throws SetupFieldError naming the file, the field path, the value and what was expected.
 */
export function parseScene(json: unknown, sourceName = 'scene'): Scene {
  const reader = new FieldReader(sourceName, SCENE_FIELD_PATHS);
  const root = readRoot(reader, json, SCENE_FORMAT, [...SETUP_TOP_FIELDS, ...SCENE_ONLY_FIELDS]);
  const setup = readSetupBody(reader, root);
  const aberrations = readAberrations(reader, reader.at(root, 'aberrations', ''));
  const frame = readFrame(reader, reader.at(root, 'frame', ''));
  const noise = readNoise(reader, reader.at(root, 'noise', ''), setup.camera.saturationCounts);
  return { ...setup, aberrations, frame, noise };
}

const CANONICAL_INDEX = /^(0|[1-9]\d*)$/;

function readAberrations(reader: FieldReader, field: Field): ZernikeTerm[] {
  if (!field.present) return [];
  const example = '{"4": 0.05, "5": -0.1}';
  if (typeof field.value !== 'object' || field.value === null || Array.isArray(field.value)) {
    reader.fail(field, `an object of ANSI Zernike index j → waves, such as ${example}`);
  }
  const obj = field.value as Record<string, unknown>;
  const terms: ZernikeTerm[] = [];
  for (const key of Object.keys(obj)) {
    const path = childPath(field.path, key);
    if (!CANONICAL_INDEX.test(key) || Number(key) > MAX_ZERNIKE_J) {
      reader.fail(
        { path, value: obj[key] },
        `an ANSI Zernike index j from 0 to ${MAX_ZERNIKE_J} as the key, such as "4"`,
        `"${key}" is not such an index; write j without sign, decimals or leading zeros`,
      );
    }
    const waves = reader.number({ value: obj[key], path, present: true }, { example: '0.05', what: 'a number of waves over zernike.radius' });
    terms.push({ j: Number(key), waves });
  }
  return terms.sort((a, b) => a.j - b.j);
}

function readFrame(reader: FieldReader, field: Field): FrameSpec {
  const frame = reader.object(field, FRAME_FIELDS, '{"width": 256, "height": 256}');
  const spec = { example: '256', what: 'an integer number of pixels', integer: true, min: MIN_FRAME_PX, max: MAX_FRAME_PX };
  const widthPx = reader.number(reader.at(frame, 'width', field.path), spec);
  const heightPx = reader.number(reader.at(frame, 'height', field.path), spec);
  const centerM = reader.lengthPair(reader.at(frame, 'center', field.path), ['0 mm', '0 mm'], [0, 0]);
  return { widthPx, heightPx, centerM };
}

function readNoise(reader: FieldReader, field: Field, saturationCounts: number): NoiseSpec | null {
  if (!field.present || field.value === null) return null;
  const noise = reader.object(field, NOISE_FIELDS, '{"peakCounts": 3000, "readNoise": 3, "offset": 20, "seed": 7}');
  const peakCounts = reader.number(reader.at(noise, 'peakCounts', 'noise'), {
    example: '3000',
    what: 'a number of counts',
    min: 0,
    minExclusive: true,
  });
  const readNoise = reader.number(reader.at(noise, 'readNoise', 'noise'), { example: '3', what: 'an RMS number of counts', min: 0 });
  const offsetField = reader.at(noise, 'offset', 'noise');
  const offset = reader.number(offsetField, { example: '20', what: 'a number of counts', min: 0 });
  if (!(offset < saturationCounts)) {
    reader.fail(offsetField, `an offset below camera.saturation, ${saturationCounts} counts`, 'every pixel would be saturated');
  }
  const seed = reader.number(reader.at(noise, 'seed', 'noise'), { example: '7', integer: true, min: 1, max: MAX_NOISE_SEED }, 1);
  return { peakCounts, readNoise, offset, seed };
}

/**
 * Write a scene back as a "shadowfront-scene/1" JSON object (pass it to JSON.stringify), every field
 * explicit; "noise" is left out when it is null. parseScene(sceneToJson(s)) reproduces s exactly.
 */
export function sceneToJson(scene: Scene, options: ToJsonOptions = {}): SceneFileJson {
  const aberrations: Record<string, number> = {};
  for (const term of [...scene.aberrations].sort((a, b) => a.j - b.j)) aberrations[String(term.j)] = term.waves;
  return {
    format: SCENE_FORMAT,
    ...setupBodyToJson(scene, options),
    aberrations,
    frame: {
      width: scene.frame.widthPx,
      height: scene.frame.heightPx,
      center: [formatQuantity(scene.frame.centerM[0], 'mm'), formatQuantity(scene.frame.centerM[1], 'mm')],
    },
    ...(scene.noise !== null
      ? { noise: { peakCounts: scene.noise.peakCounts, readNoise: scene.noise.readNoise, offset: scene.noise.offset, seed: scene.noise.seed } }
      : {}),
  };
}
