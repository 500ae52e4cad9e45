/**
 * Finding the centre of the shadow pattern in a prepared frame, and the size and position of the
 * expected features for a setup.
 *
 * Two independent cues (physics notes, section 2):
 * 1. The disc's shadow: a dark disc of radius a·M on the camera, surrounded by the brighter beam. On an
 *    image smoothed enough to wash out the rings, its edge is a circle of strong gradient pointing
 *    outward. A gradient-directed Hough vote (every edge pixel votes for centres lying toward the
 *    darker side at distances around the expected radius) gives a first centre; edge points found
 *    along rays from it (the steepest rise of the smoothed profile) are fitted by a circle (algebraic
 *    least squares, Kåsa 1976, with outliers rejected by their median absolute deviation).
 * 2. The Arago spot: at the centre of the shadow, I(r) ≈ I₀·J₀²(2.405·r/r₀) with r₀ the radius of the
 *    first dark ring. A matched filter (normalised cross-correlation with that J₀² profile out to
 *    2·r₀) finds it to a fraction of a pixel; the spot is accepted only when its azimuthal profile
 *    really shows a bright core, a dark ring at r₀ and a brighter ring beyond.
 * The spot, when found, gives the centre (it marks the axis); the shadow gives the search area and
 * the shadow radius. Without a usable shadow edge in the frame, the spot alone is used.
 *
 * Coordinates: `centerPx` is [column, row] in the prepared (lab-frame) image, with (0, 0) the centre
 * of the top-left pixel. Pure.
 */
import { benchFigures, effectiveDistanceM, magnification } from '../optics/geometry.ts';
import type { BenchSetup } from '../setup/types.ts';
import { FrameError } from './errors.ts';
import { bilinear, binImage, madSigma, median, smoothMasked, unmaskedValues } from './imageOps.ts';
import type { PreparedFrame } from './prepare.ts';

/** Sizes of the expected pattern on the camera, in pixels of the prepared frame. */
export interface ExpectedPattern {
  /** Radius of the geometric shadow, a·M / pixel pitch. */
  shadowRadiusPx: number;
  /** Radius of the first dark ring around the Arago spot, 2.405·L/(k·a) / pixel pitch. */
  spotRadiusPx: number;
  /** Scale of the Fresnel fringes at the shadow edge on the camera, M·√(λL'/2) / pixel pitch. */
  edgeFringeScalePx: number;
}

/** Expected pattern sizes for a setup (physics notes, sections 1–2; core/optics/geometry.ts). */
export function expectedPattern(setup: BenchSetup): ExpectedPattern {
  const f = benchFigures(setup);
  const pitch = setup.camera.pixelPitchM;
  const lp = effectiveDistanceM(setup.camera.distanceM, setup.beam.curvatureRadiusM);
  const m = magnification(setup.camera.distanceM, setup.beam.curvatureRadiusM);
  return {
    shadowRadiusPx: f.shadowDiameterM / 2 / pitch,
    spotRadiusPx: f.firstDarkRingRadiusM / pitch,
    edgeFringeScalePx: (m * Math.sqrt((setup.wavelengthM * lp) / 2)) / pitch,
  };
}

export interface LocatedPattern {
  /** Pattern centre [column, row] in the prepared frame (pixel centres at integers). */
  centerPx: [number, number];
  /**
   * Radius of the geometric shadow edge from the circle fit, or null when no edge was used: the radius
   * of steepest rise (`shadowEdgeRisePx`) less V_STEEPEST_EDGE edge-fringe scales when
   * `expected.edgeFringeScalePx` was given, else the radius of steepest rise itself.
   */
  shadowRadiusPx: number | null;
  /** Radius where the smoothed edge profile rises most steeply (circle fit), or null. */
  shadowEdgeRisePx: number | null;
  /** 0…1, a heuristic score of how clearly the cues were seen (not a probability). */
  confidence: number;
  /** Which cues gave the centre, in words. */
  method: string;
  shadowCenterPx: [number, number] | null;
  spotCenterPx: [number, number] | null;
  /** Normalised cross-correlation of the spot with the J₀² template (−1…1), or null. */
  spotScore: number | null;
  /** Remarks in plain words, without the file name (prefix `prepared.label` when showing them). */
  warnings: string[];
}

