/**
 * Centre of point symmetry of a frame. For even-order aberrations (defocus, astigmatism) the shadow pattern
 * is symmetric under a 180° turn about its centre c, so the self-convolution (I∗I)(s) = Σ_x I(x)·I(s − x)
 * peaks at s = 2c. Robust where a strongly astigmatic spot splits into lobes and a spot finder fails.
 * Computed with FFTs (fft.js) on a 2×2-binned, mean-subtracted copy of the frame.
 */
import FFT from 'fft.js';

export function symmetryCentrePx(counts: Float64Array, widthPx: number, heightPx: number, mask: Uint8Array | null): [number, number] | null {
  const b = Math.max(1, Math.floor(Math.max(widthPx, heightPx) / 128));
  const w = Math.floor(widthPx / b);
  const h = Math.floor(heightPx / b);
  const img = new Float64Array(w * h);
  let sum = 0;
  let n = 0;
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      let s = 0;
      let m = 0;
      for (let yy = y * b; yy < y * b + b; yy++) {
        for (let xx = x * b; xx < x * b + b; xx++) {
          const k = yy * widthPx + xx;
          if (mask && mask[k]) continue;
          s += counts[k];
          m++;
        }
      }
      img[y * w + x] = m ? s / m : NaN;
      if (m) {
        sum += s / m;
        n++;
      }
    }
  }
  if (!n) return null;
  const mean = sum / n;
  let size = 1;
  while (size < 2 * Math.max(w, h)) size *= 2;
  const fft = new FFT(size);
  // 2-D FFT: rows then columns on interleaved complex arrays.
  const grid: Float64Array[] = [];
  for (let y = 0; y < size; y++) {
    const row = fft.createComplexArray() as number[];
    if (y < h) for (let x = 0; x < w; x++) row[2 * x] = Number.isFinite(img[y * w + x]) ? img[y * w + x] - mean : 0;
    const out = fft.createComplexArray() as number[];
    fft.transform(out, row);
    grid.push(Float64Array.from(out));
  }
  const col = fft.createComplexArray() as number[];
  const colOut = fft.createComplexArray() as number[];
  for (let x = 0; x < size; x++) {
    for (let y = 0; y < size; y++) {
      col[2 * y] = grid[y][2 * x];
      col[2 * y + 1] = grid[y][2 * x + 1];
    }
    fft.transform(colOut, col);
    // square (convolution theorem), then inverse along columns
    for (let y = 0; y < size; y++) {
      const re = colOut[2 * y], im = colOut[2 * y + 1];
      col[2 * y] = re * re - im * im;
      col[2 * y + 1] = 2 * re * im;
    }
    fft.inverseTransform(colOut, col);
    for (let y = 0; y < size; y++) {
      grid[y][2 * x] = colOut[2 * y];
      grid[y][2 * x + 1] = colOut[2 * y + 1];
    }
  }
  let best = -Infinity;
  let bx = 0;
  let by = 0;
  const conv = new Float64Array(size * size);
  const rowOut = fft.createComplexArray() as number[];
  for (let y = 0; y < size; y++) {
    fft.inverseTransform(rowOut, Array.from(grid[y]));
    for (let x = 0; x < size; x++) {
      const v = rowOut[2 * x];
      conv[y * size + x] = v;
      // s = 2c must lie inside the doubled frame
      if (x < 2 * w - 1 && y < 2 * h - 1 && v > best) {
        best = v;
        bx = x;
        by = y;
      }
    }
  }
  const at = (x: number, y: number) => conv[Math.min(size - 1, Math.max(0, y)) * size + Math.min(size - 1, Math.max(0, x))];
  const sub = (m: number, c: number, p: number) => {
    const d = m - 2 * c + p;
    return d < 0 ? (0.5 * (m - p)) / d : 0;
  };
  const sx = bx + sub(at(bx - 1, by), at(bx, by), at(bx + 1, by));
  const sy = by + sub(at(bx, by - 1), at(bx, by), at(bx, by + 1));
  // binned index i covers pixels i·b … i·b + b − 1, centre i·b + (b − 1)/2; s = 2c in binned units
  return [(sx / 2) * b + (b - 1) / 2, (sy / 2) * b + (b - 1) / 2];
}
