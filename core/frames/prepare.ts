/**
 * Preparing camera frames of the disc's shadow for the fit: average the frames, subtract the dark
 * frames, turn the result into the lab frame, mask saturated and hot pixels, estimate the background
 * and the noise, and refuse frames that cannot give a measurement (with advice).
 *
 * Pure. See README.md in this folder for the rules in plain words.
 */
import type { DecodedFrame } from '../imageio/decodeFrame.ts';
import type { CameraSpec } from '../setup/types.ts';
import { FrameError } from './errors.ts';
import { darkestBorderBlock, MAD_TO_SIGMA, median, neighbourMedian3x3, quantile, unmaskedValues } from './imageOps.ts';
import { orientImage } from './orientation.ts';

export interface PreparedFrame {
  /** Size of the prepared (lab-frame) image; after a 90° or 270° rotation it is the file's size swapped. */
  widthPx: number;
  heightPx: number;
  /**
   * Mean of the frames minus the mean of the dark frames (or the plain mean when there are none), in
   * counts, row-major in the lab frame: column index along +x, row index along −y, row 0 on top.
   */
  counts: Float64Array;
  /** 1 = pixel excluded from any analysis (saturated or hot), same layout as `counts`. */
  mask: Uint8Array;
  /** 1 = saturated in at least one frame. */
  saturatedMask: Uint8Array;
  /** 1 = hot pixel (see README.md for the rule). */
  hotMask: Uint8Array;
  saturatedCount: number;
  /** Hot pixels that are not also saturated. */
  hotCount: number;
  frameCount: number;
  darkCount: number;
  /**
   * The level in `counts` that carries no laser light: 0 when dark frames were subtracted (they hold
   * the offset), otherwise the median of the darkest block along the frame border.
   */
  backgroundCounts: number;
  backgroundMethod: 'dark frames subtracted' | 'darkest border block';
  /** Mean of the subtracted dark frame over the usable pixels, or null without dark frames. */
  darkMeanCounts: number | null;
  /**
   * Read and background noise of one frame, RMS counts: from the spread between dark frames when
   * there are two or more, else the pixel-to-pixel spread of the dark frame, else that of the darkest
   * border block (an upper estimate when light reaches it). Shot noise is not included.
   */
  readNoiseCounts: number;
  noiseMethod: string;
  /** 2^camera.bitDepth − 1. */
  fullScaleCounts: number;
  /** File names of the frames and of the dark frames, for messages. */
  names: string[];
  darkNames: string[];
  /** "a.png" or "a.png (mean of 3 frames)", for messages. */
  label: string;
  warnings: string[];
}

/** More than this fraction of saturated pixels is refused (common practice, no published source). */
export const MAX_SATURATED_FRACTION = 0.3;
/** A frame whose 95th percentile is less than this many counts above the background is refused (common practice, no published source). */
export const MIN_SIGNAL_COUNTS = 20;
/** … or whose peak is below this fraction of full scale (common practice, no published source). */
export const MIN_PEAK_FRACTION = 0.05;
/** Without dark frames, a border level above this fraction of full scale counts as light, not offset (common practice, no published source). */
export const BRIGHT_BORDER_FRACTION = 0.1;
/** Hot pixel: more than this many robust standard deviations above its neighbours (common practice, no published source). */
export const HOT_PIXEL_SIGMAS = 8;
/** … and more than this many counts for a 12-bit or deeper camera (scaled down for fewer bits; common practice, no published source). */
export const HOT_PIXEL_MIN_COUNTS_12BIT = 50;

function maxOf(a: Float64Array): number {
  let m = -Infinity;
  for (let i = 0; i < a.length; i++) if (a[i] > m) m = a[i];
  return m;
}

function describeLabel(names: string[]): string {
  return names.length === 1 ? names[0] : `${names[0]} (mean of ${names.length} frames: ${names.join(', ')})`;
}

/**
 * Check one decoded frame against the camera's bit depth. Returns warnings; throws 'wrong bit depth'
 * when a count exceeds 2^bitDepth − 1.
 */