interface ShadowFit {
  center: [number, number];
  radius: number;
  quality: number;
  rays: number;
}

/**
 * Where a straight edge's Fresnel pattern I(v) = ½[(C(v) + ½)² + (S(v) + ½)²] rises most steeply, in the
 * Fresnel-integral variable v (v = 0 at the geometric edge, v > 0 in the light): v = 0.737, computed
 * from the Fresnel integrals (test/frames/region.test.ts checks it with @stdlib's Fresnel integrals).
 */
export const V_STEEPEST_EDGE = 0.737;

/** Fraction of saturated pixels in the spot core above which the frame is refused (common practice, no published source). */
export const MAX_SATURATED_SPOT_FRACTION = 0.25;

/**
 * Locate the pattern centre. `expected` gives the sizes to look for (see expectedPattern); a shadow
 * radius within about a factor of two and a spot radius within about 30 % of the truth are enough.
 * @throws FrameError 'no disc shadow' when neither a shadow nor a spot is seen, 'mostly saturated' when
 *   the spot core is saturated.
 */
export function locatePattern(
  prepared: PreparedFrame,
  expected: { shadowRadiusPx: number; spotRadiusPx: number; edgeFringeScalePx?: number },
): LocatedPattern {
  const { widthPx: W, heightPx: H } = prepared;
  const R = expected.shadowRadiusPx;
  const r0 = expected.spotRadiusPx;
  if (!(R > 0 && Number.isFinite(R)) || !(r0 > 0 && Number.isFinite(r0))) {
    throw new RangeError(`locatePattern: expected radii must be positive (shadow ${R} px, spot ${r0} px)`);
  }
  const warnings: string[] = [];
  const f = new Float64Array(prepared.counts.length);
  for (let i = 0; i < f.length; i++) f[i] = prepared.counts[i] - prepared.backgroundCounts;
  const mask = prepared.mask;

  // 1. The shadow edge, when some of it can be in the frame.
  let shadow: ShadowFit | null = null;
  if (R < 0.5 * Math.hypot(W, H)) {
    shadow = findShadow(f, W, H, mask, R, r0);
    if (!shadow) warnings.push(`the shadow edge (expected radius ${R.toFixed(0)} px) was not found; the centre rests on the Arago spot`);
  }

  // 2. The Arago spot, near the shadow centre when there is one, else anywhere.
  const search = shadow ? { center: shadow.center, radius: Math.max(4, 0.15 * shadow.radius) } : null;
  const spot = findSpot(f, W, H, mask, r0, search);

  let centerPx: [number, number];
  let method: string;
  let confidence: number;
  if (spot && shadow) {
    centerPx = spot.center;
    method = 'Arago spot (matched filter) inside the shadow found by a circle fit to its edge';
    confidence = 1 - (1 - spot.score) * (1 - shadow.quality);
  } else if (shadow) {
    centerPx = shadow.center;
    method = 'circle fit to the shadow edge (no clear Arago spot)';
    confidence = 0.8 * shadow.quality;
    warnings.push('no clear Arago spot near the shadow centre; the centre comes from the shadow edge alone');
  } else if (spot) {
    centerPx = spot.center;
    method = R < 0.5 * Math.hypot(W, H) ? 'Arago spot (matched filter); the shadow edge was not found' : 'Arago spot (matched filter); the shadow edge is outside the frame';
    confidence = 0.9 * spot.score;
  } else {
    throw new FrameError(
      'no disc shadow',
      prepared.label,
      `no disc shadow found in ${prepared.label}: neither a dark disc surrounded by brighter light (expected radius ${R.toFixed(0)} px) nor a bright central spot with a dark ring (expected first dark ring at ${r0.toFixed(1)} px). ` +
        'Check that the disc sits in the beam and that its shadow falls on the camera, and check disc.diameter, camera.distance and camera.pixelPitch in the setup',
    );
  }

  // A saturated spot core carries no information about the wavefront: refuse.
  const core = Math.max(1.5, 0.5 * r0);
  let inCore = 0;
  let satCore = 0;
  for (let r = Math.max(0, Math.floor(centerPx[1] - core)); r <= Math.min(H - 1, Math.ceil(centerPx[1] + core)); r++) {
    for (let c = Math.max(0, Math.floor(centerPx[0] - core)); c <= Math.min(W - 1, Math.ceil(centerPx[0] + core)); c++) {
      if ((c - centerPx[0]) ** 2 + (r - centerPx[1]) ** 2 > core * core) continue;
      inCore++;
      satCore += prepared.saturatedMask[r * W + c];
    }
  }
  if (inCore > 0 && satCore > MAX_SATURATED_SPOT_FRACTION * inCore) {
    throw new FrameError(
      'mostly saturated',
      prepared.label,
      `the Arago spot at column ${centerPx[0].toFixed(1)}, row ${centerPx[1].toFixed(1)} is saturated (${satCore} of its ${inCore} central pixels); attenuate the beam or shorten the exposure`,
    );
  }

  const scale = expected.edgeFringeScalePx;
  const geometric = shadow && scale !== undefined && scale > 0 ? Math.max(0.5 * shadow.radius, shadow.radius - V_STEEPEST_EDGE * scale) : null;
  return {
    centerPx,
    shadowRadiusPx: shadow ? (geometric ?? shadow.radius) : null,
    shadowEdgeRisePx: shadow ? shadow.radius : null,
    confidence: Math.max(0, Math.min(1, confidence)),
    method,
    shadowCenterPx: shadow ? shadow.center : null,
    spotCenterPx: spot ? spot.center : null,
    spotScore: spot ? spot.score : null,
    warnings,
  };
}

