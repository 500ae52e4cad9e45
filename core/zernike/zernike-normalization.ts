import { assertNM } from './internal/validate.ts';

/**
 * Unit-RMS normalisation factor N of Z(n, m) = N · R_n^|m|(ρ) · {cos|sin}(|m|θ):
 * √(n+1) for m = 0 and √(2(n+1)) otherwise (ANSI Z80.28 / ISO 24157; Noll 1976).
 *
 * @throws RangeError if (n, m) is not a valid pair
 */
export function zernikeNormalization(n: number, m: number): number {
  assertNM(n, m);
  return m === 0 ? Math.sqrt(n + 1) : Math.sqrt(2 * (n + 1));
}
