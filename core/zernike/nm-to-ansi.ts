import { assertNM, triangular } from './internal/validate.ts';

/**
 * ANSI Z80.28 / ISO 24157 single index j = (n(n+2) + m)/2 of the pair (n, m).
 *
 * @throws RangeError if n, m are not integers, n < 0, |m| > n, n − |m| is odd, or j is not a safe integer
 * @example nmToAnsi(4, 0) // 12 (primary spherical)
 */
export function nmToAnsi(n: number, m: number): number {
  assertNM(n, m);
  const j = triangular(n) + (n + m) / 2;
  if (!Number.isSafeInteger(j)) throw new RangeError(`ANSI index of (${n}, ${m}) exceeds Number.MAX_SAFE_INTEGER`);
  return j;
}
