import type { NM } from './types.ts';
import { assertIndex, triangular, triangularRoot } from './internal/validate.ts';

/**
 * (n, m) of the ANSI Z80.28 / ISO 24157 single index j = (n(n+2) + m)/2.
 *
 * Row n holds j = n(n+1)/2 … n(n+3)/2, with m running −n, −n+2, …, n.
 *
 * @param j ANSI index, an integer ≥ 0
 * @throws RangeError if j is not a safe integer ≥ 0
 * @example ansiToNM(4) // { n: 2, m: 0 } (defocus)
 */
export function ansiToNM(j: number): NM {
  assertIndex(j, 0, 'ANSI index j');
  const n = triangularRoot(j);
  // j − T(n) = (n + m)/2; written this way nothing overflows 2^53 for any safe j.
  const m = 2 * (j - triangular(n)) - n;
  return { n, m };
}
