import { describe, expect, it } from 'vitest';
import {
  QuantityError,
  formatQuantity,
  normalizeQuantityText,
  parseAngle,
  parseLength,
  parseQuantity,
} from '../../core/units/parseQuantity.ts';

/** |a − b| ≤ 1e-15·|b|: equal up to rounding of the last bit or two. */
function expectClose(actual: number, expected: number): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(1e-15 * Math.abs(expected));
}

function catchQuantityError(f: () => unknown): QuantityError {
  try {
    f();
  } catch (err) {
    expect(err).toBeInstanceOf(QuantityError);
    expect(err).toBeInstanceOf(Error);
    return err as QuantityError;
  }
  throw new Error('expected a QuantityError, got none');
}

describe('parseLength: SI prefixes', () => {
  // SI Brochure, 9th ed. (BIPM 2019), Table 7: kilo 1e3, centi 1e-2, milli 1e-3, micro 1e-6, nano 1e-9, pico 1e-12.
  it.each([
    ['2 m', 2],
    ['0.002 km', 2],
    ['1.5 cm', 1.5e-2],
    ['4 mm', 4e-3],
    ['800 mm', 0.8],
    ['5.5 um', 5.5e-6],
    ['632.8 nm', 632.8e-9],
    ['532 nm', 532e-9],
    ['250 pm', 250e-12],
    ['1e-3 m', 1e-3],
    ['-2 m', -2],
    ['4mm', 4e-3],
    ['  4 mm  ', 4e-3],
  ])('%s → %d m', (text, metres) => {
    expectClose(parseLength(text), metres);
  });

  it('returns the double nearest to the decimal value in metres', () => {
    // ECMA-262 §7.1.4.1.1 (StringToNumber) rounds a decimal literal to the nearest double, so the
    // literal 2e-5 is the nearest double to 20 µm; a plain product 20 × 1e-6 gives 1.9999999999999998e-5.
    expect(20 * 1e-6).not.toBe(2e-5);
    expect(parseLength('20 um')).toBe(2e-5);
    expect(parseLength('632.8 nm')).toBe(6.328e-7);
    expect(parseLength('0.1 mm')).toBe(1e-4);
    expect(parseLength('1e-3mm')).toBe(1e-6);
    expect(parseLength('.5 mm')).toBe(5e-4);
  });

  it('reads the inch as exactly 25.4 mm', () => {
    // International yard and pound agreement (1959): 1 in = 0.0254 m exactly (also NIST SP 811, 2008).
    expectClose(parseLength('1 in'), 0.0254);
  });
});

describe('parseLength: micro sign', () => {
  // The SI prefix micro is written µ (SI Brochure, 9th ed., Table 7). Keyboards produce either
  // U+00B5 MICRO SIGN or U+03BC GREEK SMALL LETTER MU (Unicode Standard code charts); "u" is the ASCII stand-in.
  it('accepts U+00B5, U+03BC and u alike', () => {
    const microSign = '5.5 \u00B5m';
    const greekMu = '5.5 \u03BCm';
    expect(microSign).not.toBe(greekMu);
    expectClose(parseLength(microSign), 5.5e-6);
    expectClose(parseLength(greekMu), 5.5e-6);
    expect(parseLength(microSign)).toBe(parseLength('5.5 um'));
    expect(parseLength(greekMu)).toBe(parseLength('5.5 um'));
  });

  it('normalises the text it is given', () => {
    expect(normalizeQuantityText('5.5 \u00B5m')).toBe('5.5 um');
    expect(normalizeQuantityText('5.5 \u03BCm')).toBe('5.5 um');
    // U+2212 MINUS SIGN and U+00B0 DEGREE SIGN (Unicode Standard code charts).
    expect(normalizeQuantityText('\u22122 m')).toBe('-2 m');
    expect(normalizeQuantityText('30\u00B0')).toBe('30 deg');
  });

  it('reads a typographic minus sign', () => {
    expect(parseLength('\u22122 m')).toBe(-2);
  });
});

describe('parseAngle', () => {
  // SI Brochure, 9th ed. (BIPM 2019), Table 8: 1° = (π/180) rad; 1′ = (1/60)°.
  it.each([
    ['0 deg', 0],
    ['30 deg', Math.PI / 6],
    ['90 deg', Math.PI / 2],
    ['180 deg', Math.PI],
    ['-45 deg', -Math.PI / 4],
    ['60 arcmin', Math.PI / 180],
    ['1 rad', 1],
    ['0.5 rad', 0.5],
    ['30\u00B0', Math.PI / 6],
  ])('%s → %d rad', (text, radians) => {
    const got = parseAngle(text);
    if (radians === 0) expect(got).toBe(0);
    else expectClose(got, radians);
  });

  it('refuses a bare number: degrees or radians would be a guess', () => {
    const err = catchQuantityError(() => parseAngle('30'));
    expect(err.problem).toBe('no-unit');
    expect(err.expected).toBe('an angle such as "30 deg"');
  });
});