// ---------------------------------------------------------------------------------------------------
// The shadow edge.

function findShadow(f: Float64Array, W: number, H: number, mask: Uint8Array, R: number, r0: number): ShadowFit | null {
  // Work on a binned image with the shadow about 40 binned pixels across its radius, smoothed enough to
  // wash out the rings (period ≈ 1.3·r₀) but not the edge.
  const b = Math.max(1, Math.floor(R / 40));
  const binned = binImage(f, W, H, b, mask);
  const bmask = new Uint8Array(binned.data.length);
  for (let i = 0; i < bmask.length; i++) bmask[i] = binned.weight[i] < 0.25 ? 1 : 0;
  const w = binned.widthPx;
  const h = binned.heightPx;
  const sigma = Math.max(0.8, Math.min(0.65 * r0, 0.2 * R) / b);
  const S = smoothMasked(binned.data, w, h, sigma, bmask);
  const Rb = R / b;

  // Gradient (central differences).
  const gx = new Float64Array(w * h);
  const gy = new Float64Array(w * h);
  const g = new Float64Array(w * h);
  for (let r = 1; r < h - 1; r++) {
    for (let c = 1; c < w - 1; c++) {
      const i = r * w + c;
      gx[i] = 0.5 * (S[i + 1] - S[i - 1]);
      gy[i] = 0.5 * (S[i + w] - S[i - w]);
      g[i] = Math.hypot(gx[i], gy[i]);
    }
  }
  const gs = Array.from(g).sort((a, b2) => b2 - a);
  const gTop = gs[Math.min(gs.length - 1, Math.floor(0.005 * gs.length))];
  if (!(gTop > 0)) return null;
  const thr = 0.25 * gTop;

  // Gradient-directed Hough vote for the centre (toward the darker side, at 0.5–1.6 expected radii).
  const acc = new Float64Array(w * h);
  for (let i = 0; i < g.length; i++) {
    if (g[i] < thr) continue;
    const r = Math.floor(i / w);
    const c = i - r * w;
    const dx = -gx[i] / g[i];
    const dy = -gy[i] / g[i];
    for (let t = 0.5 * Rb; t <= 1.6 * Rb; t += 0.5) {
      const x = Math.round(c + dx * t);
      const y = Math.round(r + dy * t);
      if (x < 0 || y < 0 || x >= w || y >= h) break;
      acc[y * w + x] += g[i];
    }
  }
  const accS = smoothMasked(acc, w, h, 1, null);
  let best = 0;
  for (let i = 1; i < accS.length; i++) if (accS[i] > accS[best]) best = i;
  if (!(accS[best] > 0)) return null;
  let center: [number, number] = [best % w, Math.floor(best / w)];
  let radius = Rb;

  // Rays from the centre: the steepest rise of the smoothed profile is the edge; fit a circle.
  let fit: { center: [number, number]; radius: number; rms: number; used: number; spanOk: boolean } | null = null;
  const nRays = 128;
  for (let pass = 0; pass < 3; pass++) {
    const lo = pass === 0 ? 0.5 * Rb : 0.75 * radius;
    const hi = pass === 0 ? 1.6 * Rb : 1.25 * radius;
    const pts: [number, number][] = [];
    const angles: number[] = [];
    for (let k = 0; k < nRays; k++) {
      const th = (2 * Math.PI * k) / nRays;
      const ux = Math.cos(th);
      const uy = Math.sin(th);
      const step = 0.25;
      const prof: number[] = [];
      for (let t = lo; t <= hi; t += step) {
        const v = bilinear(S, w, h, center[0] + ux * t, center[1] + uy * t);
        if (!Number.isFinite(v)) break;
        prof.push(v);
      }
      if (prof.length < 8) continue;
      let kBest = -1;
      let dBest = 0;
      for (let j = 1; j < prof.length - 1; j++) {
        const d = prof[j + 1] - prof[j - 1];
        if (d > dBest) {
          dBest = d;
          kBest = j;
        }
      }
      if (kBest < 2 || kBest > prof.length - 3) continue; // at an end of the ray: no edge inside
      const dm = prof[kBest] - prof[kBest - 2];
      const d0 = prof[kBest + 1] - prof[kBest - 1];
      const dp = prof[kBest + 2] - prof[kBest];
      const den = dm - 2 * d0 + dp;
      const frac = den < 0 ? Math.max(-0.5, Math.min(0.5, (0.5 * (dm - dp)) / den)) : 0;
      const t = lo + (kBest + frac) * step;
      pts.push([center[0] + ux * t, center[1] + uy * t]);
      angles.push(th);
    }
    const c = fitCircleRobust(pts);
    if (!c) return null;
    // The edge must be seen over at least a third of the circle (largest gap below 240°).
    const sorted = angles.slice().sort((a, b2) => a - b2);
    let gap = sorted.length ? 2 * Math.PI - (sorted[sorted.length - 1] - sorted[0]) : 2 * Math.PI;
    for (let k = 1; k < sorted.length; k++) gap = Math.max(gap, sorted[k] - sorted[k - 1]);
    fit = { ...c, spanOk: gap < (4 * Math.PI) / 3 };
    center = c.center;
    radius = c.radius;
  }
  if (!fit || fit.used < 16 || !fit.spanOk) return null;
  if (!(fit.radius > 0.5 * Rb && fit.radius < 1.8 * Rb)) return null;

  // The pattern centre must lie in the frame.
  if (!(center[0] >= 0 && center[1] >= 0 && center[0] <= w - 1 && center[1] <= h - 1)) return null;
  // A disc shadow: darker inside than the ring of light around it, in (nearly) every direction seen.
  const nSec = 12;
  const inSum = new Float64Array(nSec);
  const inN = new Float64Array(nSec);
  const outSum = new Float64Array(nSec);
  const outN = new Float64Array(nSec);
  for (let r = 0; r < h; r++) {
    for (let c2 = 0; c2 < w; c2++) {
      if (bmask[r * w + c2]) continue;
      const dx = c2 - center[0];
      const dy = r - center[1];
      const d = Math.hypot(dx, dy) / radius;
      const sec = Math.min(nSec - 1, Math.floor(((Math.atan2(dy, dx) + Math.PI) / (2 * Math.PI)) * nSec));
      if (d > 0.2 && d < 0.7) {
        inSum[sec] += S[r * w + c2];
        inN[sec]++;
      } else if (d > 1.15 && d < 1.6) {
        outSum[sec] += S[r * w + c2];
        outN[sec]++;
      }
    }
  }
  let seen = 0;
  let dark = 0;
  let inTot = 0;
  let outTot = 0;
  for (let k = 0; k < nSec; k++) {
    if (inN[k] < 3 || outN[k] < 3) continue;
    seen++;
    const ins = inSum[k] / inN[k];
    const outs = outSum[k] / outN[k];
    inTot += ins;
    outTot += outs;
    if (outs > 0 && ins < 0.6 * outs) dark++;
  }
  if (seen < 3 || dark < 0.75 * seen) return null;
  const inside = inTot / seen;
  const outside = outTot / seen;
  const fractionValid = fit.used / nRays;
  const quality = Math.min(1, fractionValid / 0.5) * (1 / (1 + fit.rms)) * Math.min(1, (1 - inside / outside) / 0.5);
  return {
    center: [center[0] * b + (b - 1) / 2, center[1] * b + (b - 1) / 2],
    radius: radius * b,
    quality,
    rays: fit.used,
  };
}

