/**
 * The disc edge as a star-shaped curve about the disc centre:
 *   r(θ) = a·(1 + e·cos 2(θ − θe)) + Σ_h A_h·cos(n_h·θ − φ_h)
 * evaluated for real θ and, for the fast model's pole handling, for complex θ.
 */
import type { DiscSpec } from '../setup/types.ts';

export interface EdgePoint {
  x: number;
  y: number;
  /** dQ/dθ */
  dx: number;
  dy: number;
}

/** Edge radius r(θ) and its derivative dr/dθ. */
export function edgeRadius(disc: DiscSpec, thetaRad: number): { r: number; dr: number } {
  const a = disc.radiusM;
  const arg = 2 * (thetaRad - disc.ellipseAngleRad);
  let r = a * (1 + disc.ellipticity * Math.cos(arg));
  let dr = -2 * a * disc.ellipticity * Math.sin(arg);
  for (const h of disc.edgeHarmonics) {
    const t = h.order * thetaRad - h.phaseRad;
    r += h.amplitudeM * Math.cos(t);
    dr -= h.amplitudeM * h.order * Math.sin(t);
  }
  return { r, dr };
}

/** Point on the edge at polar angle θ and the tangent dQ/dθ. */
export function edgePoint(disc: DiscSpec, thetaRad: number): EdgePoint {
  const { r, dr } = edgeRadius(disc, thetaRad);
  const c = Math.cos(thetaRad);
  const s = Math.sin(thetaRad);
  return { x: r * c, y: r * s, dx: dr * c - r * s, dy: dr * s + r * c };
}

/** True when the point (x, y) lies strictly inside the disc. */
export function insideDisc(disc: DiscSpec, x: number, y: number): boolean {
  const rho = Math.hypot(x, y);
  return rho < edgeRadius(disc, Math.atan2(y, x)).r;
}

/** Signed distance-like measure: |Q| − r(θ_Q) (positive outside). */
export function radialExcess(disc: DiscSpec, x: number, y: number): number {
  return Math.hypot(x, y) - edgeRadius(disc, Math.atan2(y, x)).r;
}

const edgeScratch = new Float64Array(8);

/**
 * Edge point Q(θ) and Q'(θ) for complex θ = tr + i·ti: [Qx, Qy, Q'x, Q'y] as (re, im) pairs.
 * Writes into `out` (default: a shared scratch array, overwritten by the next call).
 */
export function edgePointComplex(disc: DiscSpec, tr: number, ti: number, out: Float64Array = edgeScratch): Float64Array {
  const a = disc.radiusM;
  const e = disc.ellipticity;
  // cos(x+iy) = cos x cosh y − i sin x sinh y ; sin(x+iy) = sin x cosh y + i cos x sinh y
  let rr = a, ri = 0, drr = 0, dri = 0;
  if (e !== 0) {
    const x = 2 * (tr - disc.ellipseAngleRad), y = 2 * ti;
    const ch = Math.cosh(y), sh = Math.sinh(y), cx = Math.cos(x), sx = Math.sin(x);
    rr += a * e * cx * ch;
    ri += -a * e * sx * sh;
    drr += -2 * a * e * sx * ch;
    dri += -2 * a * e * cx * sh;
  }
  for (const h of disc.edgeHarmonics) {
    const x = h.order * tr - h.phaseRad, y = h.order * ti;
    const ch = Math.cosh(y), sh = Math.sinh(y), cx = Math.cos(x), sx = Math.sin(x);
    rr += h.amplitudeM * cx * ch;
    ri += -h.amplitudeM * sx * sh;
    drr -= h.amplitudeM * h.order * sx * ch;
    dri -= h.amplitudeM * h.order * cx * sh;
  }
  const ch = Math.cosh(ti), sh = Math.sinh(ti), ct = Math.cos(tr), st = Math.sin(tr);
  const cr = ct * ch, ci = -st * sh;
  const sr = st * ch, si = ct * sh;
  // Qx = r·cos, Qy = r·sin
  out[0] = rr * cr - ri * ci;
  out[1] = rr * ci + ri * cr;
  out[2] = rr * sr - ri * si;
  out[3] = rr * si + ri * sr;
  // Q'x = dr·cos − r·sin ; Q'y = dr·sin + r·cos
  out[4] = drr * cr - dri * ci - out[2];
  out[5] = drr * ci + dri * cr - out[3];
  out[6] = drr * sr - dri * si + out[0];
  out[7] = drr * si + dri * sr + out[1];
  return out;
}

const secondScratch = new Float64Array(4);

/**
 * Second derivative Q''(θ) of the edge point for complex θ = tr + i·ti: [Q''x, Q''y] as (re, im) pairs.
 * With Q = r·(cos θ, sin θ): Q'' = r''·(cos θ, sin θ) + 2r'·(−sin θ, cos θ) − r·(cos θ, sin θ).
 * Writes into `out` (default: a shared scratch array, overwritten by the next call).
 */
export function edgePointSecondComplex(disc: DiscSpec, tr: number, ti: number, out: Float64Array = secondScratch): Float64Array {
  const a = disc.radiusM;
  const e = disc.ellipticity;
  // r, r', r'' as (re, im); cos(x+iy) = cos x cosh y − i sin x sinh y, sin(x+iy) = sin x cosh y + i cos x sinh y
  let rr = a, ri = 0, drr = 0, dri = 0, d2r = 0, d2i = 0;
  const add = (amp: number, order: number, x: number, y: number) => {
    const ch = Math.cosh(y), sh = Math.sinh(y), cx = Math.cos(x), sx = Math.sin(x);
    const cosr = cx * ch, cosi = -sx * sh, sinr = sx * ch, sini = cx * sh;
    rr += amp * cosr;
    ri += amp * cosi;
    drr -= amp * order * sinr;
    dri -= amp * order * sini;
    d2r -= amp * order * order * cosr;
    d2i -= amp * order * order * cosi;
  };
  if (e !== 0) add(a * e, 2, 2 * (tr - disc.ellipseAngleRad), 2 * ti);
  for (const h of disc.edgeHarmonics) add(h.amplitudeM, h.order, h.order * tr - h.phaseRad, h.order * ti);
  const ch = Math.cosh(ti), sh = Math.sinh(ti), ct = Math.cos(tr), st = Math.sin(tr);
  const cr = ct * ch, ci = -st * sh;
  const sr = st * ch, si = ct * sh;
  // (r'' − r)·cos − 2r'·sin, (r'' − r)·sin + 2r'·cos
  const ar = d2r - rr, ai = d2i - ri;
  out[0] = ar * cr - ai * ci - 2 * (drr * sr - dri * si);
  out[1] = ar * ci + ai * cr - 2 * (drr * si + dri * sr);
  out[2] = ar * sr - ai * si + 2 * (drr * cr - dri * ci);
  out[3] = ar * si + ai * sr + 2 * (drr * ci + dri * cr);
  return out;
}
