/**
 * Frames handed over as bytes (the desktop app and the local web mode) prepared for the fit: decode,
 * average and clean (core/frames/prepare.ts), locate the pattern, and choose the region or take the
 * user's: the same steps as the file-based loadFramesForFit (../frames.ts). No setup parsing here, so
 * that the job worker does not load the unit library.
 */
import { decodeFrame, type DecodedFrame } from '../../../core/imageio/decodeFrame.ts';
import { prepareFrames, type PreparedFrame } from '../../../core/frames/prepare.ts';
import { expectedPattern, locatePattern } from '../../../core/frames/locate.ts';
import { chooseRegion, type AnalysisRegion } from '../../../core/frames/region.ts';
import type { BenchSetup } from '../../../core/setup/types.ts';
import type { FramesForFit } from '../frames.ts';

/** A region of interest chosen by the user instead of the automatic one (prepared-frame pixels). */
export interface RegionOverride {
  centerPx: [number, number];
  radiusPx: number;
}

/**
 * The same as loadFramesForFit, for frames handed over as bytes (the desktop app and the local web mode):
 * each `name` names the file in every message. An optional region replaces the automatic choice.
 * @throws ImageDecodeError or FrameError naming the file, RangeError for a region outside the frame.
 */
export function loadFramesFromBytes(
  frames: { name: string; data: Uint8Array }[],
  darks: { name: string; data: Uint8Array }[],
  setup: BenchSetup,
  region?: RegionOverride | null,
): FramesForFit {
  const decoded = frames.map((f) => decodeFrame(f.data, f.name));
  const decodedDarks = darks.map((f) => decodeFrame(f.data, f.name));
  return prepareDecodedForFit(decoded, decodedDarks, [...frames.map((f) => f.name), ...darks.map((f) => f.name)], setup, region);
}

function prepareDecodedForFit(frames: DecodedFrame[], darks: DecodedFrame[], names: string[], setup: BenchSetup, override?: RegionOverride | null): FramesForFit {
  const prepared = prepareFrames(frames, darks, setup.camera, names);
  const expected = expectedPattern(setup);
  const located = locatePattern(prepared, expected);
  const auto = chooseRegion(prepared, located, expected);
  const region = override ? regionFromOverride(prepared, override, auto) : auto;
  return { ...prepared, warnings: [...prepared.warnings, ...located.warnings.map((w) => `${prepared.label}: ${w}`)], expected, located, region };
}

/** The analysis region for a user-chosen circle, checked against the frame. */
export function regionFromOverride(prepared: PreparedFrame, o: RegionOverride, auto?: AnalysisRegion): AnalysisRegion {
  const { widthPx: W, heightPx: H } = prepared;
  const [cx, cy] = o.centerPx;
  if (![cx, cy, o.radiusPx].every(Number.isFinite) || o.radiusPx <= 0) {
    throw new RangeError(`region: centre (${cx}, ${cy}) px and radius ${o.radiusPx} px must be finite numbers, with a radius above 0`);
  }
  if (cx < 0 || cx > W - 1 || cy < 0 || cy > H - 1) {
    throw new RangeError(`region: the centre (column ${cx.toFixed(1)}, row ${cy.toFixed(1)}) lies outside the ${W} × ${H} px frame`);
  }
  let pixelCount = 0;
  const r2 = o.radiusPx * o.radiusPx;
  for (let r = Math.max(0, Math.floor(cy - o.radiusPx)); r <= Math.min(H - 1, Math.ceil(cy + o.radiusPx)); r++) {
    for (let c = Math.max(0, Math.floor(cx - o.radiusPx)); c <= Math.min(W - 1, Math.ceil(cx + o.radiusPx)); c++) {
      if ((c - cx) ** 2 + (r - cy) ** 2 <= r2 && !prepared.mask[r * W + c]) pixelCount++;
    }
  }
  if (pixelCount < 64) throw new RangeError(`region: the circle of radius ${o.radiusPx.toFixed(1)} px holds only ${pixelCount} usable pixels; choose a larger one`);
  const room = Math.min(cx + 0.5, W - 0.5 - cx, cy + 0.5, H - 0.5 - cy);
  // It holds the whole shadow when it contains the automatic circle that does, and fits in the frame.
  const holdsWholeShadow =
    !!auto && auto.holdsWholeShadow && Math.hypot(auto.centerPx[0] - cx, auto.centerPx[1] - cy) + auto.radiusPx <= o.radiusPx + 1e-9 && o.radiusPx <= room;
  return {
    centerPx: [cx, cy],
    radiusPx: o.radiusPx,
    holdsWholeShadow,
    pixelCount,
    description: `circle of radius ${o.radiusPx.toFixed(1)} px around column ${cx.toFixed(1)}, row ${cy.toFixed(1)}, chosen by hand${o.radiusPx > room ? ' (it reaches beyond the frame edge; only the pixels inside count)' : ''}`,
  };
}