/** Algebraic circle fit (Kåsa) with two rounds of outlier rejection (3 robust standard deviations). */
function fitCircleRobust(pts: [number, number][]): { center: [number, number]; radius: number; rms: number; used: number } | null {
  let use = pts;
  let res: { center: [number, number]; radius: number } | null = null;
  for (let round = 0; round < 3; round++) {
    if (use.length < 5) return null;
    res = fitCircle(use);
    if (!res) return null;
    const c = res.center;
    const rr = res.radius;
    const d = use.map(([x, y]) => Math.hypot(x - c[0], y - c[1]) - rr);
    const s = Math.max(0.25, madSigma(d));
    const m = median(d);
    const keep = use.filter((_, k) => Math.abs(d[k] - m) <= 3 * s);
    if (keep.length === use.length) break;
    use = keep;
  }
  if (!res || use.length < 5) return null;
  const c = res.center;
  let s2 = 0;
  for (const [x, y] of use) s2 += (Math.hypot(x - c[0], y - c[1]) - res.radius) ** 2;
  return { ...res, rms: Math.sqrt(s2 / use.length), used: use.length };
}

/** Least squares for x² + y² + D·x + E·y + F = 0 (Kåsa, IEEE Trans. Instrum. Meas. 25, 8, 1976). */
function fitCircle(pts: [number, number][]): { center: [number, number]; radius: number } | null {
  // Centre the data for conditioning.
  let mx = 0;
  let my = 0;
  for (const [x, y] of pts) {
    mx += x;
    my += y;
  }
  mx /= pts.length;
  my /= pts.length;
  let sxx = 0,
    sxy = 0,
    syy = 0,
    sx = 0,
    sy = 0,
    sz = 0,
    sxz = 0,
    syz = 0;
  const n = pts.length;
  for (const [x0, y0] of pts) {
    const x = x0 - mx;
    const y = y0 - my;
    const z = x * x + y * y;
    sxx += x * x;
    sxy += x * y;
    syy += y * y;
    sx += x;
    sy += y;
    sz += z;
    sxz += x * z;
    syz += y * z;
  }
  // Normal equations for [D, E, F]: A·p = −b.
  const A = [
    [sxx, sxy, sx],
    [sxy, syy, sy],
    [sx, sy, n],
  ];
  const rhs = [-sxz, -syz, -sz];
  const p = solve3(A, rhs);
  if (!p) return null;
  const cx = -p[0] / 2;
  const cy = -p[1] / 2;
  const r2 = cx * cx + cy * cy - p[2];
  if (!(r2 > 0)) return null;
  return { center: [cx + mx, cy + my], radius: Math.sqrt(r2) };
}

