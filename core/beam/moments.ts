/**
 * Second-moment beam widths of a beam frame (laser beam recorded directly on the camera, disc removed),
 * following ISO 11146-1:2021 ("Lasers and laser-related equipment — Test methods for laser beam widths,
 * divergence angles and beam propagation ratios — Part 1: Stigmatic and simple astigmatic beams") for the
 * moments and widths, and ISO/TR 11146-3 (Part 3: "Intrinsic and geometrical laser beam classification,
 * propagation and details of test methods") for the background (baseline offset) treatment.
 *
 * Definitions (ISO 11146-1, section 3 and 5), with E(x, y) the background-corrected counts:
 *   first moments   x̄ = ΣE·x / ΣE,  ȳ = ΣE·y / ΣE
 *   second moments  σx² = ΣE·(x − x̄)² / ΣE,  σy² = ΣE·(y − ȳ)² / ΣE,  σxy = ΣE·(x − x̄)(y − ȳ) / ΣE
 *   widths          dσx = 2√2·{σx² + σy² + γ·[(σx² − σy²)² + 4σxy²]^½}^½
 *                   dσy = 2√2·{σx² + σy² − γ·[(σx² − σy²)² + 4σxy²]^½}^½,   γ = sgn(σx² − σy²)
 *   azimuth         φ = ½·arctan(2σxy / (σx² − σy²)), the angle between the x axis and the principal
 *                   axis of dσx (the principal axis closer to x); φ = sgn(σxy)·π/4 when σx² = σy²
 *   generalised diameter dσ = 2√2·(σx² + σy²)^½;  ellipticity ε = min(dσx, dσy) / max(dσx, dσy)
 * For a Gaussian beam exp(−2r²/w²) the second-moment width equals the 1/e² diameter: dσ = 2w (the
 * "D4σ" width, four standard deviations of the intensity distribution).
 *
 * Integration area (ISO 11146-1, section 5): a rectangle centred on the centroid, aligned with the
 * principal axes, three times the widths dσx × dσy, found iteratively: start from an estimate, compute
 * the moments inside the area, recompute the area from them, until the values settle.
 * Background (ISO/TR 11146-3, baseline offset correction): after any dark-frame subtraction, the
 * remaining offset is the mean of the pixels outside the integration area; it is subtracted (negative
 * values are kept, so that the noise averages out) and re-estimated at every step.
 *
 * Axes: moments are computed in the lab frame of the physics notes (x right = +column, y up = −row),
 * so σxy and φ follow the lab convention (φ counter-clockwise from +x). Pure.
 */

export interface BeamMomentsOptions {
  /**
   * 'iterative' (default): the ISO 11146 area of three times the widths, recomputed until it settles.
   * 'whole frame': one pass over every pixel with the border background (for comparison only; biased by
   * noise and by any error in the background).
   */
  integration?: 'iterative' | 'whole frame';
  /** Pixels to ignore (1 = excluded, e.g. hot pixels): replaced by the median of their neighbours. */
  exclude?: Uint8Array | null;
  /** Background already removed (e.g. dark frames subtracted): start the baseline estimate from 0. */
  darkSubtracted?: boolean;
  /** Iteration limit (default 100). */
  maxIterations?: number;
}

export interface IntegrationArea {
  /** Centre [column, row]. */
  centerPx: [number, number];
  /** Half-sides along the principal axes (of dσx, then of dσy), pixels: 1.5·dσx and 1.5·dσy. */
  halfSidesPx: [number, number];
  /** Lab-frame angle of the first side (= the azimuth φ), radians. */
  angleRad: number;
  /** Pixels inside the area. */
  pixels: number;
  /** True when the whole rectangle lies inside the frame. */
  insideFrame: boolean;
}

