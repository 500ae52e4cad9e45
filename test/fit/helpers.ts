/** Shared by the fit tests: read a fixture frame (made by test/fixtures/generate.ts) and fit it. */
import { readFileSync } from 'node:fs';
import { decodeFrame } from '../../core/imageio/decodeFrame.ts';
import { prepareFrames } from '../../core/frames/prepare.ts';
import { measureBeam, type MeasureOptions } from '../../core/fit/measure.ts';
import { parseScene } from '../../core/setup/parseScene.ts';
import type { Scene, ZernikeTerm } from '../../core/setup/types.ts';
import type { FitResult } from '../../core/fit/result.ts';

export interface FixtureEntry {
  file: string;
  group: 'accuracy' | 'pair' | 'sign' | 'zero';
  scene: unknown;
  truth: ZernikeTerm[];
  trueCenterM: [number, number];
  peakCounts: number;
}

const dir = new URL('../fixtures/fit/', import.meta.url);
export const fixtures: FixtureEntry[] = JSON.parse(readFileSync(new URL('fixtures.json', dir), 'utf8')).entries;

export function sceneOf(e: FixtureEntry): Scene {
  return parseScene(e.scene, e.file);
}

export function fitFixture(e: FixtureEntry, options: MeasureOptions = {}, setupOverride?: (s: Scene) => Scene): { result: FitResult; scene: Scene } {
  const scene = sceneOf(e);
  const setup = setupOverride ? setupOverride(scene) : scene;
  const decoded = decodeFrame(new Uint8Array(readFileSync(new URL(e.file, dir))), e.file);
  const prepared = prepareFrames([decoded], [], setup.camera, [e.file]);
  // The camera noise of the fixtures is known (generate.ts): gain 1 count per electron, read noise 3 counts.
  const result = measureBeam([{ setup, prepared }], { gainCountsPerElectron: 1, readNoiseCounts: 3, ...options });
  return { result, scene };
}

export function truthOf(e: FixtureEntry, j: number): number {
  return e.truth.find((t) => t.j === j)?.waves ?? 0;
}
