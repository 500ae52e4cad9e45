import { ansiToNM } from './ansi-to-nm.ts';
import { nmToNoll } from './nm-to-noll.ts';

/**
 * Noll index of the ANSI index j (same polynomial, same sign; only the numbering differs).
 *
 * @throws RangeError on an invalid ANSI index
 * @example ansiToNoll(4) // 4;  ansiToNoll(12) // 11;  ansiToNoll(1) // 3
 */
export function ansiToNoll(j: number): number {
  const { n, m } = ansiToNM(j);
  return nmToNoll(n, m);
}
