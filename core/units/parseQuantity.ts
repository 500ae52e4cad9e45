/**
 * Parse physical quantities written as text ("4 mm", "5.5 µm", "30 deg") into SI numbers
 * (metres, radians). Used at the edge of the program, where files and user input carry units;
 * everything inside `core` works in SI.
 *
 * Built on a custom mathjs instance that holds only the unit machinery: `create({ unitDependencies })`
 * is cheap, while importing the whole default mathjs instance is not (when bundled, only this part
 * is kept).
 *
 * Pure: no DOM, no Node built-ins.
 */
import { create, unitDependencies } from 'mathjs';
import type { Unit } from 'mathjs';

const math = create({ unitDependencies });

/** The kinds of quantity this module parses. */
export type QuantityKind = 'length' | 'angle';

/** Why a quantity text was refused. */
export type QuantityProblem =
  | 'not-text' // not a string (e.g. a JSON number or object)
  | 'empty' // empty or only blanks
  | 'no-unit' // a bare number such as "4"
  | 'no-number' // a unit without a number such as "mm"
  | 'syntax' // not a number followed by a unit, or an unknown unit
  | 'wrong-dimension' // a valid quantity of another kind, such as "3 s" for a length
  | 'not-finite' // overflowed to infinity, or "inf" where infinity is not allowed
  | 'out-of-range'; // reserved for callers that add range checks

export interface QuantityOptions {
  /** Accept "inf", "infinity" (any case, optional leading "+") and return +Infinity. Default false. */
  allowInfinity?: boolean;
  /** Example used in the message, e.g. "800 mm". Default "4 mm" for lengths, "30 deg" for angles. */
  example?: string;
}

/** A quantity text that could not be turned into the requested SI value. */
export class QuantityError extends Error {
  /** The value that was given (usually a string). */
  readonly text: unknown;
  readonly kind: QuantityKind;
  readonly problem: QuantityProblem;
  /** What would have been accepted, e.g. 'a length such as "4 mm"'. */
  readonly expected: string;
  /** A short explanation of what is wrong, e.g. '"s" is a unit of time, not of length'. */
  readonly detail: string;

  constructor(text: unknown, kind: QuantityKind, problem: QuantityProblem, expected: string, detail: string) {
    super(`${showValue(text)} is not valid: ${detail}; expected ${expected}`);
    this.name = 'QuantityError';
    this.text = text;
    this.kind = kind;
    this.problem = problem;
    this.expected = expected;
    this.detail = detail;
  }
}

const DEFAULT_EXAMPLE: Record<QuantityKind, string> = { length: '4 mm', angle: '30 deg' };
const BASE_UNIT_TEXT: Record<QuantityKind, string> = { length: 'm', angle: 'rad' };
const REFERENCE: Record<QuantityKind, Unit> = {
  length: math.Unit.parse('1 m'),
  angle: math.Unit.parse('1 rad'),
};

/** The phrase used in messages: 'a length such as "4 mm"'. */
export function describeExpected(kind: QuantityKind, example: string = DEFAULT_EXAMPLE[kind], allowInfinity = false): string {
  const article = kind === 'angle' ? 'an' : 'a';
  return `${article} ${kind} such as "${example}"${allowInfinity ? ', or "inf"' : ''}`;
}

/**
 * Rewrite characters people type but mathjs does not read:
 * micro sign U+00B5 and Greek mu U+03BC → "u"; degree sign "°" → " deg"; minus sign U+2212 → "-";
 * no-break and thin spaces → plain space.
 */
export function normalizeQuantityText(text: string): string {
  return text
    .replace(/[\u00B5\u03BC]/g, 'u')
    .replace(/\u00B0/g, ' deg')
    .replace(/\u2212/g, '-')
    .replace(/[\u00A0\u2007\u2009\u202F]/g, ' ')
    .trim();
}

const BARE_NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i;
const INFINITY_WORD = /^\+?(inf|infinity)$/i;

