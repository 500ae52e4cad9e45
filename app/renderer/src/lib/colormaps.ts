/**
 * Colour maps for images, as 256-entry RGB lookup tables.
 *
 * viridis and cividis are perceptually uniform sequential maps (d3-scale-chromatic); cividis also reads
 * for the common forms of colour-vision deficiency. "diverging" is ColorBrewer's RdBu turned round so that
 * negative values are blue, zero is near white and positive values are red: for signed maps (residuals,
 * wavefronts), always with a range symmetric about zero.
 */
import { interpolateCividis, interpolateRdBu, interpolateViridis } from 'd3-scale-chromatic';

export type ColormapName = 'viridis' | 'cividis' | 'diverging';

export const LUT_SIZE = 256;

const cache = new Map<ColormapName, Uint8ClampedArray>();

/** Parses "#rrggbb" or "rgb(r, g, b)" as d3 returns them. */
export function parseCssColor(css: string): [number, number, number] {
  const s = css.trim();
  if (s.startsWith('#') && s.length === 7) {
    return [parseInt(s.slice(1, 3), 16), parseInt(s.slice(3, 5), 16), parseInt(s.slice(5, 7), 16)];
  }
  const m = /^rgb\(\s*([\d.]+)\s*,\s*([\d.]+)\s*,\s*([\d.]+)\s*\)$/.exec(s);
  if (m) return [Number(m[1]), Number(m[2]), Number(m[3])];
  throw new Error(`colour "${css}" is not in a form this program reads`);
}

function interpolator(name: ColormapName): (t: number) => string {
  switch (name) {
    case 'viridis':
      return interpolateViridis;
    case 'cividis':
      return interpolateCividis;
    case 'diverging':
      return (t: number) => interpolateRdBu(1 - t);
  }
}

/** RGB triples, LUT_SIZE × 3 bytes, for t = i / (LUT_SIZE − 1). */
export function colormapLut(name: ColormapName): Uint8ClampedArray {
  let lut = cache.get(name);
  if (!lut) {
    const f = interpolator(name);
    lut = new Uint8ClampedArray(LUT_SIZE * 3);
    for (let i = 0; i < LUT_SIZE; i++) {
      const [r, g, b] = parseCssColor(f(i / (LUT_SIZE - 1)));
      lut[3 * i] = r;
      lut[3 * i + 1] = g;
      lut[3 * i + 2] = b;
    }
    cache.set(name, lut);
  }
  return lut;
}

export function colormapCss(name: ColormapName, t: number): string {
  return interpolator(name)(Math.min(1, Math.max(0, t)));
}

export type Scale = 'linear' | 'log';

export interface ValueMapping {
  /** Value range shown, in the image's units. */
  lo: number;
  hi: number;
  scale: Scale;
  /** Maps a value to 0..1 (NaN stays NaN). */
  toUnit(v: number): number;
  /** Inverse of toUnit, for the colour bar's ticks. */
  fromUnit(t: number): number;
}

/**
 * The value range of an image: min..max of the finite values, ±max|v| when symmetric, or the given range.
 * Log scale shows lo..hi with lo raised to the smallest positive value, and at least hi / 10⁴.
 */
export function valueMapping(data: ArrayLike<number>, scale: Scale, symmetric: boolean, range?: [number, number]): ValueMapping {
  let lo = Infinity;
  let hi = -Infinity;
  let minPositive = Infinity;
  for (let i = 0; i < data.length; i++) {
    const v = data[i]!;
    if (!Number.isFinite(v)) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
    if (v > 0 && v < minPositive) minPositive = v;
  }
  if (range) {
    lo = range[0];
    hi = range[1];
  }
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) {
    lo = 0;
    hi = 1;
  }
  if (symmetric && !range) {
    const m = Math.max(Math.abs(lo), Math.abs(hi));
    lo = -m;
    hi = m;
  }
  if (scale === 'log' && !symmetric) {
    if (!(hi > 0)) hi = 1;
    const floor = Math.max(hi * 1e-4, Number.isFinite(minPositive) ? minPositive : hi * 1e-4);
    lo = Math.min(Math.max(lo, floor), hi / 10);
    const l0 = Math.log10(lo);
    const l1 = Math.log10(hi);
    return {
      lo,
      hi,
      scale,
      toUnit: (v) => (Number.isNaN(v) ? NaN : (Math.log10(Math.max(v, lo)) - l0) / (l1 - l0)),
      fromUnit: (t) => 10 ** (l0 + t * (l1 - l0)),
    };
  }
  if (hi === lo) {
    hi = lo + (lo === 0 ? 1 : Math.abs(lo) * 1e-6);
  }
  const span = hi - lo;
  return { lo, hi, scale: 'linear', toUnit: (v) => (v - lo) / span, fromUnit: (t) => lo + t * span };
}

/** Writes RGBA pixels for `data` into `out` (length 4·n); NaN and ±∞ become transparent. */
export function paint(data: ArrayLike<number>, mapping: ValueMapping, lut: Uint8ClampedArray, out: Uint8ClampedArray): void {
  const top = LUT_SIZE - 1;
  for (let i = 0; i < data.length; i++) {
    const v = data[i]!;
    const o = 4 * i;
    if (!Number.isFinite(v)) {
      out[o] = 0;
      out[o + 1] = 0;
      out[o + 2] = 0;
      out[o + 3] = 0;
      continue;
    }
    const t = mapping.toUnit(v);
    const k = t <= 0 ? 0 : t >= 1 ? top : Math.round(t * top);
    out[o] = lut[3 * k]!;
    out[o + 1] = lut[3 * k + 1]!;
    out[o + 2] = lut[3 * k + 2]!;
    out[o + 3] = 255;
  }
}

/** Round tick values for the colour bar: about `count` ticks over lo..hi (log: powers of ten and 2, 5). */
export function ticks(mapping: ValueMapping, count = 5): number[] {
  const { lo, hi } = mapping;
  if (mapping.scale === 'log') {
    const out: number[] = [];
    for (let e = Math.floor(Math.log10(lo)); e <= Math.ceil(Math.log10(hi)); e++) {
      for (const m of [1, 2, 5]) {
        const v = m * 10 ** e;
        if (v >= lo * (1 - 1e-9) && v <= hi * (1 + 1e-9)) out.push(v);
      }
    }
    if (out.length > count + 2) return out.filter((v) => Math.abs(Math.log10(v) - Math.round(Math.log10(v))) < 1e-9);
    return out;
  }
  const span = hi - lo;
  const raw = span / count;
  const p = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * p).find((s) => s >= raw) ?? 10 * p;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi + step * 1e-9; v += step) out.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  return out;
}
