/**
 * The "beam" job shared by every shell: ISO 11146 second-moment widths of a beam frame (the laser beam
 * recorded on the camera, disc removed) and the setup's `beam` fields it suggests.
 */
import { beamMoments, type BeamMoments } from '../../core/beam/moments.ts';
import { toBeamSpec, type SuggestedBeamSpec } from '../../core/beam/beamSpec.ts';
import { prepareFrames } from '../../core/frames/prepare.ts';
import { FrameError } from '../../core/frames/errors.ts';
import { expectedPattern, locatePattern } from '../../core/frames/locate.ts';
import type { BenchSetup } from '../../core/setup/types.ts';
import { loadBenchSetup, readFrameFile } from './frames.ts';

export interface BeamJob {
  /** Beam frame(s); several are averaged. */
  framePaths: string[];
  setupPath: string;
  darkPaths?: string[];
  /** Where the beam frames were recorded (default 'camera'). */
  recordedAt?: 'camera' | 'disc';
  /** A shadow frame taken from the same camera position: its pattern centre marks the disc axis. */
  shadowPath?: string;
}

export interface BeamReport {
  frames: string[];
  darks: string[];
  setup: BenchSetup;
  widthPx: number;
  heightPx: number;
  pixelPitchM: number;
  moments: BeamMoments;
  suggestion: SuggestedBeamSpec;
  /** The suggested setup fields as unit strings, ready to paste into the setup file. */
  suggestedFields: { radius: string; center: [string, string] };
  /** Where the disc axis was taken to meet the sensor, [column, row], and how. */
  axisPx: [number, number];
  axisSource: string;
  saturatedPixels: number;
  warnings: string[];
}

/** Metres as millimetres with 1 µm resolution, e.g. "1.234 mm" (readable by the setup parser). */
export function mmText(m: number): string {
  const v = Math.round(m * 1e6) / 1e3;
  return `${Object.is(v, -0) ? 0 : v.toFixed(3)} mm`;
}

export function runBeam(job: BeamJob): BeamReport {
  const setup = loadBenchSetup(job.setupPath);
  const darkPaths = job.darkPaths ?? [];
  const frames = job.framePaths.map(readFrameFile);
  const darks = darkPaths.map(readFrameFile);
  const prepared = prepareFrames(frames, darks, setup.camera, [...job.framePaths, ...darkPaths]);
  const warnings = [...prepared.warnings.filter((w) => !/saturated pixels are excluded/.test(w))];
  if (prepared.saturatedCount > 0) {
    warnings.push(`${prepared.label}: ${prepared.saturatedCount} pixels are saturated: the beam's peak is clipped and the widths come out too large; attenuate the beam or shorten the exposure`);
  }
  let moments: BeamMoments;
  try {
    moments = beamMoments(prepared.counts, prepared.widthPx, prepared.heightPx, {
      exclude: prepared.hotMask,
      darkSubtracted: prepared.darkCount > 0,
    });
  } catch (e) {
    if (e instanceof RangeError) throw new FrameError('no beam', prepared.label, `${e.message}; check that the beam falls on the camera (attenuated)`);
    throw e;
  }
  let axisPx: [number, number] = [(prepared.widthPx - 1) / 2, (prepared.heightPx - 1) / 2];
  let axisSource = 'the frame centre';
  if (job.shadowPath) {
    const shadow = prepareFrames([readFrameFile(job.shadowPath)], darks, setup.camera, [job.shadowPath, ...darkPaths]);
    if (shadow.widthPx !== prepared.widthPx || shadow.heightPx !== prepared.heightPx) {
      throw new RangeError(`${job.shadowPath}: the shadow frame is ${shadow.widthPx} × ${shadow.heightPx} px, the beam frame ${prepared.widthPx} × ${prepared.heightPx} px`);
    }
    const located = locatePattern(shadow, expectedPattern(setup));
    axisPx = located.centerPx;
    axisSource = `the pattern centre in ${job.shadowPath} (${located.method})`;
    warnings.push(...located.warnings.map((w) => `${job.shadowPath}: ${w}`));
  }
  const suggestion = toBeamSpec(moments, setup.camera.pixelPitchM, setup, { recordedAt: job.recordedAt ?? 'camera', axisPx: job.shadowPath ? axisPx : undefined });
  return {
    frames: job.framePaths,
    darks: darkPaths,
    setup,
    widthPx: prepared.widthPx,
    heightPx: prepared.heightPx,
    pixelPitchM: setup.camera.pixelPitchM,
    moments,
    suggestion,
    suggestedFields: { radius: mmText(suggestion.radiusM), center: [mmText(suggestion.centerM[0]), mmText(suggestion.centerM[1])] },
    axisPx,
    axisSource,
    saturatedPixels: prepared.saturatedCount,
    warnings: [...warnings, ...moments.warnings],
  };
}