function solve3(A: number[][], b: number[]): number[] | null {
  const M = A.map((row, i) => [...row, b[i]]);
  for (let col = 0; col < 3; col++) {
    let piv = col;
    for (let r = col + 1; r < 3; r++) if (Math.abs(M[r][col]) > Math.abs(M[piv][col])) piv = r;
    if (Math.abs(M[piv][col]) < 1e-12) return null;
    [M[col], M[piv]] = [M[piv], M[col]];
    for (let r = 0; r < 3; r++) {
      if (r === col) continue;
      const k = M[r][col] / M[col][col];
      for (let c = col; c < 4; c++) M[r][c] -= k * M[col][c];
    }
  }
  return [M[0][3] / M[0][0], M[1][3] / M[1][1], M[2][3] / M[2][2]];
}

// ---------------------------------------------------------------------------------------------------
// The Arago spot.

/** First zero of J₀ (Abramowitz & Stegun, Table 9.5). */
const J0_ZERO_1 = 2.404825557695773;
/** First zero of J₁, where J₀ has its first minimum (Abramowitz & Stegun, Table 9.5). */
const J1_ZERO_1 = 3.8317059702075125;

/** J₀ by its power series, accurate to 1e-12 for |x| ≤ 6 (enough for a template out to 2·r₀, x ≤ 4.81). */
function besselJ0Series(x: number): number {
  const q = -(x * x) / 4;
  let term = 1;
  let sum = 1;
  for (let k = 1; k < 40; k++) {
    term *= q / (k * k);
    sum += term;
    if (Math.abs(term) < 1e-17) break;
  }
  return sum;
}

