/**
 * Small image operations shared by frame preparation, pattern location and beam analysis.
 * Images are row-major Float64Arrays, row 0 on top; masks are Uint8Arrays with 1 = excluded.
 * Pure.
 */

/** Scale factor from the median absolute deviation to the standard deviation of a normal distribution, 1/Φ⁻¹(3/4). */
export const MAD_TO_SIGMA = 1.482602218505602;

/** k-th smallest value (0-based) of `a`, reordering `a` in place (Hoare's selection). */
function selectInPlace(a: Float64Array, k: number): number {
  let lo = 0;
  let hi = a.length - 1;
  while (lo < hi) {
    const pivot = a[(lo + hi) >> 1];
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) {
        const t = a[i];
        a[i] = a[j];
        a[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return a[k];
  }
  return a[k];
}

/** Quantile q ∈ [0, 1] of the values (linear interpolation between order statistics). NaN when empty. */
export function quantile(values: ArrayLike<number>, q: number): number {
  const n = values.length;
  if (n === 0) return NaN;
  const a = Float64Array.from(values);
  const pos = Math.min(Math.max(q, 0), 1) * (n - 1);
  const k = Math.floor(pos);
  const lo = selectInPlace(a, k);
  if (pos === k) return lo;
  // The next order statistic is the smallest value above index k after selection.
  let hi = Infinity;
  for (let i = k + 1; i < n; i++) if (a[i] < hi) hi = a[i];
  return lo + (pos - k) * (hi - lo);
}

export function median(values: ArrayLike<number>): number {
  return quantile(values, 0.5);
}

/** Robust standard deviation: 1.4826 × median absolute deviation from the median. */
export function madSigma(values: ArrayLike<number>): number {
  const m = median(values);
  const dev = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) dev[i] = Math.abs(values[i] - m);
  return MAD_TO_SIGMA * median(dev);
}

/** The values of `data` where `mask` is 0 (all of them when mask is null). */
export function unmaskedValues(data: Float64Array, mask: Uint8Array | null): Float64Array {
  if (!mask) return data;
  let n = 0;
  for (let i = 0; i < data.length; i++) if (!mask[i]) n++;
  const out = new Float64Array(n);
  let k = 0;
  for (let i = 0; i < data.length; i++) if (!mask[i]) out[k++] = data[i];
  return out;
}

/**
 * Median of the (up to 8) neighbours of every pixel in its 3 × 3 neighbourhood, the pixel itself
 * excluded; masked neighbours are skipped. NaN where no neighbour is usable.
 */
export function neighbourMedian3x3(data: Float64Array, widthPx: number, heightPx: number, mask: Uint8Array | null): Float64Array {
  const out = new Float64Array(data.length);
  const buf = new Float64Array(8);
  for (let r = 0; r < heightPx; r++) {
    for (let c = 0; c < widthPx; c++) {
      let n = 0;
      for (let dr = -1; dr <= 1; dr++) {
        const rr = r + dr;
        if (rr < 0 || rr >= heightPx) continue;
        for (let dc = -1; dc <= 1; dc++) {
          const cc = c + dc;
          if ((dr === 0 && dc === 0) || cc < 0 || cc >= widthPx) continue;
          const j = rr * widthPx + cc;
          if (mask && mask[j]) continue;
          // Insertion sort into buf[0..n].
          const v = data[j];
          let k = n++;
          while (k > 0 && buf[k - 1] > v) {
            buf[k] = buf[k - 1];
            k--;
          }
          buf[k] = v;
        }
      }
      out[r * widthPx + c] = n === 0 ? NaN : n & 1 ? buf[n >> 1] : 0.5 * (buf[(n >> 1) - 1] + buf[n >> 1]);
    }
  }
  return out;
}

