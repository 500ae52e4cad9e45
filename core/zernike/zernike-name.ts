import { ansiToNM } from './ansi-to-nm.ts';

/** Names of ANSI j = 0 … 14 (ANSI Z80.28 / ISO 24157 usage; orientation words refer to the lab frame, x right, y up). */
const NAMES: readonly string[] = [
  'piston', // 0  (0, 0)
  'tilt y', // 1  (1,-1)  2ρ sinθ = 2y
  'tilt x', // 2  (1, 1)  2ρ cosθ = 2x
  'oblique astigmatism', // 3  (2,-2)
  'defocus', // 4  (2, 0)
  'vertical astigmatism', // 5  (2, 2)
  'vertical trefoil', // 6  (3,-3)
  'vertical coma', // 7  (3,-1)
  'horizontal coma', // 8  (3, 1)
  'oblique trefoil', // 9  (3, 3)
  'oblique quadrafoil', // 10 (4,-4)
  'oblique secondary astigmatism', // 11 (4,-2)
  'primary spherical', // 12 (4, 0)
  'vertical secondary astigmatism', // 13 (4, 2)
  'vertical quadrafoil', // 14 (4, 4)
];

/**
 * Conventional name of the ANSI term j: the 15 terms up to radial order 4 have names
 * ('piston', 'tilt y', 'tilt x', …, 'defocus', …, 'primary spherical', …); higher terms are
 * named generically as "Z(n,m)", e.g. zernikeName(16) === 'Z(5,-1)'.
 *
 * @throws RangeError on an invalid ANSI index
 */
export function zernikeName(j: number): string {
  const { n, m } = ansiToNM(j);
  return j < NAMES.length ? NAMES[j] : `Z(${n},${m})`;
}
