/**
 * Index conventions.
 * Sources: ANSI Z80.28-2004 / ISO 24157:2008 (single index j = (n(n+2)+m)/2, as restated in
 * /work/shared/notes/physics.md §5); R. J. Noll, "Zernike polynomials and atmospheric turbulence",
 * J. Opt. Soc. Am. 66, 207–211 (1976), Table 1. The Noll table below is typed from memory of Noll's
 * Table 1 (not re-read here); for j ≤ 13 it agrees with the Noll column of the reproduction in
 * J. Eur. Opt. Soc.-Rapid Publ. (2025), Table A.1.
 */
import { describe, expect, it } from 'vitest';
import {
  ansiToNM,
  ansiToNoll,
  nmToAnsi,
  nmToNoll,
  nollToAnsi,
  nollToNM,
  zernikeName,
} from '../../core/zernike/index.ts';

describe('ANSI single index (ANSI Z80.28 / ISO 24157: j = (n(n+2)+m)/2)', () => {
  it('matches the defining formula for every valid (n, m) with n ≤ 30, in order', () => {
    let expected = 0;
    for (let n = 0; n <= 30; n++) {
      for (let m = -n; m <= n; m += 2) {
        expect(nmToAnsi(n, m)).toBe((n * (n + 2) + m) / 2);
        expect(nmToAnsi(n, m)).toBe(expected); // consecutive, no gaps
        expect(ansiToNM(expected)).toEqual({ n, m: m + 0 }); // m + 0 turns the loop's −0 into 0
        expected++;
      }
    }
  });

  it('gives the named low-order terms of the standard (physics notes §5)', () => {
    expect(ansiToNM(0)).toEqual({ n: 0, m: 0 });
    expect(ansiToNM(3)).toEqual({ n: 2, m: -2 }); // oblique astigmatism
    expect(ansiToNM(4)).toEqual({ n: 2, m: 0 }); // defocus
    expect(ansiToNM(5)).toEqual({ n: 2, m: 2 }); // vertical astigmatism
    expect(ansiToNM(7)).toEqual({ n: 3, m: -1 }); // vertical coma
    expect(ansiToNM(8)).toEqual({ n: 3, m: 1 }); // horizontal coma
    expect(ansiToNM(12)).toEqual({ n: 4, m: 0 }); // primary spherical
  });

  it('handles indices near Number.MAX_SAFE_INTEGER exactly', () => {
    for (const j of [Number.MAX_SAFE_INTEGER, Number.MAX_SAFE_INTEGER - 1, 2 ** 52 + 3, 123456789012345]) {
      const { n, m } = ansiToNM(j);
      expect(Math.abs(m)).toBeLessThanOrEqual(n);
      expect((n - Math.abs(m)) % 2).toBe(0);
      expect(nmToAnsi(n, m)).toBe(j);
    }
  });
});

describe('Noll ordering (Noll 1976, Table 1)', () => {
  // Noll j → (n, |m|, angular factor) as printed in Noll's Table 1: even j carry cos(mθ), odd j sin(mθ).
  const NOLL_TABLE_1: Array<[number, number, number, 'cos' | 'sin' | '1']> = [
    [1, 0, 0, '1'],
    [2, 1, 1, 'cos'],
    [3, 1, 1, 'sin'],
    [4, 2, 0, '1'],
    [5, 2, 2, 'sin'],
    [6, 2, 2, 'cos'],
    [7, 3, 1, 'sin'],
    [8, 3, 1, 'cos'],
    [9, 3, 3, 'sin'],
    [10, 3, 3, 'cos'],
    [11, 4, 0, '1'],
    [12, 4, 2, 'cos'],
    [13, 4, 2, 'sin'],
    [14, 4, 4, 'cos'],
    [15, 4, 4, 'sin'],
    [16, 5, 1, 'cos'],
    [17, 5, 1, 'sin'],
    [18, 5, 3, 'cos'],
    [19, 5, 3, 'sin'],
    [20, 5, 5, 'cos'],
    [21, 5, 5, 'sin'],
    [22, 6, 0, '1'],
  ];

  it.each(NOLL_TABLE_1)('Noll j = %i is n = %i, |m| = %i with %s', (j, n, am, trig) => {
    const expectedM = trig === 'sin' ? -am : am;
    expect(nollToNM(j)).toEqual({ n, m: expectedM });
    expect(nmToNoll(n, expectedM)).toBe(j);
  });

  it('even Noll index ↔ cos (m > 0), odd ↔ sin (m < 0), for m ≠ 0, up to j = 500', () => {
    for (let j = 1; j <= 500; j++) {
      const { m } = nollToNM(j);
      if (m !== 0) expect(m > 0).toBe(j % 2 === 0);
    }
  });

  it('Noll and ANSI agree on the well-known pairs', () => {
    // ANSI 4 (defocus) = Noll 4; ANSI 12 (primary spherical) = Noll 11; ANSI 1 (tilt y) = Noll 3; ANSI 2 = Noll 2.
    expect(ansiToNoll(4)).toBe(4);
    expect(ansiToNoll(12)).toBe(11);
    expect(ansiToNoll(1)).toBe(3);
    expect(ansiToNoll(2)).toBe(2);
    expect(ansiToNoll(7)).toBe(7);
    expect(ansiToNoll(8)).toBe(8);
    expect(nollToAnsi(11)).toBe(12);
    expect(nollToAnsi(22)).toBe(24);
  });
});