/** Parse a quantity of the given kind and return it in SI units (metres or radians). */
export function parseQuantity(text: unknown, kind: QuantityKind, options: QuantityOptions = {}): number {
  const allowInfinity = options.allowInfinity ?? false;
  const expected = describeExpected(kind, options.example ?? DEFAULT_EXAMPLE[kind], allowInfinity);
  const fail = (problem: QuantityProblem, detail: string): never => {
    throw new QuantityError(text, kind, problem, expected, detail);
  };

  if (typeof text !== 'string') {
    if (typeof text === 'number') {
      return fail('no-unit', `a bare number has no unit; write it as text with a unit, e.g. "${text} ${kind === 'angle' ? 'deg' : 'mm'}"`);
    }
    return fail('not-text', `a ${kind} is written as text, a number followed by a unit`);
  }
  const clean = normalizeQuantityText(text);
  if (clean === '') return fail('empty', 'the text is empty');
  if (INFINITY_WORD.test(clean)) {
    if (allowInfinity) return Number.POSITIVE_INFINITY;
    return fail('not-finite', `an infinite ${kind} is not allowed here`);
  }
  if (BARE_NUMBER.test(clean)) return fail('no-unit', `a bare number has no unit`);

  let unit: Unit;
  try {
    unit = math.Unit.parse(clean);
  } catch (err) {
    const message = err instanceof Error ? err.message : String(err);
    const unknownUnit = /^Unit "([^"]*)" not found/.exec(message);
    if (unknownUnit) return fail('syntax', `unit "${unknownUnit[1]}" is not known`);
    return fail('syntax', `it is not a number followed by a unit (${message})`);
  }
  // mathjs leaves the value null for a unit without a number ("mm").
  if ((unit.value as number | null) === null) return fail('no-number', 'there is a unit but no number');
  if (!unit.equalBase(REFERENCE[kind])) {
    return fail('wrong-dimension', `${quantityName(unit)}, not ${kind === 'angle' ? 'an' : 'a'} ${kind}`);
  }
  const valueSI = decimalValue(clean, unit) ?? unit.value;
  if (typeof valueSI !== 'number' || !Number.isFinite(valueSI)) return fail('not-finite', 'the value is not a finite number');
  return valueSI;
}

const LEADING_NUMBER = /^([+-]?)(\d+\.?\d*|\.\d+)(?:e([+-]?\d+))?/i;

/**
 * The power of ten p with 10^p = scale, when `scale` is one (to 1e-12); else undefined.
 * Units such as mm, um, nm, m, rad are decimal; deg and in are not.
 */
function decimalExponent(scale: number): number | undefined {
  if (!(scale > 0)) return undefined;
  const p = Math.round(Math.log10(scale));
  return Math.abs(10 ** p / scale - 1) < 1e-12 ? p : undefined;
}

/** The p for which one unit (e.g. "mm") is 10^p SI base units, when the unit is a single decimal unit; else undefined. */
function unitDecimalExponent(unit: Unit): number | undefined {
  if (unit.units.length !== 1) return undefined;
  const component = unit.units[0];
  if (component.power !== 1 || component.unit.offset !== 0) return undefined;
  // At run time the prefix is an object {name, value, scientific}; the published type says string.
  const prefixValue = (component.prefix as unknown as { value: number }).value;
  return decimalExponent(component.unit.value * prefixValue);
}

/**
 * For a number in a decimal unit ("632.8 nm"), the double nearest to the exact decimal value in SI
 * (Number("632.8e-9")), rather than mathjs' product 632.8 × 1e-9, which can be off by an ulp.
 * This makes formatQuantity's shortest decimals read back exactly. Undefined when not applicable.
 */
function decimalValue(clean: string, unit: Unit): number | undefined {
  const p = unitDecimalExponent(unit);
  if (p === undefined) return undefined;
  const match = LEADING_NUMBER.exec(clean);
  if (!match) return undefined;
  const exponent = (match[3] === undefined ? 0 : Number(match[3])) + p;
  const value = Number(`${match[1]}${match[2]}e${exponent}`);
  // Guard against any disagreement with mathjs' own reading of the text.
  const reference = unit.value;
  if (!Number.isFinite(value) || Math.abs(value - reference) > 1e-12 * Math.abs(reference)) return undefined;
  return value;
}

/**
 * The exact decimal text of x·10^(−p), from the shortest decimal that identifies x
 * (ECMAScript Number::toString), with the decimal point moved: shiftDecimal(2e-5, -3) === "0.02".
 */
