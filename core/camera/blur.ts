/**
 * Finite-source blur.
 *
 * A uniform disc-shaped source of diameter S at distance G from the disc images onto the camera
 * (distance L from the disc) as a uniform disc of diameter S·L/G. Each source point produces its own,
 * shifted, copy of the pattern and the copies add in intensity, so the recorded frame is the
 * point-source frame convolved with that disc, normalised to unit sum: the total power is kept
 * (physics notes, section 2).
 *
 * Discrete kernel: the pixel values are treated as constant over each pixel, so the weight of the
 * pixel at offset (i, j) is the exact area of overlap between the disc (centred on pixel (0, 0)) and
 * that pixel's square, divided by the disc area. This is the limit of area-weighted sub-pixel sampling,
 * computed in closed form, so the kernel varies continuously with the diameter. A disc of diameter
 * ≤ 1 px lies inside the centre pixel and the kernel is the identity.
 *
 * Convolution: direct for small kernels, otherwise by FFT (fft.js, radix-4, power-of-two sizes) with
 * enough zero padding that nothing wraps around. Outside the frame the image is taken as zero; a
 * caller that needs correct values up to the frame edge simulates `blurMarginPx(d)` extra pixels on
 * every side, blurs, and crops.
 */
import FFT from 'fft.js';

/** Diameter S·L/G of the source's image on the camera (0 for a point source or G = ∞). */
export function sourceImageDiameterM(sourceSizeM: number, sourceDistanceM: number, cameraDistanceM: number): number {
  if (!(sourceSizeM >= 0) || !(sourceDistanceM > 0) || !(cameraDistanceM >= 0)) {
    throw new RangeError('sourceImageDiameterM: sizes and distances must be ≥ 0 (source distance > 0)');
  }
  if (sourceSizeM === 0 || sourceDistanceM === Infinity) return 0;
  return (sourceSizeM * cameraDistanceM) / sourceDistanceM;
}

function checkDiameter(diameterPx: number): void {
  if (!Number.isFinite(diameterPx) || diameterPx < 0) throw new RangeError(`blur diameter must be finite and ≥ 0 px (got ${diameterPx})`);
}

/**
 * Margin (pixels on each side) that a caller must add around a frame so that blurring and cropping
 * gives correct values at the frame edge: the half-width of the kernel's support.
 */
export function blurMarginPx(diameterPx: number): number {
  checkDiameter(diameterPx);
  // Pixel i (centre at i, square [i − ½, i + ½]) overlaps the disc of radius R when |i| − ½ < R.
  return Math.max(0, Math.ceil(diameterPx / 2 + 0.5) - 1);
}

/** ∫ √(R² − x²) dx = ½ (x √(R² − x²) + R² asin(x/R)), for |x| ≤ R. */
function chordIntegral(R: number, x: number): number {
  const t = Math.max(-1, Math.min(1, x / R));
  return 0.5 * (x * Math.sqrt(Math.max(0, R * R - x * x)) + R * R * Math.asin(t));
}

/** Exact area of the disc x² + y² ≤ R² inside the rectangle [x0, x1] × [y0, y1]. */
export function discRectOverlap(R: number, x0: number, x1: number, y0: number, y1: number): number {
  const a = Math.max(x0, -R);
  const b = Math.min(x1, R);
  if (!(a < b) || y0 >= R || y1 <= -R) return 0;
  // Break the x range where the circle crosses y = y0 or y = y1; between breaks the integrand
  // min(y1, s) − max(y0, −s), s = √(R² − x²), keeps one closed form.
  const xs = [a, b];
  for (const y of [y0, y1]) {
    if (Math.abs(y) < R) {
      const xb = Math.sqrt(R * R - y * y);
      if (xb > a && xb < b) xs.push(xb);
      if (-xb > a && -xb < b) xs.push(-xb);
    }
  }
  xs.sort((p, q) => p - q);
  let area = 0;
  for (let k = 0; k + 1 < xs.length; k++) {
    const u = xs[k];
    const v = xs[k + 1];
    if (!(v > u)) continue;
    const m = 0.5 * (u + v);
    const sm = Math.sqrt(Math.max(0, R * R - m * m));
    // |y| ≥ R: that edge never cuts the circle (at y = ±R it only touches, possibly at the midpoint).
    const upperIsCircle = y1 >= R || sm < y1;
    const lowerIsCircle = y0 <= -R || -sm > y0;
    if (Math.min(y1, sm) <= Math.max(y0, -sm)) continue;
    const sInt = chordIntegral(R, v) - chordIntegral(R, u);
    const upper = upperIsCircle ? sInt : y1 * (v - u);
    const lower = lowerIsCircle ? -sInt : y0 * (v - u);
    area += upper - lower;
  }
  return area;
}

