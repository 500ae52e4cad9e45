import { ansiToNM } from './ansi-to-nm.ts';
import { radialPolynomial } from './radial-polynomial.ts';

/**
 * ANSI Zernike polynomial Z_j at polar coordinates (ρ, θ) of the unit disc, θ in radians
 * counter-clockwise from +x:
 *
 *     m > 0: √(2(n+1)) R_n^m(ρ) cos(mθ);   m < 0: √(2(n+1)) R_n^|m|(ρ) sin(|m|θ);   m = 0: √(n+1) R_n^0(ρ).
 *
 * Evaluated as a polynomial for any ρ (no masking outside the disc).
 *
 * @throws RangeError on an invalid ANSI index
 * @example zernikePolar(4, 1, 0) // √3 (defocus at the rim)
 */
export function zernikePolar(j: number, rho: number, thetaRad: number): number {
  const { n, m } = ansiToNM(j);
  const r = radialPolynomial(n, m, rho);
  if (m === 0) return Math.sqrt(n + 1) * r;
  const norm = Math.sqrt(2 * (n + 1));
  return m > 0 ? norm * r * Math.cos(m * thetaRad) : norm * r * Math.sin(-m * thetaRad);
}
