/**
 * The free (unobstructed) beam at one camera point by the saddle-point (stationary-phase) evaluation
 * of the Fresnel integral, with the Gaussian amplitude folded into a complex wavefront
 *   Φ(Q) = k·[Ŵ(Q) + |Q − F|²/(2L')],  Ŵ = W + i·|Q − c|²/(k·w²).
 * The saddle Q* is complex; ∫∫ e^{iΦ} d²Q ≈ e^{iΦ(Q*)}·2π/√det(−i·H(Q*)), exact when Φ is quadratic
 * (Gaussian beam with decentre, tilt, defocus and astigmatism).
 *
 * It also returns the two real points where the rim integrand's denominator gᵀH⁻¹g vanishes in the
 * local quadratic model (see rimModel.ts), each with its factor t of the quadratic form.
 */
import { evalPolynomialComplex, type Polynomial2D } from '../wavefront.ts';

export interface SaddleResult {
  ok: boolean;
  /** Q* (complex): [xr, xi, yr, yi] */
  q: Float64Array;
  /** iΦ0 as (re, im) exponent: e^{iΦ0} = exp(expRe)·(cos expIm + i sin expIm) */
  expRe: number;
  expIm: number;
  /** Hessian H = ∇∇Φ at Q*, complex: [h11r, h11i, h12r, h12i, h22r, h22i] */
  h: Float64Array;
  /** Free-beam integral ∫∫ e^{iΦ} d²Q (without the 1/(iλL) prefactor). */
  allRe: number;
  allIm: number;
}

export interface SaddleContext {
  k: number;
  lpM: number;
  /** 1/(k w²) */
  gamma: number;
  cx: number;
  cy: number;
  poly: Polynomial2D;
}

const scratch = new Float64Array(12);

/** complex sqrt, principal branch */
function csqrt(re: number, im: number): [number, number] {
  const m = Math.hypot(re, im);
  let r = Math.sqrt((m + re) / 2);
  let i = Math.sqrt(Math.max(0, (m - re) / 2));
  if (im < 0) i = -i;
  if (m === 0) r = 0;
  return [r, i];
}

/**
 * Solve for the saddle Q* of Φ for the camera point F (in disc-plane coordinates F = P·L'/L).
 * `start`, when given, is a nearby solution [xr, xi, yr, yi] to continue from (e.g. the previous pixel).
 */
