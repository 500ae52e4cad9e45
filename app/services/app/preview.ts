/**
 * The preview of a frame set for the frames screen: decode the bytes, average and clean the frames,
 * locate the pattern and choose (or take) the region, then shrink the image for display when it is
 * larger than 1024 px, and list the saturated and hot pixels (core/frames/prepare.ts masks).
 */
import type { FramePreview, FrameSetRequest, ImagePlane } from '../../shared/contract.ts';
import { parseSetup } from '../../../core/setup/parseSetup.ts';
import { loadFramesFromBytes } from '../frames.ts';
import { AppProblem } from './problems.ts';

/** Largest side shown at full resolution. */
export const PREVIEW_MAX_SIDE_PX = 1024;
/** At most this many marked pixels of each kind are listed (the rest are counted in a warning). */
export const PREVIEW_MAX_MARKS = 20000;

/** Block means of d × d pixels (partial blocks at the right and bottom edges average what they hold). */
export function decimate(values: ArrayLike<number>, widthPx: number, heightPx: number, d: number): { data: Float32Array; widthPx: number; heightPx: number } {
  if (d <= 1) return { data: Float32Array.from(values), widthPx, heightPx };
  const w = Math.ceil(widthPx / d);
  const h = Math.ceil(heightPx / d);
  const sum = new Float64Array(w * h);
  const n = new Uint32Array(w * h);
  for (let r = 0; r < heightPx; r++) {
    const o = Math.floor(r / d) * w;
    for (let c = 0; c < widthPx; c++) {
      const k = o + Math.floor(c / d);
      sum[k] += values[r * widthPx + c];
      n[k]++;
    }
  }
  const data = new Float32Array(w * h);
  for (let k = 0; k < data.length; k++) data[k] = sum[k] / n[k];
  return { data, widthPx: w, heightPx: h };
}

/** Image-plane coordinates [column, row] of the marked pixels (one entry per display pixel). */
function marks(mask: Uint8Array, exclude: Uint8Array | null, widthPx: number, d: number, max: number): { list: [number, number][]; total: number } {
  const seen = new Set<number>();
  const list: [number, number][] = [];
  let total = 0;
  const w = Math.ceil(widthPx / d);
  for (let i = 0; i < mask.length; i++) {
    if (!mask[i] || (exclude && exclude[i])) continue;
    const c = Math.floor((i % widthPx) / d);
    const r = Math.floor(Math.floor(i / widthPx) / d);
    const key = r * w + c;
    if (seen.has(key)) continue;
    seen.add(key);
    total++;
    if (list.length < max) list.push([c, r]);
  }
  return { list, total };
}

export function framePreview(req: FrameSetRequest): FramePreview {
  if (!req.frames.length) throw new AppProblem('frame', 'No frame was given: open or drop at least one camera frame.', undefined, 'frames');
  const setup = parseSetup(req.setup, 'bench setup');
  const prepared = loadFramesFromBytes(req.frames, req.darks, setup, req.region ?? null);
  const { widthPx: W, heightPx: H } = prepared;
  const d = Math.max(1, Math.ceil(Math.max(W, H) / PREVIEW_MAX_SIDE_PX));
  const small = decimate(prepared.counts, W, H, d);
  const image: ImagePlane = { widthPx: small.widthPx, heightPx: small.heightPx, data: small.data, pixelM: setup.camera.pixelPitchM * d };
  const sat = marks(prepared.saturatedMask, null, W, d, PREVIEW_MAX_MARKS);
  const hot = marks(prepared.hotMask, prepared.saturatedMask, W, d, PREVIEW_MAX_MARKS);
  let peak = -Infinity;
  for (let i = 0; i < prepared.counts.length; i++) if (!prepared.mask[i] && prepared.counts[i] > peak) peak = prepared.counts[i];
  const warnings = [...prepared.warnings, `${prepared.label}: region to analyse: ${prepared.region.description}`];
  if (sat.total > sat.list.length) warnings.push(`only the first ${sat.list.length} of ${sat.total} saturated display pixels are marked`);
  if (hot.total > hot.list.length) warnings.push(`only the first ${hot.list.length} of ${hot.total} hot display pixels are marked`);
  if (d > 1) warnings.push(`the ${W} × ${H} px frame is shown at 1/${d} of its resolution; the fit uses every pixel`);
  return {
    image,
    decimation: d,
    saturated: sat.list,
    hot: hot.list,
    centerPx: [prepared.located.centerPx[0], prepared.located.centerPx[1]],
    region: { centerPx: [prepared.region.centerPx[0], prepared.region.centerPx[1]], radiusPx: prepared.region.radiusPx, wholeShadow: prepared.region.holdsWholeShadow },
    peakCounts: Number.isFinite(peak) ? peak : 0,
    warnings,
  };
}