describe('infinity', () => {
  it.each(['inf', 'infinity', 'Infinity', 'INF', '+inf'])('accepts %s where allowed', (text) => {
    expect(parseLength(text, { allowInfinity: true })).toBe(Number.POSITIVE_INFINITY);
  });

  it('refuses "inf" where it is not allowed', () => {
    const err = catchQuantityError(() => parseLength('inf'));
    expect(err.problem).toBe('not-finite');
  });

  it('refuses a number that overflows to infinity', () => {
    // 1e400 exceeds the largest IEEE 754 double, about 1.8e308 (IEEE 754-2019, binary64).
    const err = catchQuantityError(() => parseLength('1e400 m'));
    expect(err.problem).toBe('not-finite');
  });
});

describe('errors', () => {
  it('refuses a bare number for a length and says what is expected', () => {
    const err = catchQuantityError(() => parseLength('4'));
    expect(err.problem).toBe('no-unit');
    expect(err.kind).toBe('length');
    expect(err.text).toBe('4');
    expect(err.expected).toBe('a length such as "4 mm"');
    expect(err.message).toContain('a length such as "4 mm"');
  });

  it('refuses a JSON number for a length', () => {
    const err = catchQuantityError(() => parseLength(4));
    expect(err.problem).toBe('no-unit');
    expect(err.detail).toContain('"4 mm"');
  });

  it('uses the example it is given', () => {
    const err = catchQuantityError(() => parseLength('800', { example: '800 mm' }));
    expect(err.expected).toBe('a length such as "800 mm"');
  });

  it.each([
    ['3 s', 'time'],
    ['30 deg', 'angle'],
    ['4 m^2', 'area'],
    ['4 kg', 'mass'],
    ['4 mm/s', 'another quantity'],
  ])('refuses %s as a length (it is %s)', (text, what) => {
    const err = catchQuantityError(() => parseLength(text));
    expect(err.problem).toBe('wrong-dimension');
    expect(err.detail).toContain(what);
  });

  it('refuses a length where an angle is expected', () => {
    const err = catchQuantityError(() => parseAngle('4 mm'));
    expect(err.problem).toBe('wrong-dimension');
    expect(err.expected).toBe('an angle such as "30 deg"');
  });

  it('names an unknown unit', () => {
    const err = catchQuantityError(() => parseLength('4 parsecs'));
    expect(err.problem).toBe('syntax');
    expect(err.detail).toBe('unit "parsecs" is not known');
  });

  it.each([
    ['mm', 'no-number'],
    ['', 'empty'],
    ['   ', 'empty'],
    ['4 mm 3', 'syntax'],
    ['1,5 mm', 'syntax'],
  ] as const)('refuses %j (%s)', (text, problem) => {
    expect(catchQuantityError(() => parseLength(text)).problem).toBe(problem);
  });

  it.each([null, undefined, true, {}, ['4 mm']])('refuses the non-text value %j', (value) => {
    expect(catchQuantityError(() => parseQuantity(value, 'length')).problem).toBe('not-text');
  });
});

describe('formatQuantity', () => {
  it('writes readable values', () => {
    // Values from the SI prefixes (SI Brochure, 9th ed., Table 7) and 1° = π/180 rad (Table 8).
    expect(formatQuantity(632.8e-9, 'nm')).toBe('632.8 nm');
    expect(formatQuantity(5.5e-6, 'um')).toBe('5.5 um');
    expect(formatQuantity(4e-3, 'mm')).toBe('4 mm');
    expect(formatQuantity(0.8, 'mm')).toBe('800 mm');
    expect(formatQuantity(-2, 'mm')).toBe('-2000 mm');
    expect(formatQuantity(0, 'mm')).toBe('0 mm');
    expect(formatQuantity(Math.PI / 2, 'deg')).toBe('90 deg');
    expect(formatQuantity(Math.PI / 6, 'deg')).toBe('30 deg');
    expect(formatQuantity(Number.POSITIVE_INFINITY, 'mm')).toBe('inf');
    expect(formatQuantity(2e-5, 'mm')).toBe('0.02 mm');
    expect(formatQuantity(2e-5, 'um')).toBe('20 um');
    expect(formatQuantity(-1.25e-4, 'mm')).toBe('-0.125 mm');
    expect(formatQuantity(1e-30, 'mm')).toBe('1e-27 mm');
    expect(formatQuantity(123.5, 'nm')).toBe('123500000000 nm');
  });

  it('round-trips every value exactly', () => {
    // Property check: parse(format(x)) === x bit for bit, over many awkward doubles (a fixed-seed LCG,
    // Numerical Recipes 3rd ed., §7.1: a = 1664525, c = 1013904223, m = 2^32).
    let state = 12345;
    const next = () => {
      state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
      return state / 2 ** 32;
    };
    for (let i = 0; i < 100; i++) {
      const lengthM = (next() - 0.3) * 10 ** (-9 + 9 * next());
      for (const unit of ['nm', 'um', 'mm', 'm']) expect(parseLength(formatQuantity(lengthM, unit))).toBe(lengthM);
      const angleRad = (next() - 0.5) * 20;
      expect(parseAngle(formatQuantity(angleRad, 'deg'))).toBe(angleRad);
    }
    expect(parseLength(formatQuantity(0.1e-3 + 0.2e-3, 'mm'))).toBe(0.1e-3 + 0.2e-3);
  });

  it('refuses NaN and unit names that are not lengths or angles', () => {
    expect(() => formatQuantity(Number.NaN, 'mm')).toThrow(RangeError);
    expect(() => formatQuantity(1, 's')).toThrow(RangeError);
    expect(() => formatQuantity(1, 'parsec')).toThrow(RangeError);
  });
});
