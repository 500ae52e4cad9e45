/**
 * Reading camera frames from files and preparing them for the fit: the Node side of core/frames.
 * Every error names the file.
 */
import { decodeFrame, type DecodedFrame } from '../../core/imageio/decodeFrame.ts';
import { prepareFrames, type PreparedFrame } from '../../core/frames/prepare.ts';
import { expectedPattern, locatePattern, type ExpectedPattern, type LocatedPattern } from '../../core/frames/locate.ts';
import { chooseRegion, type AnalysisRegion } from '../../core/frames/region.ts';
import { parseSetup } from '../../core/setup/parseSetup.ts';
import type { BenchSetup } from '../../core/setup/types.ts';
import { readBytes, readJson } from './files.ts';

/** Read and decode one frame file (PNG, TIFF, PGM/PPM or .npy, recognised from its content). */
export function readFrameFile(path: string): DecodedFrame {
  return decodeFrame(readBytes(path), path);
}

/** Frames prepared for the fit, with the pattern located and the region chosen. */
export interface FramesForFit extends PreparedFrame {
  expected: ExpectedPattern;
  located: LocatedPattern;
  region: AnalysisRegion;
}

/**
 * Read the frames and dark frames of one measurement, average and clean them (core/frames/prepare.ts),
 * locate the pattern and choose the region to analyse. Warnings of every step are collected in
 * `warnings`.
 * @throws ImageDecodeError, FileProblem or FrameError, each naming the file.
 */
export function loadFramesForFit(framePaths: string[], darkPaths: string[], setup: BenchSetup): FramesForFit {
  const frames = framePaths.map(readFrameFile);
  const darks = darkPaths.map(readFrameFile);
  const prepared = prepareFrames(frames, darks, setup.camera, [...framePaths, ...darkPaths]);
  const expected = expectedPattern(setup);
  const located = locatePattern(prepared, expected);
  const region = chooseRegion(prepared, located, expected);
  return { ...prepared, warnings: [...prepared.warnings, ...located.warnings.map((w) => `${prepared.label}: ${w}`)], expected, located, region };
}

/** The same preparation for frames handed over as bytes (the desktop app and the local web mode). */
export { loadFramesFromBytes, regionFromOverride, type RegionOverride } from './app/prepareFromBytes.ts';

/**
 * Read a bench setup from a setup file, or the setup part of a scene file.
 * @throws FileProblem or SetupFieldError naming the file.
 */
export function loadBenchSetup(path: string): BenchSetup {
  const json = readJson(path);
  if (json && typeof json === 'object' && !Array.isArray(json) && (json as Record<string, unknown>).format === 'shadowfront-scene/1') {
    const s = { ...(json as Record<string, unknown>) };
    delete s.aberrations;
    delete s.frame;
    delete s.noise;
    s.format = 'shadowfront-setup/1';
    return parseSetup(s, path);
  }
  return parseSetup(json, path);
}
