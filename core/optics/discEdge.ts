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

// Complex helpers (re, im) for the analytic continuation of the edge curve.
function ccos(re: number, im: number): [number, number] {
  return [Math.cos(re) * Math.cosh(im), -Math.sin(re) * Math.sinh(im)];
}
function csin(re: number, im: number): [number, number] {
  return [Math.sin(re) * Math.cosh(im), Math.cos(re) * Math.sinh(im)];
}

/** Edge point Q(θ) and Q'(θ) for complex θ = tr + i·ti. Returns [Qx, Qy, Q'x, Q'y] as (re, im) pairs. */
export function edgePointComplex(disc: DiscSpec, tr: number, ti: number): Float64Array {
  const a = disc.radiusM;
  const e = disc.ellipticity;
  // r and dr
  const [c2r, c2i] = ccos(2 * (tr - disc.ellipseAngleRad), 2 * ti);
  const [s2r, s2i] = csin(2 * (tr - disc.ellipseAngleRad), 2 * ti);
  let rr = a * (1 + e * c2r);
  let ri = a * e * c2i;
  let drr = -2 * a * e * s2r;
  let dri = -2 * a * e * s2i;
  for (const h of disc.edgeHarmonics) {
    const [cr, ci] = ccos(h.order * tr - h.phaseRad, h.order * ti);
    const [sr, si] = csin(h.order * tr - h.phaseRad, h.order * ti);
    rr += h.amplitudeM * cr;
    ri += h.amplitudeM * ci;
    drr -= h.amplitudeM * h.order * sr;
    dri -= h.amplitudeM * h.order * si;
  }
  const [cr, ci] = ccos(tr, ti);
  const [sr, si] = csin(tr, ti);
  const out = new Float64Array(8);
  // Qx = r·cos, Qy = r·sin
  out[0] = rr * cr - ri * ci;
  out[1] = rr * ci + ri * cr;
  out[2] = rr * sr - ri * si;
  out[3] = rr * si + ri * sr;
  // Q'x = dr·cos − r·sin ; Q'y = dr·sin + r·cos
  out[4] = drr * cr - dri * ci - (rr * sr - ri * si);
  out[5] = drr * ci + dri * cr - (rr * si + ri * sr);
  out[6] = drr * sr - dri * si + (rr * cr - ri * ci);
  out[7] = drr * si + dri * sr + (rr * ci + ri * cr);
  return out;
}
