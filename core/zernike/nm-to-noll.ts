import { assertNM, triangular } from './internal/validate.ts';

/**
 * Noll's single index (Noll 1976, Table 1; starts at 1) of the pair (n, m).
 * m > 0 (cos) gets the even index of the pair for |m|, m < 0 (sin) the odd one.
 *
 * @throws RangeError if (n, m) is not a valid pair or the index is not a safe integer
 * @example nmToNoll(4, 0) // 11;  nmToNoll(3, -1) // 7;  nmToNoll(3, 1) // 8
 */
export function nmToNoll(n: number, m: number): number {
  assertNM(n, m);
  const start = triangular(n);
  let j: number;
  if (m === 0) {
    j = start + 1;
  } else {
    // The two indices for |m| are start + |m| and start + |m| + 1; pick by parity.
    const a = start + Math.abs(m);
    const wantEven = m > 0;
    j = (a % 2 === 0) === wantEven ? a : a + 1;
  }
  if (!Number.isSafeInteger(j)) throw new RangeError(`Noll index of (${n}, ${m}) exceeds Number.MAX_SAFE_INTEGER`);
  return j;
}