function shiftDecimal(x: number, p: number): string {
  const match = /^(\d+)(?:\.(\d+))?(?:e([+-]\d+))?$/.exec(String(Math.abs(x)));
  if (!match) return String(x / 10 ** p);
  let digits = match[1] + (match[2] ?? '');
  let point = match[1].length + (match[3] === undefined ? 0 : Number(match[3])) - p;
  const leadingZeros = /^0*/.exec(digits)![0].length;
  digits = digits.slice(leadingZeros);
  point -= leadingZeros;
  digits = digits.replace(/0+$/, '');
  if (digits === '') return '0';
  const sign = x < 0 ? '-' : '';
  if (point > 21 || point < -6) {
    const mantissa = digits.length > 1 ? `${digits[0]}.${digits.slice(1)}` : digits;
    return `${sign}${mantissa}e${point - 1}`;
  }
  if (point <= 0) return `${sign}0.${'0'.repeat(-point)}${digits}`;
  if (point >= digits.length) return `${sign}${digits}${'0'.repeat(point - digits.length)}`;
  return `${sign}${digits.slice(0, point)}.${digits.slice(point)}`;
}

/** A length in metres, e.g. parseLength("5.5 µm") === 5.5e-6. A bare number is an error. */
export function parseLength(text: unknown, options: QuantityOptions = {}): number {
  return parseQuantity(text, 'length', options);
}

/** An angle in radians, e.g. parseAngle("90 deg") === π/2. A bare number is an error (degrees or radians?). */
export function parseAngle(text: unknown, options: QuantityOptions = {}): number {
  return parseQuantity(text, 'angle', options);
}

/**
 * Write an SI value as text in the given unit ("mm", "um", "nm", "m", "deg", "rad", ...), using the
 * fewest significant digits for which `parseQuantity` returns exactly `valueSI` again (for decimal
 * units, the digits of String(valueSI) with the decimal point moved). When no decimal
 * in that unit reproduces the value bit for bit, the value is written in the base unit (m or rad),
 * which always does. +Infinity is written "inf".
 */
export function formatQuantity(valueSI: number, unitText: string): string {
  const kind = kindOfUnit(unitText);
  if (valueSI === Number.POSITIVE_INFINITY) return 'inf';
  if (!Number.isFinite(valueSI)) throw new RangeError(`cannot write ${valueSI} as a ${kind}`);
  if (valueSI === 0) return `0 ${unitText}`;
  const p = unitDecimalExponent(math.Unit.parse(unitText));
  if (p !== undefined) {
    const text = `${shiftDecimal(valueSI, p)} ${unitText}`;
    if (parseQuantity(text, kind) === valueSI) return text;
  }
  const scale = math.Unit.parse(`1 ${unitText}`).value;
  const inUnit = valueSI / scale;
  for (let digits = 1; digits <= 17; digits++) {
    const candidate = `${Number(inUnit.toPrecision(digits))} ${unitText}`;
    if (parseQuantity(candidate, kind) === valueSI) return candidate;
  }
  return `${valueSI} ${BASE_UNIT_TEXT[kind]}`;
}

function kindOfUnit(unitText: string): QuantityKind {
  let unit: Unit;
  try {
    unit = math.Unit.parse(unitText);
  } catch {
    throw new RangeError(`unknown unit "${unitText}"`);
  }
  if (unit.equalBase(REFERENCE.length)) return 'length';
  if (unit.equalBase(REFERENCE.angle)) return 'angle';
  throw new RangeError(`"${unitText}" is neither a length nor an angle unit`);
}

/** "a time", "an area", "dimensionless" ... for the wrong-dimension message. */
function quantityName(unit: Unit): string {
  const dims = unit.dimensions;
  const names = ['mass', 'length', 'time', 'electric current', 'temperature', 'luminous intensity', 'amount of substance', 'angle', 'information'];
  const nonzero = dims.map((p, i) => [p, i] as const).filter(([p]) => p !== 0);
  const units = `"${unit.formatUnits()}"`;
  if (nonzero.length === 0) return `${units} is dimensionless`;
  if (nonzero.length === 1) {
    const [power, index] = nonzero[0];
    const name = names[index] ?? 'an unknown quantity';
    if (power === 1) return `${units} is a unit of ${name}`;
    if (index === 1 && power === 2) return `${units} is a unit of area`;
    if (index === 1 && power === 3) return `${units} is a unit of volume`;
    if (index === 2 && power === -1) return `${units} is a unit of frequency`;
  }
  return `${units} is a unit of another quantity`;
}

/** How a value is shown in messages: strings quoted, long values shortened. */
export function showValue(value: unknown): string {
  if (value === undefined) return 'missing';
  let text: string;
  try {
    text = JSON.stringify(value) ?? String(value);
  } catch {
    text = String(value);
  }
  return text.length > 80 ? `${text.slice(0, 77)}...` : text;
}