export interface DiscKernel {
  /** Row-major (2·halfWidthPx + 1)² weights, centre at index halfWidthPx·(size + 1); sums to 1. */
  weights: Float64Array;
  halfWidthPx: number;
  sizePx: number;
}

/** Area-weighted disc kernel of the given diameter in pixels (exact pixel/disc overlap areas, unit sum). */
export function discKernel(diameterPx: number): DiscKernel {
  checkDiameter(diameterPx);
  const hw = blurMarginPx(diameterPx);
  const size = 2 * hw + 1;
  const weights = new Float64Array(size * size);
  if (hw === 0) {
    weights[0] = 1;
    return { weights, halfWidthPx: 0, sizePx: 1 };
  }
  const R = diameterPx / 2;
  let sum = 0;
  for (let i = -hw; i <= hw; i++) {
    for (let j = -hw; j <= hw; j++) {
      const w = discRectOverlap(R, j - 0.5, j + 0.5, i - 0.5, i + 0.5);
      weights[(i + hw) * size + (j + hw)] = w;
      sum += w;
    }
  }
  // sum equals πR² up to round-off; dividing by it makes the weights sum to 1 exactly.
  for (let k = 0; k < weights.length; k++) weights[k] /= sum;
  return { weights, halfWidthPx: hw, sizePx: size };
}

function nextPow2(n: number): number {
  let p = 2;
  while (p < n) p *= 2;
  return p;
}

function convolveDirect(image: Float64Array, w: number, h: number, k: DiscKernel): Float64Array {
  const { weights, halfWidthPx: hw, sizePx: size } = k;
  const out = new Float64Array(w * h);
  for (let r = 0; r < h; r++) {
    for (let c = 0; c < w; c++) {
      let acc = 0;
      for (let i = -hw; i <= hw; i++) {
        const rr = r - i;
        if (rr < 0 || rr >= h) continue;
        const kRow = (i + hw) * size + hw;
        const iRow = rr * w + c;
        for (let j = -hw; j <= hw; j++) {
          const cc = c - j;
          if (cc < 0 || cc >= w) continue;
          acc += weights[kRow + j] * image[iRow - j];
        }
      }
      out[r * w + c] = acc;
    }
  }
  return out;
}

/** In-place 2-D DFT of an interleaved complex ny × nx array (forward or inverse), touching only `rows` in the row pass. */
function fft2d(a: Float64Array, nx: number, ny: number, fx: FFT, fy: FFT, inverse: boolean, rows: number[]): void {
  const bufX = new Float64Array(2 * nx);
  const colIn = new Float64Array(2 * ny);
  const colOut = new Float64Array(2 * ny);
  const rowPass = () => {
    for (const r of rows) {
      const row = a.subarray(2 * nx * r, 2 * nx * (r + 1));
      if (inverse) fx.inverseTransform(bufX, row);
      else fx.transform(bufX, row);
      row.set(bufX);
    }
  };
  const colPass = () => {
    for (let c = 0; c < nx; c++) {
      for (let r = 0; r < ny; r++) {
        colIn[2 * r] = a[2 * (r * nx + c)];
        colIn[2 * r + 1] = a[2 * (r * nx + c) + 1];
      }
      if (inverse) fy.inverseTransform(colOut, colIn);
      else fy.transform(colOut, colIn);
      for (let r = 0; r < ny; r++) {
        a[2 * (r * nx + c)] = colOut[2 * r];
        a[2 * (r * nx + c) + 1] = colOut[2 * r + 1];
      }
    }
  };
  // Forward: rows (only the non-zero ones) then all columns; inverse: all columns then the wanted rows.
  if (inverse) {
    colPass();
    rowPass();
  } else {
    rowPass();
    colPass();
  }
}

