import { nollToNM } from './noll-to-nm.ts';
import { nmToAnsi } from './nm-to-ansi.ts';

/**
 * ANSI index of the Noll index j (same polynomial, same sign; only the numbering differs).
 *
 * @throws RangeError on an invalid Noll index
 * @example nollToAnsi(11) // 12;  nollToAnsi(2) // 2;  nollToAnsi(3) // 1
 */
export function nollToAnsi(j: number): number {
  const { n, m } = nollToNM(j);
  return nmToAnsi(n, m);
}