function checkBitDepth(f: DecodedFrame, name: string, camera: CameraSpec, kind: string): string[] {
  const warnings: string[] = [];
  const top = 2 ** camera.bitDepth - 1;
  const mx = maxOf(f.data);
  if (mx > top) {
    let hint = '';
    if (f.bitDepth !== null && f.bitDepth > camera.bitDepth) {
      const step = 2 ** (f.bitDepth - camera.bitDepth);
      let aligned = true;
      for (let i = 0; i < f.data.length && aligned; i++) if (f.data[i] % step !== 0) aligned = false;
      hint = aligned
        ? ` Every value is a multiple of ${step}: the camera seems to store its ${camera.bitDepth}-bit data in the high bits of ${f.bitDepth}-bit samples; set camera.bitDepth to ${f.bitDepth} (and camera.saturation to ${top * step}) or save the frames unshifted.`
        : ` Check camera.bitDepth in the setup (the file holds ${f.bitDepth}-bit samples).`;
    } else {
      hint = ' Check camera.bitDepth in the setup.';
    }
    throw new FrameError('wrong bit depth', name, `the ${kind} holds counts up to ${mx}, above ${top}, the largest a ${camera.bitDepth}-bit camera (setup camera.bitDepth = ${camera.bitDepth}) can record.${hint}`);
  }
  if (f.bitDepth !== null && f.bitDepth > camera.bitDepth) {
    warnings.push(`${name}: the file holds ${f.bitDepth}-bit samples and the setup says a ${camera.bitDepth}-bit camera; all counts are within ${top}, so they are read as ${camera.bitDepth}-bit data`);
  } else if (f.bitDepth !== null && f.bitDepth < camera.bitDepth) {
    warnings.push(`${name}: the file holds only ${f.bitDepth}-bit samples but the setup says a ${camera.bitDepth}-bit camera: counts at ${2 ** f.bitDepth - 1} are treated as saturated; save the frames with the camera's full depth`);
  }
  return warnings;
}

/** Saturation threshold of one frame: the setup's, lowered to the file's own full scale when that is smaller. */
function saturationOf(f: DecodedFrame, camera: CameraSpec): number {
  const own = f.bitDepth !== null && f.bitDepth < camera.bitDepth ? 2 ** f.bitDepth - 1 : Infinity;
  return Math.min(camera.saturationCounts, own);
}

/**
 * Hot pixels of an image (see README.md): a pixel whose excess over the median of its 8 neighbours is
 * above HOT_PIXEL_SIGMAS robust standard deviations, and above a minimum number of counts. The standard
 * deviation depends on the level, as shot noise does: the robust variance of the excess is measured in
 * 16 groups of pixels of similar neighbourhood level and fitted by a straight line, variance = a + b·level
 * (read noise plus shot noise). Pixels already masked are neither tested nor used.
 */