function convolveFft(image: Float64Array, w: number, h: number, k: DiscKernel): Float64Array {
  const { weights, halfWidthPx: hw, sizePx: size } = k;
  // Circular convolution of size N equals the zero-padded one on the frame when N ≥ frame + hw.
  const nx = nextPow2(w + hw);
  const ny = nextPow2(h + hw);
  const fx = new FFT(nx);
  const fy = new FFT(ny);

  // Both inputs are real: transform z = image + i·kernel once and split the spectra by symmetry,
  // X(u) = (Z(u) + Z*(−u))/2, K(u) = (Z(u) − Z*(−u))/(2i).
  // The kernel is scaled to the image's L2 norm so that round-off in the shared transform is
  // relative to each part alike; the scale is divided out at the end.
  let imgNorm2 = 0;
  for (let q = 0; q < image.length; q++) imgNorm2 += image[q] * image[q];
  let kerNorm2 = 0;
  for (let q = 0; q < weights.length; q++) kerNorm2 += weights[q] * weights[q];
  if (imgNorm2 === 0) return new Float64Array(w * h);
  const scale = Math.sqrt(imgNorm2 / kerNorm2);
  const z = new Float64Array(2 * nx * ny);
  for (let r = 0; r < h; r++) for (let c = 0; c < w; c++) z[2 * (r * nx + c)] = image[r * w + c];
  const rows = new Set<number>();
  for (let r = 0; r < h; r++) rows.add(r);
  for (let i = -hw; i <= hw; i++) {
    const r = (i + ny) % ny;
    rows.add(r);
    for (let j = -hw; j <= hw; j++) {
      const c = (j + nx) % nx;
      z[2 * (r * nx + c) + 1] = scale * weights[(i + hw) * size + (j + hw)];
    }
  }
  fft2d(z, nx, ny, fx, fy, false, [...rows]);
  const p = new Float64Array(2 * nx * ny);
  for (let u = 0; u < ny; u++) {
    const un = (ny - u) % ny;
    for (let v = 0; v < nx; v++) {
      const q = 2 * (u * nx + v);
      const qn = 2 * (un * nx + ((nx - v) % nx));
      const a = z[q];
      const b = z[q + 1];
      const c = z[qn];
      const d = z[qn + 1];
      const xr = 0.5 * (a + c);
      const xi = 0.5 * (b - d);
      const kr = 0.5 * (b + d);
      const ki = -0.5 * (a - c);
      p[q] = xr * kr - xi * ki;
      p[q + 1] = xr * ki + xi * kr;
    }
  }
  const imgRows = Array.from({ length: h }, (_, r) => r);
  fft2d(p, nx, ny, fx, fy, true, imgRows);
  const out = new Float64Array(w * h);
  const inv = 1 / scale;
  for (let r = 0; r < h; r++) for (let c = 0; c < w; c++) out[r * w + c] = inv * p[2 * (r * nx + c)];
  return out;
}

/**
 * Convolve a row-major frame with the area-weighted disc of `diameterPx` (unit sum). Same-size output,
 * zero outside the frame. Diameter 0 (or ≤ 1 px, see above) returns a copy.
 * `method` forces the direct or FFT path (for testing); by default the cheaper one is chosen.
 */
export function convolveWithDisc(
  image: Float64Array,
  widthPx: number,
  heightPx: number,
  diameterPx: number,
  method: 'auto' | 'direct' | 'fft' = 'auto',
): Float64Array {
  if (!Number.isInteger(widthPx) || !Number.isInteger(heightPx) || widthPx < 1 || heightPx < 1) {
    throw new RangeError(`convolveWithDisc: invalid size ${widthPx} × ${heightPx}`);
  }
  if (image.length !== widthPx * heightPx) {
    throw new RangeError(`convolveWithDisc: ${image.length} values for a ${widthPx} × ${heightPx} frame`);
  }
  checkDiameter(diameterPx);
  for (let q = 0; q < image.length; q++) {
    if (!Number.isFinite(image[q])) throw new RangeError(`convolveWithDisc: value at index ${q} is not finite`);
  }
  const k = discKernel(diameterPx);
  if (k.halfWidthPx === 0) return Float64Array.from(image);
  let useFft = method === 'fft';
  if (method === 'auto') {
    // Rough operation counts; the FFT path makes two complex 2-D transforms.
    const direct = widthPx * heightPx * k.sizePx * k.sizePx;
    const nx = nextPow2(widthPx + k.halfWidthPx);
    const ny = nextPow2(heightPx + k.halfWidthPx);
    const fft = 8 * nx * ny * Math.log2(nx * ny);
    useFft = fft < direct;
  }
  return useFft ? convolveFft(image, widthPx, heightPx, k) : convolveDirect(image, widthPx, heightPx, k);
}
