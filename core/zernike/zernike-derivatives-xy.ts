import type { ZernikeDerivatives } from './types.ts';
import { ansiToNM } from './ansi-to-nm.ts';
import { jacobiP2 } from './internal/jacobi.ts';
import { addProduct } from './internal/product.ts';

const scratch = new Float64Array(3);

/**
 * Value and analytic first and second derivatives of the ANSI Zernike polynomial Z_j with respect to
 * the unit-disc Cartesian coordinates x and y. (For derivatives with respect to physical coordinates
 * r = R·(x, y), divide first derivatives by R and second derivatives by R².)
 *
 * Exact up to rounding and regular everywhere, including the origin (Cartesian product form; see README).
 *
 * @param out optional object to fill (avoids an allocation); returned
 * @throws RangeError on an invalid ANSI index
 */
export function zernikeDerivativesXY(j: number, x: number, y: number, out?: ZernikeDerivatives): ZernikeDerivatives {
  const { n, m } = ansiToNM(j);
  const am = Math.abs(m);
  const res = out ?? { value: 0, dx: 0, dy: 0, dxx: 0, dxy: 0, dyy: 0 };
  res.value = res.dx = res.dy = res.dxx = res.dxy = res.dyy = 0;
  const norm = am === 0 ? Math.sqrt(n + 1) : Math.sqrt(2 * (n + 1));
  jacobiP2((n - am) / 2, am, 2 * (x * x + y * y) - 1, scratch);
  // z^am, z^(am−1), z^(am−2) with zero for negative powers.
  let pr = 1;
  let pi = 0;
  let qr = 0;
  let qi = 0;
  let sr = 0;
  let si = 0;
  for (let i = 0; i < am; i++) {
    sr = qr;
    si = qi;
    qr = pr;
    qi = pi;
    const t = pr * x - pi * y;
    pi = pr * y + pi * x;
    pr = t;
  }
  addProduct(res, x, y, am, m < 0, norm * scratch[0], norm * scratch[1], norm * scratch[2], pr, pi, qr, qi, sr, si);
  return res;
}