export function findHotPixels(image: Float64Array, widthPx: number, heightPx: number, bitDepth: number, exclude: Uint8Array | null): Uint8Array {
  const n = image.length;
  const med = neighbourMedian3x3(image, widthPx, heightPx, exclude);
  const usable = (i: number) => !(exclude && exclude[i]) && Number.isFinite(med[i]);
  // Pixels grouped by neighbourhood level into 16 groups of about equal size (level quantiles).
  let count = 0;
  for (let i = 0; i < n; i++) if (usable(i)) count++;
  const levels = new Float64Array(count);
  for (let i = 0, k = 0; i < n; i++) if (usable(i)) levels[k++] = med[i];
  levels.sort();
  const nGroups = 16;
  const edges: number[] = [];
  for (let g = 1; g < nGroups; g++) edges.push(levels[Math.floor((g * count) / nGroups)] ?? Infinity);
  const groupOf = (v: number) => {
    let lo = 0;
    let hi = edges.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (v >= edges[mid]) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  };
  const groupIndex = new Uint8Array(n);
  const sizes = new Int32Array(nGroups);
  for (let i = 0; i < n; i++) {
    if (!usable(i)) continue;
    const g = groupOf(med[i]);
    groupIndex[i] = g;
    sizes[g]++;
  }
  const ex: Float64Array[] = Array.from(sizes, (k) => new Float64Array(k));
  const lvl: Float64Array[] = Array.from(sizes, (k) => new Float64Array(k));
  const fill = new Int32Array(nGroups);
  for (let i = 0; i < n; i++) {
    if (!usable(i)) continue;
    const g = groupIndex[i];
    ex[g][fill[g]] = image[i] - med[i];
    lvl[g][fill[g]++] = med[i];
  }
  const lv: number[] = [];
  const vr: number[] = [];
  for (let g = 0; g < nGroups; g++) {
    if (sizes[g] < 8) continue;
    const e = ex[g];
    const m = median(e);
    for (let k = 0; k < e.length; k++) e[k] = Math.abs(e[k] - m);
    const s = MAD_TO_SIGMA * median(e);
    lv.push(median(lvl[g]));
    vr.push(s * s);
  }
  // Straight-line fit of variance against level (least squares), slope and intercept kept ≥ 0.
  let a = 0;
  let b = 0;
  if (lv.length >= 2) {
    const k = lv.length;
    const mx = lv.reduce((p, q) => p + q, 0) / k;
    const my = vr.reduce((p, q) => p + q, 0) / k;
    let sxx = 0;
    let sxy = 0;
    for (let j = 0; j < k; j++) {
      sxx += (lv[j] - mx) ** 2;
      sxy += (lv[j] - mx) * (vr[j] - my);
    }
    b = sxx > 0 ? Math.max(0, sxy / sxx) : 0;
    a = Math.max(0, my - b * mx);
    if (a === 0 && b === 0) a = my;
  } else if (lv.length === 1) {
    a = vr[0];
  }
  const minExcess = HOT_PIXEL_MIN_COUNTS_12BIT * Math.min(1, 2 ** (bitDepth - 12));
  const hot = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    if (!usable(i)) continue;
    const sigma = Math.sqrt(Math.max(a + b * Math.max(0, med[i]), 0.25));
    if (image[i] - med[i] > Math.max(HOT_PIXEL_SIGMAS * sigma, minExcess)) hot[i] = 1;
  }
  return hot;
}

/**
 * Average and clean the frames of one measurement.
 * @param frames decoded frames of the shadow (one or more, same size)
 * @param darks decoded dark frames (laser blocked, same exposure; may be empty)
 * @param camera the setup's camera (bit depth, saturation, orientation)
 * @param names file names of the frames, optionally followed by those of the dark frames
 * @throws FrameError 'no frames' | 'wrong dimensions' | 'wrong bit depth' | 'mostly saturated' | 'mostly dark'
 */
