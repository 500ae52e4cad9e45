/**
 * The measurement pipeline shared by every shell: prepared frames and their setups → located pattern →
 * region of interest → fit. Pure.
 */
import type { BenchSetup } from '../setup/types.ts';
import type { PreparedFrame } from '../frames/prepare.ts';
import { expectedPattern, locatePattern, type LocatedPattern } from '../frames/locate.ts';
import { chooseRegion, type AnalysisRegion } from '../frames/region.ts';
import { fitShadow, type FitOptions } from './fitShadow.ts';
import type { FitFrameInput } from './frameModel.ts';
import type { FitResult } from './result.ts';

export interface FrameSet {
  setup: BenchSetup;
  /** Prepared frames; when `located` and `region` are already known (app/services/frames.ts) they are used as they are. */
  prepared: PreparedFrame & { located?: LocatedPattern; region?: AnalysisRegion };
  /** How far the disc is turned in these frames, rad (counter-clockwise, lab frame); see FitFrameInput. */
  discRotationRad?: number;
}

export interface MeasureOptions extends Omit<FitOptions, 'initialCentersM'> {
  /** Camera gain, counts per photo-electron, for the shot-noise model (default 1). */
  gainCountsPerElectron?: number;
  /** Read noise per raw frame, RMS counts; default: the prepared frames' estimate. */
  readNoiseCounts?: number;
}

export function measureBeam(sets: FrameSet[], options: MeasureOptions = {}): FitResult {
  const inputs: FitFrameInput[] = [];
  const centers: [number, number][] = [];
  const notes: string[] = [];
  for (const { setup, prepared, discRotationRad } of sets) {
    const expected = expectedPattern(setup);
    const known = !!prepared.located;
    const located = prepared.located ?? locatePattern(prepared, expected);
    const region = prepared.region ?? chooseRegion(prepared, located, expected);
    const pitch = setup.camera.pixelPitchM;
    centers.push([
      (located.centerPx[0] - (prepared.widthPx - 1) / 2) * pitch,
      -(located.centerPx[1] - (prepared.heightPx - 1) / 2) * pitch,
    ]);
    inputs.push({
      setup,
      counts: prepared.counts,
      widthPx: prepared.widthPx,
      heightPx: prepared.heightPx,
      mask: prepared.mask,
      frameCount: prepared.frameCount,
      darkCount: prepared.darkCount,
      readNoiseCounts: options.readNoiseCounts ?? Math.max(prepared.readNoiseCounts, 0.5),
      gainCountsPerElectron: options.gainCountsPerElectron ?? 1,
      regionCenterPx: region.centerPx,
      regionRadiusPx: region.radiusPx,
      discRotationRad,
    });
    notes.push(...prepared.warnings);
    if (!known) notes.push(...located.warnings.map((w) => `${prepared.label}: ${w}`));
    notes.push(`${prepared.label}: region analysed: ${region.description}`);
  }
  // Unknown noise (no dark frames, nothing given): estimate it from the residuals.
  const estimateNoise =
    options.estimateNoise ?? (options.readNoiseCounts === undefined && options.gainCountsPerElectron === undefined && sets.every((s) => s.prepared.darkCount === 0));
  const result = fitShadow(inputs, { ...options, estimateNoise, initialCentersM: centers });
  result.warnings.unshift(...notes);
  return result;
}