export function solveSaddle(ctx: SaddleContext, fx: number, fy: number, out: SaddleResult, start?: Float64Array | null): SaddleResult {
  const { k, lpM, gamma, cx, cy, poly } = ctx;
  const invLp = 1 / lpM;
  // Pure-Gaussian start: Q = (F/L' + 2iγ c)/(1/L' + 2iγ)
  const dr = invLp, di = 2 * gamma;
  const den = dr * dr + di * di;
  let xr: number, xi: number, yr: number, yi: number;
  if (start) {
    xr = start[0]; xi = start[1]; yr = start[2]; yi = start[3];
  } else {
    let nr = fx * invLp, ni = 2 * gamma * cx;
    xr = (nr * dr + ni * di) / den; xi = (ni * dr - nr * di) / den;
    nr = fy * invLp; ni = 2 * gamma * cy;
    yr = (nr * dr + ni * di) / den; yi = (ni * dr - nr * di) / den;
  }
  let ok = false;
  const d = scratch;
  let jxxr = 0, jxxi = 0, jxyr = 0, jxyi = 0, jyyr = 0, jyyi = 0;
  for (let it = 0; it < 40; it++) {
    evalPolynomialComplex(poly, xr, xi, yr, yi, d);
    // G = ∇W + 2iγ(Q − c) + (Q − F)/L'
    const gxr = d[2] - 2 * gamma * xi + (xr - fx) * invLp;
    const gxi = d[3] + 2 * gamma * (xr - cx) + xi * invLp;
    const gyr = d[4] - 2 * gamma * yi + (yr - fy) * invLp;
    const gyi = d[5] + 2 * gamma * (yr - cy) + yi * invLp;
    jxxr = d[6] + invLp; jxxi = d[7] + 2 * gamma;
    jxyr = d[8]; jxyi = d[9];
    jyyr = d[10] + invLp; jyyi = d[11] + 2 * gamma;
    // det = jxx·jyy − jxy²
    const detr = jxxr * jyyr - jxxi * jyyi - (jxyr * jxyr - jxyi * jxyi);
    const deti = jxxr * jyyi + jxxi * jyyr - 2 * jxyr * jxyi;
    const dd = detr * detr + deti * deti;
    if (!(dd > 0)) break;
    // Δ = J⁻¹G: Δx = (jyy·gx − jxy·gy)/det, Δy = (jxx·gy − jxy·gx)/det
    const nxr = jyyr * gxr - jyyi * gxi - (jxyr * gyr - jxyi * gyi);
    const nxi = jyyr * gxi + jyyi * gxr - (jxyr * gyi + jxyi * gyr);
    const nyr = jxxr * gyr - jxxi * gyi - (jxyr * gxr - jxyi * gxi);
    const nyi = jxxr * gyi + jxxi * gyr - (jxyr * gxi + jxyi * gxr);
    const sxr = (nxr * detr + nxi * deti) / dd, sxi = (nxi * detr - nxr * deti) / dd;
    const syr = (nyr * detr + nyi * deti) / dd, syi = (nyi * detr - nyr * deti) / dd;
    xr -= sxr; xi -= sxi; yr -= syr; yi -= syi;
    const step = Math.hypot(sxr, sxi, syr, syi);
    if (!Number.isFinite(step)) break;
    if (step < 1e-15 + 1e-12 * Math.hypot(xr, yr)) {
      ok = true;
      break;
    }
  }
  evalPolynomialComplex(poly, xr, xi, yr, yi, d);
  // Φ/k = W + iγ (Q−c)·(Q−c) + (Q−F)·(Q−F)/(2L')
  const ax = xr - cx, ay = yr - cy;
  const qcr = ax * ax - xi * xi + ay * ay - yi * yi;
  const qci = 2 * ax * xi + 2 * ay * yi;
  const bx = xr - fx, by = yr - fy;
  const qfr = bx * bx - xi * xi + by * by - yi * yi;
  const qfi = 2 * bx * xi + 2 * by * yi;
  const phr = k * (d[0] - gamma * qci + qfr / (2 * lpM));
  const phi = k * (d[1] + gamma * qcr + qfi / (2 * lpM));
  // e^{iΦ} = e^{i·phr − phi}
  out.expRe = -phi;
  out.expIm = phr;
  // H = k·J (recompute at the final point)
  const h11r = k * (d[6] + invLp), h11i = k * (d[7] + 2 * gamma);
  const h12r = k * d[8], h12i = k * d[9];
  const h22r = k * (d[10] + invLp), h22i = k * (d[11] + 2 * gamma);
  out.h[0] = h11r; out.h[1] = h11i; out.h[2] = h12r; out.h[3] = h12i; out.h[4] = h22r; out.h[5] = h22i;
  out.q[0] = xr; out.q[1] = xi; out.q[2] = yr; out.q[3] = yi;
  // A = −iH; √det(A) as the product of the principal roots of A's eigenvalues (Re A = Im H > 0).
  const a11r = h11i, a11i = -h11r, a12r = h12i, a12i = -h12r, a22r = h22i, a22i = -h22r;
  const trr = (a11r + a22r) / 2, tri = (a11i + a22i) / 2;
  const detAr = a11r * a22r - a11i * a22i - (a12r * a12r - a12i * a12i);
  const detAi = a11r * a22i + a11i * a22r - 2 * a12r * a12i;
  const [sqr, sqi] = csqrt(trr * trr - tri * tri - detAr, 2 * trr * tri - detAi);
  const [e1r, e1i] = csqrt(trr + sqr, tri + sqi);
  const [e2r, e2i] = csqrt(trr - sqr, tri - sqi);
  const pr = e1r * e2r - e1i * e2i, pi = e1r * e2i + e1i * e2r;
  // 2π/√det · e^{iΦ0}
  const pm = pr * pr + pi * pi;
  const invr = (2 * Math.PI * pr) / pm, invi = (-2 * Math.PI * pi) / pm;
  const mag = Math.exp(out.expRe);
  const er = mag * Math.cos(out.expIm), ei = mag * Math.sin(out.expIm);
  out.allRe = er * invr - ei * invi;
  out.allIm = er * invi + ei * invr;
  out.ok = ok && Number.isFinite(out.allRe) && Number.isFinite(out.allIm);
  return out;
}

export function newSaddleResult(): SaddleResult {
  return { ok: false, q: new Float64Array(4), expRe: 0, expIm: 0, h: new Float64Array(6), allRe: 0, allIm: 0 };
}
