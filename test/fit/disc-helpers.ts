/** Shared by the disc-calibration and finite-source tests: read the frames of test/fixtures/make-disc-fixtures.ts. */
import { readFileSync } from 'node:fs';
import { decodeFrame } from '../../core/imageio/decodeFrame.ts';
import { prepareFrames } from '../../core/frames/prepare.ts';
import { parseScene } from '../../core/setup/parseScene.ts';
import type { FrameSet } from '../../core/fit/measure.ts';
import type { BenchSetup, Scene, ZernikeTerm } from '../../core/setup/types.ts';
import type { DiscFixtureEntry } from '../fixtures/make-disc-fixtures.ts';

const dir = new URL('../fixtures/disc/', import.meta.url);
const data = JSON.parse(readFileSync(new URL('disc-fixtures.json', dir), 'utf8')) as {
  disc: { radiusM: number; ellipticity: number; axisRad: number };
  beam: ZernikeTerm[];
  source: { sizeM: number; aberrations: ZernikeTerm[] };
  entries: DiscFixtureEntry[];
};
export const discTruth = data.disc;
export const beamTruth = data.beam;
export const sourceTruth = data.source;
export const discEntries = data.entries;

/** The true order-2 coefficients (e·cos 2φ, e·sin 2φ) of the fixtures' disc, in its own frame. */
export const trueC2 = discTruth.ellipticity * Math.cos(2 * discTruth.axisRad);
export const trueS2 = discTruth.ellipticity * Math.sin(2 * discTruth.axisRad);

export function entry(file: string): DiscFixtureEntry {
  const e = discEntries.find((x) => x.file === file);
  if (!e) throw new Error(`no fixture ${file}: run npx tsx test/fixtures/make-disc-fixtures.ts`);
  return e;
}

export function sceneOf(e: DiscFixtureEntry): Scene {
  return parseScene(e.scene, e.file);
}

/**
 * A frame set as a user would describe it: the setup with a round disc (the shape is what we measure)
 * and the disc's stated rotation; `setupOverride` changes the setup further (e.g. the source size).
 */
export function frameSet(file: string, setupOverride?: (s: BenchSetup) => BenchSetup): FrameSet {
  const e = entry(file);
  const scene = sceneOf(e);
  const { aberrations: _a, frame: _f, noise: _n, ...truthSetup } = scene;
  void _a;
  void _f;
  void _n;
  let setup: BenchSetup = { ...truthSetup, disc: { ...truthSetup.disc, ellipticity: 0, ellipseAngleRad: 0, edgeHarmonics: [] } };
  if (setupOverride) setup = setupOverride(setup);
  const decoded = decodeFrame(new Uint8Array(readFileSync(new URL(e.file, dir))), e.file);
  const prepared = prepareFrames([decoded], [], setup.camera, [e.file]);
  return { setup, prepared, discRotationRad: (e.discRotationDeg * Math.PI) / 180 };
}

/** The fixtures' camera noise is known (make-disc-fixtures.ts): gain 1 count per electron, read noise 3 counts. */
export const KNOWN_NOISE = { gainCountsPerElectron: 1, readNoiseCounts: 3 } as const;
