/**
 * Pictures for reports: wavefront maps from the fitted coefficients (core/zernike evaluateGrid),
 * their difference, previews of stored camera frames, and data URLs to inline them in HTML.
 * Pure: bytes in, bytes out.
 */
import { encode } from 'fast-png';
import type { FitResult } from '../fit/result.ts';
import { evaluateGrid } from '../zernike/index.ts';
import { decodePngFrame, encodePng8 } from '../imageio/png.ts';
import { decodeNpyFrame } from '../imageio/npy.ts';

/** A wavefront sampled on a square grid over the unit disc; NaN outside the disc. Row 0 is the top (+y). */
export interface WavefrontGrid {
  size: number;
  /** Row-major, waves. */
  values: Float64Array;
  min: number;
  max: number;
}

function gridStats(values: Float64Array): { min: number; max: number } {
  let min = Infinity;
  let max = -Infinity;
  for (const v of values) {
    if (Number.isNaN(v)) continue;
    if (v < min) min = v;
    if (v > max) max = v;
  }
  return Number.isFinite(min) ? { min, max } : { min: 0, max: 0 };
}

/**
 * The fitted wavefront W = Σ c_j Z_j in waves over the unit disc (radius zernike.radius_m), without
 * piston and tilt (j = 0, 1, 2), on size × size pixel centres; lab frame, x right, y up.
 */
export function wavefrontGrid(result: FitResult, size = 96): WavefrontGrid {
  const coeffs = result.zernike.terms.filter((t) => t.j > 2).map((t) => ({ j: t.j, value: t.waves }));
  const xs = Array.from({ length: size }, (_, i) => -1 + (2 * i + 1) / size);
  const ys = [...xs].reverse();
  const values = coeffs.length ? evaluateGrid(coeffs, xs, ys) : new Float64Array(size * size);
  for (let iy = 0; iy < size; iy++) {
    for (let ix = 0; ix < size; ix++) if (xs[ix] * xs[ix] + ys[iy] * ys[iy] > 1) values[iy * size + ix] = NaN;
  }
  return { size, values, ...gridStats(values) };
}

/** b − a, point by point (both of the same size). */
export function differenceGrid(a: WavefrontGrid, b: WavefrontGrid): WavefrontGrid {
  if (a.size !== b.size) throw new RangeError(`differenceGrid: sizes differ (${a.size} and ${b.size})`);
  const values = new Float64Array(a.values.length);
  for (let k = 0; k < values.length; k++) values[k] = b.values[k] - a.values[k];
  return { size: a.size, values, ...gridStats(values) };
}

/** Diverging colour scale: −1 blue, 0 white, +1 red (linear in sRGB values). */
export function divergingColour(t: number): [number, number, number] {
  const u = Math.max(-1, Math.min(1, t));
  const blue: [number, number, number] = [33, 102, 172];
  const red: [number, number, number] = [178, 24, 43];
  const end = u < 0 ? blue : red;
  const f = Math.abs(u);
  return [0, 1, 2].map((c) => Math.round(255 + (end[c] - 255) * f)) as [number, number, number];
}

/** An RGBA PNG of a grid, coloured on ±scale waves (transparent outside the disc), each grid point `zoom` pixels wide. */
export function gridToPng(grid: WavefrontGrid, scale: number, zoom = 2): Uint8Array {
  const n = grid.size * zoom;
  const data = new Uint8Array(n * n * 4);
  const s = scale > 0 ? scale : 1;
  for (let y = 0; y < n; y++) {
    for (let x = 0; x < n; x++) {
      const v = grid.values[Math.floor(y / zoom) * grid.size + Math.floor(x / zoom)];
      const o = (y * n + x) * 4;
      if (Number.isNaN(v)) continue;
      const [r, g, b] = divergingColour(v / s);
      data[o] = r;
      data[o + 1] = g;
      data[o + 2] = b;
      data[o + 3] = 255;
    }
  }
  return encode({ width: n, height: n, data, depth: 8, channels: 4 });
}

const B64 = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/';

/** Base64 (RFC 4648 §4, with padding). */
export function base64(bytes: Uint8Array): string {
  let out = '';
  let i = 0;
  for (; i + 2 < bytes.length; i += 3) {
    const v = (bytes[i] << 16) | (bytes[i + 1] << 8) | bytes[i + 2];
    out += B64[v >> 18] + B64[(v >> 12) & 63] + B64[(v >> 6) & 63] + B64[v & 63];
  }
  const rest = bytes.length - i;
  if (rest === 1) {
    const v = bytes[i] << 16;
    out += `${B64[v >> 18]}${B64[(v >> 12) & 63]}==`;
  } else if (rest === 2) {
    const v = (bytes[i] << 16) | (bytes[i + 1] << 8);
    out += `${B64[v >> 18]}${B64[(v >> 12) & 63]}${B64[(v >> 6) & 63]}=`;
  }
  return out;
}

export function pngDataUrl(png: Uint8Array): string {
  return `data:image/png;base64,${base64(png)}`;
}

/**
 * An 8-bit grayscale PNG preview of a stored camera frame (.png or .npy), stretched from its minimum
 * to its maximum and shrunk by whole steps to at most `maxSize` pixels a side; null for other types.
 */
export function framePreviewPng(bytes: Uint8Array, name: string, maxSize = 256): Uint8Array | null {
  const ext = name.toLowerCase().slice(name.lastIndexOf('.'));
  let frame: { data: Float64Array; widthPx: number; heightPx: number };
  try {
    if (ext === '.png') frame = decodePngFrame(bytes);
    else if (ext === '.npy') frame = decodeNpyFrame(bytes);
    else return null;
  } catch {
    return null;
  }
  const step = Math.max(1, Math.ceil(Math.max(frame.widthPx, frame.heightPx) / maxSize));
  const w = Math.floor(frame.widthPx / step);
  const h = Math.floor(frame.heightPx / step);
  let min = Infinity;
  let max = -Infinity;
  for (const v of frame.data) {
    if (v < min) min = v;
    if (v > max) max = v;
  }
  const span = max > min ? max - min : 1;
  const out = new Uint8Array(w * h);
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) out[y * w + x] = Math.round((255 * (frame.data[y * step * frame.widthPx + x * step] - min)) / span);
  }
  return encodePng8(out, w, h);
}