export interface BeamMoments {
  widthPx: number;
  heightPx: number;
  /** Centroid [column, row] (pixel centres at integers). */
  centroidPx: [number, number];
  /** Centroid relative to the frame centre in the lab frame: [x right, y up], pixels. */
  centroidFromCenterPx: [number, number];
  /** Second moments in the lab frame, px². */
  sigmaX2Px2: number;
  sigmaY2Px2: number;
  sigmaXYPx2: number;
  /** ISO 11146-1 widths along the principal axes: dσx (the axis closer to x) and dσy, pixels. */
  dSigmaXPx: number;
  dSigmaYPx: number;
  /** ISO 11146-1 azimuth φ ∈ [−π/4, π/4]: from +x (lab, counter-clockwise) to the principal axis of dσx. */
  azimuthRad: number;
  /** The larger and smaller principal widths, and the angle of the larger one, ½·atan2(2σxy, σx² − σy²) ∈ (−π/2, π/2]. */
  majorWidthPx: number;
  minorWidthPx: number;
  majorAxisAngleRad: number;
  /** Generalised beam diameter dσ = 2√2·(σx² + σy²)^½, pixels. */
  generalisedDiameterPx: number;
  /** min(dσx, dσy) / max(dσx, dσy). */
  ellipticity: number;
  /** Baseline offset subtracted, counts per pixel. */
  backgroundCounts: number;
  backgroundMethod: string;
  /** Sum of the background-corrected counts inside the integration area. */
  totalCounts: number;
  integrationArea: IntegrationArea;
  integration: 'iterative' | 'whole frame';
  iterations: number;
  converged: boolean;
  warnings: string[];
}

interface Moments {
  sum: number;
  xc: number;
  yc: number;
  sxx: number;
  syy: number;
  sxy: number;
}

function median(values: number[]): number {
  const a = values.slice().sort((p, q) => p - q);
  const n = a.length;
  if (n === 0) return NaN;
  return n & 1 ? a[n >> 1] : 0.5 * (a[(n >> 1) - 1] + a[n >> 1]);
}

/** Moments (lab axes: x = column, y = −row) of image − bg over the pixels where `inside` is true. */
function momentsOf(img: Float64Array, W: number, H: number, bg: number, inside: (c: number, r: number) => boolean, box: [number, number, number, number]): Moments | null {
  const [c0, c1, r0, r1] = box;
  let s = 0;
  let sx = 0;
  let sy = 0;
  for (let r = r0; r <= r1; r++) {
    for (let c = c0; c <= c1; c++) {
      if (!inside(c, r)) continue;
      const e = img[r * W + c] - bg;
      s += e;
      sx += e * c;
      sy += e * -r;
    }
  }
  if (!(s > 0)) return null;
  const xc = sx / s;
  const yc = sy / s;
  let sxx = 0;
  let syy = 0;
  let sxy = 0;
  for (let r = r0; r <= r1; r++) {
    for (let c = c0; c <= c1; c++) {
      if (!inside(c, r)) continue;
      const e = img[r * W + c] - bg;
      const dx = c - xc;
      const dy = -r - yc;
      sxx += e * dx * dx;
      syy += e * dy * dy;
      sxy += e * dx * dy;
    }
  }
  void H;
  return { sum: s, xc, yc, sxx: sxx / s, syy: syy / s, sxy: sxy / s };
}

/** ISO 11146-1 widths and azimuth from second moments. */
export function isoWidths(sx2: number, sy2: number, sxy: number): { dSigmaX: number; dSigmaY: number; azimuthRad: number } {
  const diff = sx2 - sy2;
  const root = Math.sqrt(diff * diff + 4 * sxy * sxy);
  if (diff === 0) {
    // ISO 11146-1: for σx² = σy², φ = sgn(σxy)·π/4 and dσx lies along φ.
    const phi = sxy === 0 ? 0 : (Math.sign(sxy) * Math.PI) / 4;
    const dx = 2 * Math.SQRT2 * Math.sqrt(Math.max(0, sx2 + sy2 + 2 * Math.abs(sxy)));
    const dy = 2 * Math.SQRT2 * Math.sqrt(Math.max(0, sx2 + sy2 - 2 * Math.abs(sxy)));
    return { dSigmaX: dx, dSigmaY: dy, azimuthRad: phi };
  }
  const gamma = Math.sign(diff);
  const dSigmaX = 2 * Math.SQRT2 * Math.sqrt(Math.max(0, sx2 + sy2 + gamma * root));
  const dSigmaY = 2 * Math.SQRT2 * Math.sqrt(Math.max(0, sx2 + sy2 - gamma * root));
  const azimuthRad = 0.5 * Math.atan(2 * sxy / diff);
  return { dSigmaX, dSigmaY, azimuthRad };
}