describe('round trips up to j = 200', () => {
  it('ANSI → (n,m) → ANSI, Noll → (n,m) → Noll, ANSI → Noll → ANSI, Noll → ANSI → Noll', () => {
    for (let j = 0; j <= 200; j++) {
      const a = ansiToNM(j);
      expect(nmToAnsi(a.n, a.m)).toBe(j);
      expect(nollToAnsi(ansiToNoll(j))).toBe(j);
      expect(nollToNM(ansiToNoll(j))).toEqual(a);
    }
    for (let j = 1; j <= 201; j++) {
      const b = nollToNM(j);
      expect(nmToNoll(b.n, b.m)).toBe(j);
      expect(ansiToNoll(nollToAnsi(j))).toBe(j);
    }
  });

  it('Noll indices of each radial order are a permutation of the same block as ANSI', () => {
    for (let n = 0; n <= 19; n++) {
      const noll: number[] = [];
      for (let m = -n; m <= n; m += 2) noll.push(nmToNoll(n, m + 0));
      noll.sort((p, q) => p - q);
      const start = (n * (n + 1)) / 2 + 1;
      expect(noll).toEqual(Array.from({ length: n + 1 }, (_, i) => start + i));
    }
  });
});

describe('invalid inputs throw RangeError', () => {
  it.each([-1, 0.5, NaN, Infinity, -Infinity, 2 ** 53])('ansiToNM(%s)', (j) => {
    expect(() => ansiToNM(j)).toThrow(RangeError);
    expect(() => ansiToNoll(j)).toThrow(RangeError);
    expect(() => zernikeName(j)).toThrow(RangeError);
  });
  it.each([0, -1, 1.5, NaN, Infinity])('nollToNM(%s)', (j) => {
    expect(() => nollToNM(j)).toThrow(RangeError);
    expect(() => nollToAnsi(j)).toThrow(RangeError);
  });
  it.each([
    [2, 1], // n − |m| odd
    [2, 3], // |m| > n
    [2, -4],
    [-1, 1],
    [-2, 0],
    [1.5, 0.5],
    [3, 1.0000001],
    [NaN, 0],
  ])('nmToAnsi / nmToNoll(%s, %s)', (n, m) => {
    expect(() => nmToAnsi(n, m)).toThrow(RangeError);
    expect(() => nmToNoll(n, m)).toThrow(RangeError);
  });
  it('rejects non-number inputs from untyped callers', () => {
    expect(() => ansiToNM('3' as unknown as number)).toThrow(RangeError);
    expect(() => nmToAnsi(2 as number, undefined as unknown as number)).toThrow(RangeError);
  });
});

describe('names', () => {
  it('names the terms up to n = 4 as in ANSI Z80.28 usage, Z(n,m) beyond', () => {
    expect(zernikeName(0)).toBe('piston');
    expect(zernikeName(1)).toBe('tilt y');
    expect(zernikeName(2)).toBe('tilt x');
    expect(zernikeName(3)).toBe('oblique astigmatism');
    expect(zernikeName(4)).toBe('defocus');
    expect(zernikeName(5)).toBe('vertical astigmatism');
    expect(zernikeName(7)).toBe('vertical coma');
    expect(zernikeName(8)).toBe('horizontal coma');
    expect(zernikeName(12)).toBe('primary spherical');
    expect(zernikeName(15)).toBe('Z(5,-5)');
    expect(zernikeName(24)).toBe('Z(6,0)');
    const names = new Set(Array.from({ length: 15 }, (_, j) => zernikeName(j)));
    expect(names.size).toBe(15);
  });
});