interface Template {
  dx: Int32Array;
  dy: Int32Array;
  t: Float64Array;
}

/** J₀²(2.405·r/r₀) sampled on integer offsets within 2·r₀ (at least 2 px). */
function spotTemplate(r0: number): Template {
  const rt = Math.max(2, 2 * r0);
  const h = Math.ceil(rt);
  const dx: number[] = [];
  const dy: number[] = [];
  const t: number[] = [];
  for (let y = -h; y <= h; y++) {
    for (let x = -h; x <= h; x++) {
      const r = Math.hypot(x, y);
      if (r > rt) continue;
      dx.push(x);
      dy.push(y);
      t.push(besselJ0Series((J0_ZERO_1 * r) / r0) ** 2);
    }
  }
  return { dx: Int32Array.from(dx), dy: Int32Array.from(dy), t: Float64Array.from(t) };
}

/** Normalised cross-correlation of the template at (cx, cy) with the in-frame part of the image. */
function ncc(img: Float64Array, w: number, h: number, tp: Template, cx: number, cy: number): number {
  let n = 0,
    st = 0,
    stt = 0,
    sf = 0,
    sff = 0,
    stf = 0;
  const m = tp.t.length;
  for (let k = 0; k < m; k++) {
    const x = cx + tp.dx[k];
    const y = cy + tp.dy[k];
    if (x < 0 || y < 0 || x >= w || y >= h) continue;
    const v = img[y * w + x];
    const t = tp.t[k];
    n++;
    st += t;
    stt += t * t;
    sf += v;
    sff += v * v;
    stf += t * v;
  }
  if (n < 0.5 * m) return -Infinity;
  const vt = stt - (st * st) / n;
  const vf = sff - (sf * sf) / n;
  if (!(vt > 0) || !(vf > 0)) return -Infinity;
  return (stf - (st * sf) / n) / Math.sqrt(vt * vf);
}

function bestNcc(
  img: Float64Array,
  w: number,
  h: number,
  tp: Template,
  x0: number,
  x1: number,
  y0: number,
  y1: number,
  within: ((x: number, y: number) => boolean) | null,
): { x: number; y: number; score: number } {
  let best = { x: -1, y: -1, score: -Infinity };
  for (let y = Math.max(0, y0); y <= Math.min(h - 1, y1); y++) {
    for (let x = Math.max(0, x0); x <= Math.min(w - 1, x1); x++) {
      if (within && !within(x, y)) continue;
      const s = ncc(img, w, h, tp, x, y);
      if (s > best.score) best = { x, y, score: s };
    }
  }
  return best;
}