/** Replace excluded pixels by the median of their usable neighbours (3 × 3, then 5 × 5). */
function patch(img: Float64Array, W: number, H: number, exclude: Uint8Array): Float64Array {
  const out = img.slice();
  for (let i = 0; i < img.length; i++) {
    if (!exclude[i]) continue;
    const r = Math.floor(i / W);
    const c = i - r * W;
    for (const h of [1, 2, 4]) {
      const vals: number[] = [];
      for (let rr = Math.max(0, r - h); rr <= Math.min(H - 1, r + h); rr++) {
        for (let cc = Math.max(0, c - h); cc <= Math.min(W - 1, c + h); cc++) {
          if (!exclude[rr * W + cc]) vals.push(img[rr * W + cc]);
        }
      }
      if (vals.length >= 3) {
        out[i] = median(vals);
        break;
      }
    }
  }
  return out;
}

/** Median of the frame border strip (5 % of the smaller side, at least 2 px). */
function borderMedian(img: Float64Array, W: number, H: number): number {
  const bw = Math.max(2, Math.round(0.05 * Math.min(W, H)));
  const vals: number[] = [];
  for (let r = 0; r < H; r++) {
    for (let c = 0; c < W; c++) {
      if (r < bw || r >= H - bw || c < bw || c >= W - bw) vals.push(img[r * W + c]);
    }
  }
  return median(vals);
}

/**
 * ISO 11146 second-moment analysis of a beam frame (counts, row-major, lab frame: row 0 on top).
 * Throws RangeError when the frame holds no beam above the background.
 */