export function prepareFrames(frames: DecodedFrame[], darks: DecodedFrame[], camera: CameraSpec, names: string[]): PreparedFrame {
  const frameNames = frames.map((_, k) => names[k] ?? `frame ${k + 1}`);
  const darkNames = darks.map((_, k) => names[frames.length + k] ?? `dark frame ${k + 1}`);
  if (frames.length === 0) throw new FrameError('no frames', 'frames', 'no frame was given');
  const label = describeLabel(frameNames);
  const { widthPx: W0, heightPx: H0 } = frames[0];
  const n = W0 * H0;
  const warnings: string[] = [];
  for (const f of frames) warnings.push(...f.warnings);
  for (const f of darks) warnings.push(...f.warnings);

  // Sizes: every frame and dark frame must match the first frame.
  const all = [...frames.map((f, k) => ({ f, name: frameNames[k], kind: 'frame' })), ...darks.map((f, k) => ({ f, name: darkNames[k], kind: 'dark frame' }))];
  for (const { f, name, kind } of all) {
    if (f.widthPx !== W0 || f.heightPx !== H0) {
      throw new FrameError('wrong dimensions', name, `this ${kind} is ${f.widthPx} × ${f.heightPx} px but ${frameNames[0]} is ${W0} × ${H0} px; every frame and dark frame of a measurement must have the same size`);
    }
    if (f.data.length !== n) throw new FrameError('wrong dimensions', name, `holds ${f.data.length} values for ${f.widthPx} × ${f.heightPx} px`);
  }
  for (const { f, name, kind } of all) warnings.push(...checkBitDepth(f, name, camera, kind));

  // Saturation, on the raw frames before averaging: any frame saturating a pixel masks it.
  const satRaw = new Uint8Array(n);
  for (const f of frames) {
    const top = saturationOf(f, camera);
    for (let i = 0; i < n; i++) if (f.data[i] >= top) satRaw[i] = 1;
  }
  let satRawCount = 0;
  for (let i = 0; i < n; i++) satRawCount += satRaw[i];
  if (satRawCount > MAX_SATURATED_FRACTION * n) {
    throw new FrameError(
      'mostly saturated',
      label,
      `${((100 * satRawCount) / n).toFixed(0)} % of the pixels reach the saturation level (${camera.saturationCounts} counts); attenuate the beam or shorten the exposure`,
    );
  }
  // Darks that saturate are only reported: their pixels are masked as well.
  for (let k = 0; k < darks.length; k++) {
    const top = saturationOf(darks[k], camera);
    let s = 0;
    for (let i = 0; i < n; i++) {
      if (darks[k].data[i] >= top) {
        satRaw[i] = 1;
        s++;
      }
    }
    if (s > 0) warnings.push(`${darkNames[k]}: ${s} pixels of this dark frame are saturated (stray light?); they are excluded`);
  }

  // Averages.
  const mean = new Float64Array(n);
  for (const f of frames) for (let i = 0; i < n; i++) mean[i] += f.data[i];
  for (let i = 0; i < n; i++) mean[i] /= frames.length;
  let darkMeanImage: Float64Array | null = null;
  if (darks.length > 0) {
    darkMeanImage = new Float64Array(n);
    for (const f of darks) for (let i = 0; i < n; i++) darkMeanImage[i] += f.data[i];
    for (let i = 0; i < n; i++) darkMeanImage[i] /= darks.length;
    for (let i = 0; i < n; i++) mean[i] -= darkMeanImage[i];
  }

  // Into the lab frame.
  const o = camera.orientation;
  const counts = orientImage(mean, W0, H0, o);
  const { widthPx, heightPx } = counts;
  const saturatedMask = orientImage(satRaw, W0, H0, o).data;
  const darkOriented = darkMeanImage ? orientImage(darkMeanImage, W0, H0, o).data : null;

  // Hot pixels: in the dark frame when there is one (no laser light to confuse them with), else in the frame.
  const hotMask = findHotPixels(darkOriented ?? counts.data, widthPx, heightPx, camera.bitDepth, saturatedMask);
  const mask = new Uint8Array(n);
  let saturatedCount = 0;
  let hotCount = 0;
  for (let i = 0; i < n; i++) {
    if (saturatedMask[i]) saturatedCount++;
    else if (hotMask[i]) hotCount++;
    mask[i] = saturatedMask[i] | hotMask[i];
  }
  if (saturatedCount > 0) warnings.push(`${label}: ${saturatedCount} saturated pixels are excluded`);
  if (hotCount > 0) warnings.push(`${label}: ${hotCount} hot pixels are excluded`);

  // Background and noise.
  let backgroundCounts: number;
  let backgroundMethod: PreparedFrame['backgroundMethod'];
  let darkMeanCounts: number | null = null;
  let readNoiseCounts: number;
  let noiseMethod: string;
  if (darkOriented) {
    backgroundCounts = 0;
    backgroundMethod = 'dark frames subtracted';
    const usable = unmaskedValues(darkOriented, mask);
    let s = 0;
    for (const v of usable) s += v;
    darkMeanCounts = usable.length ? s / usable.length : NaN;
    if (darks.length >= 2) {
      // Temporal spread: the difference of two dark frames has variance 2σ² per pixel.
      const d = new Float64Array(n);
      for (let i = 0; i < n; i++) d[i] = darks[0].data[i] - darks[1].data[i];
      readNoiseCounts = madSigma1(unmaskedValues(orientImage(d, W0, H0, o).data, mask)) / Math.SQRT2;
      noiseMethod = 'difference of the first two dark frames';
    } else {
      readNoiseCounts = madSigma1(usable);
      noiseMethod = 'pixel-to-pixel spread of the dark frame (includes fixed-pattern noise)';
    }
  } else {
    const b = darkestBorderBlock(counts.data, widthPx, heightPx, mask);
    backgroundCounts = b.medianCounts;
    backgroundMethod = 'darkest border block';
    readNoiseCounts = b.sigmaCounts * Math.sqrt(frames.length);
    noiseMethod = 'pixel-to-pixel spread of the darkest border block (an upper estimate if light reaches it)';
    warnings.push(`${label}: no dark frames: the background (${backgroundCounts.toFixed(1)} counts) is taken from the darkest part of the frame border; record dark frames (laser blocked) for a better estimate`);
  }

  // Refusals with advice.
  const fullScaleCounts = 2 ** camera.bitDepth - 1;
  const usable = unmaskedValues(counts.data, mask);
  const p95 = quantile(usable, 0.95);
  const peak = robustPeak(counts.data, widthPx, heightPx, mask);
  const aboveBg = p95 - backgroundCounts;
  const peakAbove = peak - backgroundCounts;
  // Without dark frames, a border level above 10 % of full scale is light, not a camera offset: such a
  // frame is bright, not dark (common practice, no published source); the pattern search judges it.
  const litBorder = !darkOriented && backgroundCounts > BRIGHT_BORDER_FRACTION * fullScaleCounts;
  if (!litBorder && (!(aboveBg >= MIN_SIGNAL_COUNTS) || !(peakAbove >= MIN_PEAK_FRACTION * fullScaleCounts))) {
    const why = !(aboveBg >= MIN_SIGNAL_COUNTS)
      ? `95 % of the pixels are within ${aboveBg.toFixed(1)} counts of the background (${backgroundCounts.toFixed(1)}); at least ${MIN_SIGNAL_COUNTS} are needed`
      : `the peak is ${peakAbove.toFixed(1)} counts above the background, below ${(100 * MIN_PEAK_FRACTION).toFixed(0)} % of full scale (${fullScaleCounts})`;
    let hint = '';
    let integral = true;
    for (let i = 0; i < usable.length && integral; i++) if (!Number.isInteger(usable[i])) integral = false;
    if (!integral && peak <= 2) hint = ' (the values look like relative intensities, not counts: a frame must hold camera counts)';
    throw new FrameError('mostly dark', label, `${why}${hint}; lengthen the exposure or remove attenuation`);
  }

  return {
    widthPx,
    heightPx,
    counts: counts.data,
    mask,
    saturatedMask,
    hotMask,
    saturatedCount,
    hotCount,
    frameCount: frames.length,
    darkCount: darks.length,
    backgroundCounts,
    backgroundMethod,
    darkMeanCounts,
    readNoiseCounts,
    noiseMethod,
    fullScaleCounts,
    names: frameNames,
    darkNames,
    label,
    warnings,
  };
}

function madSigma1(v: Float64Array): number {
  const m = median(v);
  const d = new Float64Array(v.length);
  for (let i = 0; i < v.length; i++) d[i] = Math.abs(v[i] - m);
  return MAD_TO_SIGMA * median(d);
}

/** Largest 3 × 3 mean of usable pixels (so that one stray pixel does not count as the peak). */
function robustPeak(data: Float64Array, widthPx: number, heightPx: number, mask: Uint8Array): number {
  let best = -Infinity;
  for (let r = 1; r < heightPx - 1; r++) {
    for (let c = 1; c < widthPx - 1; c++) {
      let s = 0;
      let k = 0;
      for (let dr = -1; dr <= 1; dr++) {
        for (let dc = -1; dc <= 1; dc++) {
          const i = (r + dr) * widthPx + c + dc;
          if (!mask[i]) {
            s += data[i];
            k++;
          }
        }
      }
      if (k >= 5 && s / k > best) best = s / k;
    }
  }
  if (best === -Infinity) best = maxOf(unmaskedValues(data, mask));
  return best;
}
