import type { ZernikeDerivatives } from '../types.ts';

/**
 * Cartesian form used for evaluation (internal; not exported from index.ts).
 *
 * With z = x + iy, ρ^m cos(mθ) = Re z^m and ρ^m sin(mθ) = Im z^m, so
 *
 *     Z(n, ±m)(x, y) = N · P_k^(0,m)(u) · {Re | Im} z^m,   u = 2(x² + y²) − 1,
 *
 * a product of two polynomials in x and y. Derivatives follow from the product and chain rules
 * with ∂z^m/∂x = m z^{m−1} and ∂z^m/∂y = i m z^{m−1}; nothing is singular at the origin.
 *
 * `addProduct` adds F·G and its derivatives to `out`, where F = S(u) (S, S1 = S', S2 = S'' given)
 * and G = Re z^m (cos) or Im z^m (sin), given z^m = (pr, pi), z^{m−1} = (qr, qi), z^{m−2} = (sr, si)
 * (pass zeros for negative powers).
 */
export function addProduct(
  out: ZernikeDerivatives,
  x: number,
  y: number,
  m: number,
  isSin: boolean,
  S: number,
  S1: number,
  S2: number,
  pr: number,
  pi: number,
  qr: number,
  qi: number,
  sr: number,
  si: number,
): void {
  const ux = 4 * x;
  const uy = 4 * y;
  const Fx = S1 * ux;
  const Fy = S1 * uy;
  const Fxx = S2 * ux * ux + 4 * S1;
  const Fyy = S2 * uy * uy + 4 * S1;
  const Fxy = S2 * ux * uy;
  const mm = m * (m - 1);
  let G: number, Gx: number, Gy: number, Gxx: number, Gxy: number, Gyy: number;
  if (isSin) {
    G = pi;
    Gx = m * qi;
    Gy = m * qr;
    Gxx = mm * si;
    Gxy = mm * sr;
    Gyy = -mm * si;
  } else {
    G = pr;
    Gx = m * qr;
    Gy = -m * qi;
    Gxx = mm * sr;
    Gxy = -mm * si;
    Gyy = -mm * sr;
  }
  out.value += S * G;
  out.dx += Fx * G + S * Gx;
  out.dy += Fy * G + S * Gy;
  out.dxx += Fxx * G + 2 * Fx * Gx + S * Gxx;
  out.dyy += Fyy * G + 2 * Fy * Gy + S * Gyy;
  out.dxy += Fxy * G + Fx * Gy + Fy * Gx + S * Gxy;
}