/** Normalised Gaussian kernel for σ (pixels), truncated at ±ceil(3σ). */
function gaussianKernel(sigmaPx: number): Float64Array {
  const h = Math.max(1, Math.ceil(3 * sigmaPx));
  const k = new Float64Array(2 * h + 1);
  let s = 0;
  for (let i = -h; i <= h; i++) {
    const v = Math.exp((-0.5 * i * i) / (sigmaPx * sigmaPx));
    k[i + h] = v;
    s += v;
  }
  for (let i = 0; i < k.length; i++) k[i] /= s;
  return k;
}

function convolveRows(src: Float64Array, w: number, h: number, k: Float64Array): Float64Array {
  const out = new Float64Array(src.length);
  const half = (k.length - 1) >> 1;
  for (let r = 0; r < h; r++) {
    const o = r * w;
    for (let c = 0; c < w; c++) {
      let s = 0;
      const lo = Math.max(0, c - half);
      const hi = Math.min(w - 1, c + half);
      for (let cc = lo; cc <= hi; cc++) s += k[cc - c + half] * src[o + cc];
      out[o + c] = s;
    }
  }
  return out;
}

function convolveCols(src: Float64Array, w: number, h: number, k: Float64Array): Float64Array {
  const out = new Float64Array(src.length);
  const half = (k.length - 1) >> 1;
  for (let r = 0; r < h; r++) {
    const lo = Math.max(0, r - half);
    const hi = Math.min(h - 1, r + half);
    for (let c = 0; c < w; c++) {
      let s = 0;
      for (let rr = lo; rr <= hi; rr++) s += k[rr - r + half] * src[rr * w + c];
      out[r * w + c] = s;
    }
  }
  return out;
}

/**
 * Gaussian smoothing by normalised convolution: blur(f·m) / blur(m) with m = 1 on usable pixels.
 * Masked pixels and the frame border therefore neither darken nor brighten the result; masked
 * pixels receive the weighted mean of their surroundings. σ = 0 returns a copy with masked pixels
 * filled the same way over a 3 × 3 window where possible.
 */
export function smoothMasked(data: Float64Array, widthPx: number, heightPx: number, sigmaPx: number, mask: Uint8Array | null): Float64Array {
  const k = gaussianKernel(Math.max(sigmaPx, 0.5));
  if (!(sigmaPx > 0) && !mask) return data.slice();
  const fm = new Float64Array(data.length);
  const m = new Float64Array(data.length);
  for (let i = 0; i < data.length; i++) {
    const w = mask && mask[i] ? 0 : 1;
    m[i] = w;
    fm[i] = w * data[i];
  }
  const num = convolveCols(convolveRows(fm, widthPx, heightPx, k), widthPx, heightPx, k);
  const den = convolveCols(convolveRows(m, widthPx, heightPx, k), widthPx, heightPx, k);
  const out = new Float64Array(data.length);
  for (let i = 0; i < data.length; i++) {
    if (!(sigmaPx > 0) && !(mask && mask[i])) out[i] = data[i];
    else out[i] = den[i] > 1e-9 ? num[i] / den[i] : 0;
  }
  return out;
}

/**
 * Mean over b × b blocks of the usable pixels (partial blocks at the right and bottom edges kept).
 * Binned pixel (i, j) covers full-resolution columns j·b … j·b + b − 1; its centre sits at full-resolution
 * column j·b + (b − 1)/2 (for whole blocks). `weight` is the fraction of usable pixels in each block.
 */
