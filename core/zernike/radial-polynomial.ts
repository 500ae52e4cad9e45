import { assertNM } from './internal/validate.ts';
import { jacobiP } from './internal/jacobi.ts';

/**
 * Zernike radial polynomial R_n^|m|(ρ) (unnormalised, R_n^m(1) = 1):
 *
 *     R_n^m(ρ) = Σ_{s=0}^{(n−m)/2} (−1)^s (n−s)! / (s! ((n+m)/2 − s)! ((n−m)/2 − s)!) ρ^{n−2s}
 *
 * (Born & Wolf, Principles of Optics, §9.2 and App. VII; Noll 1976 eq. 2). Evaluated through the
 * equivalent Jacobi form ρ^m P_{(n−m)/2}^(0,m)(2ρ² − 1) and its three-term recurrence, which avoids
 * the cancellation of the factorial sum at high order.
 *
 * The sign of m is ignored (R_n^{−m} = R_n^m). ρ may be any real number: the polynomial is evaluated
 * as such, also outside [0, 1] (no masking), with R_n^m(−ρ) = (−1)^n R_n^m(ρ).
 *
 * @throws RangeError if (n, m) is not a valid pair
 * @example radialPolynomial(2, 0, r) === 2r² − 1;  radialPolynomial(3, 1, r) === 3r³ − 2r
 */
export function radialPolynomial(n: number, m: number, rho: number): number {
  assertNM(n, m);
  const am = Math.abs(m);
  const k = (n - am) / 2;
  const p = jacobiP(k, am, 2 * rho * rho - 1);
  return am === 0 ? p : Math.pow(rho, am) * p;
}