function findSpot(
  f: Float64Array,
  W: number,
  H: number,
  mask: Uint8Array,
  r0: number,
  search: { center: [number, number]; radius: number } | null,
): { center: [number, number]; score: number } | null {
  // Light smoothing against noise (well below the spot size), masked pixels filled from their surroundings.
  const img = smoothMasked(f, W, H, Math.max(0.5, 0.1 * r0), mask);

  // Coarse search on a binned image (about 6 binned pixels per r₀), then the full-resolution peak.
  const bs = Math.max(1, Math.floor(r0 / 6));
  let guess: { x: number; y: number };
  if (bs > 1) {
    const bin = binImage(img, W, H, bs, null);
    const tp = spotTemplate(r0 / bs);
    const toB = (v: number) => (v - (bs - 1) / 2) / bs;
    const b = search
      ? bestNcc(bin.data, bin.widthPx, bin.heightPx, tp, Math.floor(toB(search.center[0] - search.radius)), Math.ceil(toB(search.center[0] + search.radius)), Math.floor(toB(search.center[1] - search.radius)), Math.ceil(toB(search.center[1] + search.radius)), null)
      : bestNcc(bin.data, bin.widthPx, bin.heightPx, tp, 0, bin.widthPx - 1, 0, bin.heightPx - 1, null);
    if (!(b.score > -Infinity)) return null;
    guess = { x: b.x * bs + (bs - 1) / 2, y: b.y * bs + (bs - 1) / 2 };
  } else if (search) {
    guess = { x: search.center[0], y: search.center[1] };
  } else {
    guess = { x: (W - 1) / 2, y: (H - 1) / 2 };
  }
  const tp = spotTemplate(r0);
  const reach = bs > 1 ? bs + 1 : search ? Math.ceil(search.radius) : Math.max(W, H);
  const fine = bestNcc(img, W, H, tp, Math.floor(guess.x - reach), Math.ceil(guess.x + reach), Math.floor(guess.y - reach), Math.ceil(guess.y + reach), null);
  if (!(fine.score > -Infinity)) return null;
  // Sub-pixel peak: a parabola through the scores of the neighbours along each axis.
  const s0 = fine.score;
  const sub = (a: number, c: number) => {
    const den = a - 2 * s0 + c;
    return den < 0 && Number.isFinite(a) && Number.isFinite(c) ? Math.max(-0.5, Math.min(0.5, (0.5 * (a - c)) / den)) : 0;
  };
  const cx = fine.x + sub(ncc(img, W, H, tp, fine.x - 1, fine.y), ncc(img, W, H, tp, fine.x + 1, fine.y));
  const cy = fine.y + sub(ncc(img, W, H, tp, fine.x, fine.y - 1), ncc(img, W, H, tp, fine.x, fine.y + 1));
  if (search && Math.hypot(cx - search.center[0], cy - search.center[1]) > search.radius + 1) return null;
  if (!(s0 >= 0.5)) return null;
  if (!hasSpotRings(img, W, H, mask, f, cx, cy, r0)) return null;
  return { center: [cx, cy], score: s0 };
}

/**
 * Does the azimuthal profile around (cx, cy) show a bright core, a dark ring at r₀ and a brighter ring
 * beyond it, as J₀² does (core 1, first minimum 0 at r₀, first ring maximum J₀(3.832)² = 0.162 at
 * 1.59·r₀; Abramowitz & Stegun, Table 9.5)? Each comparison must exceed the noise of the ring means.
 */
function hasSpotRings(img: Float64Array, W: number, H: number, mask: Uint8Array, raw: Float64Array, cx: number, cy: number, r0: number): boolean {
  const ringMax = J1_ZERO_1 / J0_ZERO_1; // 1.593
  const bands = [
    [0, 0.35],
    [0.8, 1.2],
    [ringMax - 0.25, ringMax + 0.25],
  ];
  const sum = [0, 0, 0];
  const cnt = [0, 0, 0];
  const reach = Math.ceil((ringMax + 0.3) * r0) + 1;
  for (let r = Math.max(0, Math.floor(cy - reach)); r <= Math.min(H - 1, Math.ceil(cy + reach)); r++) {
    for (let c = Math.max(0, Math.floor(cx - reach)); c <= Math.min(W - 1, Math.ceil(cx + reach)); c++) {
      const i = r * W + c;
      if (mask[i]) continue;
      const d = Math.hypot(c - cx, r - cy) / r0;
      for (let b = 0; b < 3; b++) {
        if (d >= bands[b][0] && d <= bands[b][1]) {
          sum[b] += img[i];
          cnt[b]++;
        }
      }
    }
  }
  // The core band may hold a single pixel when r₀ is small: then take the nearest pixels.
  if (cnt[0] === 0) {
    const v = bilinear(img, W, H, cx, cy);
    if (Number.isFinite(v)) {
      sum[0] = v;
      cnt[0] = 1;
    }
  }
  if (cnt.some((n) => n === 0)) return false;
  const [core, dark, bright] = sum.map((s, k) => s / cnt[k]);
  // Pixel noise: robust spread of the raw image around its lightly smoothed version.
  const resid = new Float64Array(raw.length);
  for (let i = 0; i < raw.length; i++) resid[i] = raw[i] - img[i];
  const sigma = madSigma(unmaskedValues(resid, mask));
  const se = (k: number) => sigma / Math.sqrt(cnt[k]);
  return core - dark > Math.max(4 * Math.hypot(se(0), se(1)), 0.2 * core) && bright - dark > 3 * Math.hypot(se(1), se(2));
}