export function binImage(
  data: Float64Array,
  widthPx: number,
  heightPx: number,
  b: number,
  mask: Uint8Array | null,
): { data: Float64Array; weight: Float64Array; widthPx: number; heightPx: number } {
  const w2 = Math.ceil(widthPx / b);
  const h2 = Math.ceil(heightPx / b);
  const sum = new Float64Array(w2 * h2);
  const cnt = new Float64Array(w2 * h2);
  const tot = new Float64Array(w2 * h2);
  for (let r = 0; r < heightPx; r++) {
    const rb = Math.floor(r / b);
    for (let c = 0; c < widthPx; c++) {
      const j = rb * w2 + Math.floor(c / b);
      tot[j]++;
      const i = r * widthPx + c;
      if (mask && mask[i]) continue;
      sum[j] += data[i];
      cnt[j]++;
    }
  }
  const out = new Float64Array(w2 * h2);
  const weight = new Float64Array(w2 * h2);
  for (let j = 0; j < out.length; j++) {
    out[j] = cnt[j] > 0 ? sum[j] / cnt[j] : 0;
    weight[j] = cnt[j] / tot[j];
  }
  return { data: out, weight, widthPx: w2, heightPx: h2 };
}

/** Bilinear interpolation at (x = column, y = row); NaN outside [0, W−1] × [0, H−1]. */
export function bilinear(data: Float64Array, widthPx: number, heightPx: number, x: number, y: number): number {
  if (!(x >= 0 && y >= 0 && x <= widthPx - 1 && y <= heightPx - 1)) return NaN;
  const c0 = Math.min(Math.floor(x), widthPx - 2 < 0 ? 0 : widthPx - 2);
  const r0 = Math.min(Math.floor(y), heightPx - 2 < 0 ? 0 : heightPx - 2);
  const fx = x - c0;
  const fy = y - r0;
  const c1 = Math.min(c0 + 1, widthPx - 1);
  const r1 = Math.min(r0 + 1, heightPx - 1);
  const a = data[r0 * widthPx + c0];
  const b = data[r0 * widthPx + c1];
  const c = data[r1 * widthPx + c0];
  const d = data[r1 * widthPx + c1];
  return (1 - fy) * ((1 - fx) * a + fx * b) + fy * ((1 - fx) * c + fx * d);
}

/**
 * The darkest region along the frame border: the border strip (width 5 % of the smaller side, at least
 * 2 px) is cut into blocks (8 along each side); the block with the lowest median wins. Returns its
 * median and robust (MAD) standard deviation.
 */
export function darkestBorderBlock(
  data: Float64Array,
  widthPx: number,
  heightPx: number,
  mask: Uint8Array | null,
): { medianCounts: number; sigmaCounts: number; pixels: number } {
  const bw = Math.max(2, Math.round(0.05 * Math.min(widthPx, heightPx)));
  const blocks: { r0: number; r1: number; c0: number; c1: number }[] = [];
  const nAlong = 8;
  for (let k = 0; k < nAlong; k++) {
    const c0 = Math.floor((k * widthPx) / nAlong);
    const c1 = Math.floor(((k + 1) * widthPx) / nAlong);
    blocks.push({ r0: 0, r1: Math.min(bw, heightPx), c0, c1 });
    blocks.push({ r0: Math.max(0, heightPx - bw), r1: heightPx, c0, c1 });
    const r0 = Math.floor((k * heightPx) / nAlong);
    const r1 = Math.floor(((k + 1) * heightPx) / nAlong);
    blocks.push({ r0, r1, c0: 0, c1: Math.min(bw, widthPx) });
    blocks.push({ r0, r1, c0: Math.max(0, widthPx - bw), c1: widthPx });
  }
  let best = { medianCounts: NaN, sigmaCounts: NaN, pixels: 0 };
  for (const b of blocks) {
    const vals: number[] = [];
    for (let r = b.r0; r < b.r1; r++) {
      for (let c = b.c0; c < b.c1; c++) {
        const i = r * widthPx + c;
        if (!(mask && mask[i])) vals.push(data[i]);
      }
    }
    if (vals.length < 4) continue;
    const m = median(vals);
    if (!(m >= best.medianCounts)) best = { medianCounts: m, sigmaCounts: madSigma(vals), pixels: vals.length };
  }
  if (best.pixels === 0) {
    const vals = unmaskedValues(data, mask);
    best = { medianCounts: quantile(vals, 0.05), sigmaCounts: madSigma(vals), pixels: vals.length };
  }
  return best;
}
