import { ansiToNM } from './ansi-to-nm.ts';
import { jacobiP } from './internal/jacobi.ts';

/**
 * ANSI Zernike polynomial Z_j at Cartesian coordinates (x, y) of the unit disc (x = ρ cosθ, y = ρ sinθ).
 *
 * Evaluated in Cartesian form, N · P_k^(0,|m|)(2(x²+y²) − 1) · {Re | Im}(x + iy)^|m|, with no
 * trigonometric functions; as a polynomial for any (x, y) (no masking outside the disc).
 *
 * @throws RangeError on an invalid ANSI index
 * @example zernikeXY(2, x, y) === 2x (tilt x);  zernikeXY(5, x, y) === √6 (x² − y²)
 */
export function zernikeXY(j: number, x: number, y: number): number {
  const { n, m } = ansiToNM(j);
  const am = Math.abs(m);
  const p = jacobiP((n - am) / 2, am, 2 * (x * x + y * y) - 1);
  if (am === 0) return Math.sqrt(n + 1) * p;
  let re = 1;
  let im = 0;
  for (let i = 0; i < am; i++) {
    const t = re * x - im * y;
    im = re * y + im * x;
    re = t;
  }
  return Math.sqrt(2 * (n + 1)) * p * (m > 0 ? re : im);
}