export function beamMoments(counts: Float64Array, widthPx: number, heightPx: number, options: BeamMomentsOptions = {}): BeamMoments {
  const W = widthPx;
  const H = heightPx;
  if (counts.length !== W * H || W < 3 || H < 3) throw new RangeError(`beamMoments: ${counts.length} values for a ${W} × ${H} px frame`);
  const integration = options.integration ?? 'iterative';
  const maxIterations = options.maxIterations ?? 100;
  const warnings: string[] = [];
  const img = options.exclude ? patch(counts, W, H, options.exclude) : counts;
  const full: [number, number, number, number] = [0, W - 1, 0, H - 1];

  let bg = options.darkSubtracted ? 0 : borderMedian(img, W, H);
  let backgroundMethod = options.darkSubtracted ? 'dark frames subtracted' : 'median of the frame border';

  const finish = (m: Moments, area: IntegrationArea, iterations: number, converged: boolean): BeamMoments => {
    const { dSigmaX, dSigmaY, azimuthRad } = isoWidths(m.sxx, m.syy, m.sxy);
    const major = Math.max(dSigmaX, dSigmaY);
    const minor = Math.min(dSigmaX, dSigmaY);
    const centroidPx: [number, number] = [m.xc, -m.yc];
    return {
      widthPx: W,
      heightPx: H,
      centroidPx,
      centroidFromCenterPx: [m.xc - (W - 1) / 2, m.yc + (H - 1) / 2],
      sigmaX2Px2: m.sxx,
      sigmaY2Px2: m.syy,
      sigmaXYPx2: m.sxy,
      dSigmaXPx: dSigmaX,
      dSigmaYPx: dSigmaY,
      azimuthRad,
      majorWidthPx: major,
      minorWidthPx: minor,
      majorAxisAngleRad: 0.5 * Math.atan2(2 * m.sxy, m.sxx - m.syy),
      generalisedDiameterPx: 2 * Math.SQRT2 * Math.sqrt(Math.max(0, m.sxx + m.syy)),
      ellipticity: major > 0 ? minor / major : NaN,
      backgroundCounts: bg,
      backgroundMethod,
      totalCounts: m.sum,
      integrationArea: area,
      integration,
      iterations,
      converged,
      warnings,
    };
  };

  if (integration === 'whole frame') {
    const m = momentsOf(img, W, H, bg, () => true, full);
    if (!m || !(m.sxx > 0) || !(m.syy > 0)) throw new RangeError('no beam found above the background of the frame');
    return finish(m, { centerPx: [(W - 1) / 2, (H - 1) / 2], halfSidesPx: [W / 2, H / 2], angleRad: 0, pixels: W * H, insideFrame: true }, 1, true);
  }

  // Start: moments of the pixels clearly above the background (above 10 % of the peak), which keeps the
  // first estimate free of the noise far from the beam; the ISO area then takes over.
  let peak = -Infinity;
  for (let r = 1; r < H - 1; r++) {
    for (let c = 1; c < W - 1; c++) {
      let s = 0;
      for (let dr = -1; dr <= 1; dr++) for (let dc = -1; dc <= 1; dc++) s += img[(r + dr) * W + c + dc];
      peak = Math.max(peak, s / 9 - bg);
    }
  }
  if (!(peak > 0)) throw new RangeError('no beam found above the background of the frame');
  const thr = bg + 0.1 * peak;
  let m = momentsOf(img, W, H, bg, (c, r) => img[r * W + c] > thr, full);
  if (!m || !(m.sxx > 0) || !(m.syy > 0)) throw new RangeError('no beam found above the background of the frame');

  let area: IntegrationArea = { centerPx: [m.xc, -m.yc], halfSidesPx: [W / 2, H / 2], angleRad: 0, pixels: W * H, insideFrame: true };
  let iterations = 0;
  let converged = false;
  let warnedOutside = false;
  for (; iterations < maxIterations; iterations++) {
    const w = isoWidths(m.sxx, m.syy, m.sxy);
    const hx = 1.5 * w.dSigmaX;
    const hy = 1.5 * w.dSigmaY;
    const cphi = Math.cos(w.azimuthRad);
    const sphi = Math.sin(w.azimuthRad);
    const xc = m.xc;
    const yc = m.yc;
    // Point (c, r) → lab (c, −r); coordinates along the principal axes u (of dσx) and v.
    const inside = (c: number, r: number) => {
      const dx = c - xc;
      const dy = -r - yc;
      const u = dx * cphi + dy * sphi;
      const v = -dx * sphi + dy * cphi;
      return Math.abs(u) <= hx && Math.abs(v) <= hy;
    };
    const ext = Math.abs(hx * cphi) + Math.abs(hy * sphi);
    const eyt = Math.abs(hx * sphi) + Math.abs(hy * cphi);
    const box: [number, number, number, number] = [
      Math.max(0, Math.floor(xc - ext)),
      Math.min(W - 1, Math.ceil(xc + ext)),
      Math.max(0, Math.floor(-yc - eyt)),
      Math.min(H - 1, Math.ceil(-yc + eyt)),
    ];
    const insideFrame = xc - ext >= -0.5 && xc + ext <= W - 0.5 && -yc - eyt >= -0.5 && -yc + eyt <= H - 0.5;
    let pixels = 0;
    let outSum = 0;
    let outN = 0;
    for (let r = 0; r < H; r++) {
      for (let c = 0; c < W; c++) {
        if (inside(c, r)) pixels++;
        else {
          outSum += img[r * W + c];
          outN++;
        }
      }
    }
    area = { centerPx: [xc, -yc], halfSidesPx: [hx, hy], angleRad: w.azimuthRad, pixels, insideFrame };
    if (!insideFrame && !warnedOutside) {
      warnings.push('the ISO 11146 integration area (three times the beam widths) does not fit in the frame: the widths are underestimated; use a larger sensor or a smaller beam');
      warnedOutside = true;
    }
    // Baseline offset from outside the area (ISO/TR 11146-3), when enough pixels are left there.
    const prevBg = bg;
    if (outN >= Math.max(100, 0.05 * W * H)) {
      bg = outSum / outN;
      backgroundMethod = options.darkSubtracted
        ? 'dark frames subtracted, then the mean outside the integration area (residual baseline)'
        : 'mean of the pixels outside the integration area';
    } else if (iterations === 0) {
      warnings.push('too few pixels lie outside the integration area to estimate the background there: the frame border median is used');
    }
    const next = momentsOf(img, W, H, bg, inside, box);
    if (!next || !(next.sxx > 0) || !(next.syy > 0)) throw new RangeError('the beam moments did not stay positive: the frame holds no clear beam above its background');
    const dw = isoWidths(next.sxx, next.syy, next.sxy);
    // Settled: the centroid moves less than 0.01 px, the widths change by less than 1e-4 of themselves and
    // the background by less than 0.01 counts (the area can flip single pixels back and forth forever).
    const change =
      Math.hypot(next.xc - m.xc, next.yc - m.yc) < 0.01 &&
      Math.abs(dw.dSigmaX - w.dSigmaX) < 1e-4 * w.dSigmaX &&
      Math.abs(dw.dSigmaY - w.dSigmaY) < 1e-4 * w.dSigmaY &&
      Math.abs(bg - prevBg) < 0.01;
    m = next;
    if (change) {
      converged = true;
      iterations++;
      break;
    }
  }
  if (!converged) warnings.push(`the integration area did not settle within ${maxIterations} iterations`);
  return finish(m, area, iterations, converged);
}
