/**
 * Reading the JSON of a setup or scene file field by field, with errors that name the file, the field
 * path, the value found and what was expected. Pure: no Node built-ins.
 */
import { parseQuantity, QuantityError, showValue } from '../units/parseQuantity.ts';
import type { QuantityKind } from '../units/parseQuantity.ts';

export type SetupFieldProblem = 'invalid' | 'missing' | 'unknown';

/**
 * A field of a setup or scene file that is missing, unknown or has a value that cannot be used.
 * Message forms:
 *   setup.json: field "beam.radius" is "4 parsecs"; expected a length such as "4 mm" (unit "parsecs" is not known)
 *   setup.json: field "camera.distance" is missing; expected a length such as "800 mm"
 *   setup.json: field "beam.radus" is not a known field (its value is "4 mm"); did you mean "beam.radius"? Expected one of the fields of "beam": ...
 */
export class SetupFieldError extends Error {
  /** The file name or source given to the parser, e.g. "setup.json". */
  readonly file: string;
  /** Dotted field path, array items as [i]: "beam.center[1]", "disc.edgeHarmonics[0].order". "" is the whole file. */
  readonly path: string;
  /** The value found (undefined when missing). */
  readonly value: unknown;
  /** What would have been accepted. */
  readonly expected: string;
  readonly problem: SetupFieldProblem;
  /** Extra explanation, e.g. 'unit "parsecs" is not known'. */
  readonly detail?: string;
  /** For unknown fields: the known field path that is closest to what was written. */
  readonly suggestion?: string;

  constructor(args: {
    file: string;
    path: string;
    value: unknown;
    expected: string;
    problem?: SetupFieldProblem;
    detail?: string;
    suggestion?: string;
  }) {
    const problem = args.problem ?? 'invalid';
    super(buildMessage(args.file, args.path, args.value, args.expected, problem, args.detail, args.suggestion));
    this.name = 'SetupFieldError';
    this.file = args.file;
    this.path = args.path;
    this.value = args.value;
    this.expected = args.expected;
    this.problem = problem;
    if (args.detail !== undefined) this.detail = args.detail;
    if (args.suggestion !== undefined) this.suggestion = args.suggestion;
  }
}

function buildMessage(
  file: string,
  path: string,
  value: unknown,
  expected: string,
  problem: SetupFieldProblem,
  detail: string | undefined,
  suggestion: string | undefined,
): string {
  const where = path === '' ? 'the file content' : `field "${path}"`;
  if (problem === 'missing') return `${file}: ${where} is missing; expected ${expected}`;
  if (problem === 'unknown') {
    const hint = suggestion !== undefined ? `; did you mean "${suggestion}"? Expected` : '; expected';
    return `${file}: ${where} is not a known field (its value is ${showValue(value)})${hint} ${expected}${detail ? ` (${detail})` : ''}`;
  }
  return `${file}: ${where} is ${showValue(value)}; expected ${expected}${detail ? ` (${detail})` : ''}`;
}

/** A field looked up in its parent object. */
export interface Field {
  value: unknown;
  path: string;
  present: boolean;
}

export function childPath(parent: string, key: string | number): string {
  if (typeof key === 'number') return `${parent}[${key}]`;
  return parent === '' ? key : `${parent}.${key}`;
}

export function isPlainObject(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

/**
 * Restricted Damerau–Levenshtein (optimal string alignment) distance: insertions, deletions,
 * substitutions and swaps of adjacent characters each cost 1.
 */
export function editDistance(a: string, b: string): number {
  const rows = a.length + 1;
  const cols = b.length + 1;
  const d: number[][] = Array.from({ length: rows }, (_, i) => Array.from({ length: cols }, (_, j) => (i === 0 ? j : j === 0 ? i : 0)));
  for (let i = 1; i < rows; i++) {
    for (let j = 1; j < cols; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      let best = Math.min(d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) best = Math.min(best, d[i - 2][j - 2] + 1);
      d[i][j] = best;
    }
  }
  return d[a.length][b.length];
}

/** Normalised form for comparing field names: lower case, without "_", "-" and blanks. */
function fold(name: string): string {
  return name.toLowerCase().replace(/[_\-\s]/g, '');
}

/** The candidate closest to `name`, when it is close enough to be a likely typo; else undefined. */
export function closestName(name: string, candidates: readonly string[]): string | undefined {
  const target = fold(name);
  let best: string | undefined;
  let bestDistance = Number.POSITIVE_INFINITY;
  for (const candidate of candidates) {
    const distance = editDistance(target, fold(candidate));
    if (distance < bestDistance) {
      best = candidate;
      bestDistance = distance;
    }
  }
  if (best === undefined) return undefined;
  const limit = Math.max(1, Math.min(3, Math.floor(Math.max(target.length, fold(best).length) / 4)));
  return bestDistance <= limit ? best : undefined;
}

export class FieldReader {
  readonly file: string;
  /** Every field path the format knows, used to suggest where a misplaced field belongs. */
  private readonly allPaths: readonly string[];

  constructor(file: string, allPaths: readonly string[]) {
    this.file = file;
    this.allPaths = allPaths;
  }

  fail(field: Pick<Field, 'path' | 'value'>, expected: string, detail?: string): never {
    throw new SetupFieldError({ file: this.file, path: field.path, value: field.value, expected, ...(detail !== undefined ? { detail } : {}) });
  }

  missing(field: Pick<Field, 'path'>, expected: string): never {
    throw new SetupFieldError({ file: this.file, path: field.path, value: undefined, expected, problem: 'missing' });
  }

  /** Look up `key` in `parent`, an object already checked by `object`. */
  at(parent: Record<string, unknown>, key: string, parentPath: string): Field {
    const present = Object.prototype.hasOwnProperty.call(parent, key);
    return { value: present ? parent[key] : undefined, path: childPath(parentPath, key), present };
  }

  /**
   * Check that the field is a JSON object whose keys are all in `known`; return it.
   * `hints` gives an explanation for particular unknown keys (e.g. a scene-only field in a setup file).
   */
  object(field: Field, known: readonly string[], example: string, hints: Record<string, string> = {}): Record<string, unknown> {
    if (!field.present) this.missing(field, `an object such as ${example}`);
    if (!isPlainObject(field.value)) this.fail(field, `an object such as ${example}`);
    const obj = field.value;
    for (const key of Object.keys(obj)) {
      if (known.includes(key)) continue;
      const path = childPath(field.path, key);
      const near = closestName(key, known);
      let suggestion = near !== undefined ? childPath(field.path, near) : undefined;
      if (suggestion === undefined) {
        // A known field in the wrong place, or a typo of one: suggest its full path.
        const leafOf = (p: string) => p.slice(p.lastIndexOf('.') + 1);
        const elsewhere = closestName(key, this.allPaths.map(leafOf));
        if (elsewhere !== undefined) suggestion = this.allPaths.find((p) => leafOf(p) === elsewhere);
      }
      const owner = field.path === '' ? 'the top level' : `"${field.path}"`;
      throw new SetupFieldError({
        file: this.file,
        path,
        value: obj[key],
        problem: 'unknown',
        expected: `one of the fields of ${owner}: ${known.map((k) => `"${k}"`).join(', ')}`,
        ...(hints[key] !== undefined ? { detail: hints[key] } : {}),
        ...(suggestion !== undefined ? { suggestion } : {}),
      });
    }
    return obj;
  }

  /** A quantity with a unit; absent → `fallback`, or a "missing" error when there is no fallback. */
  quantity(field: Field, kind: QuantityKind, example: string, fallback?: number, allowInfinity = false): number {
    if (!field.present) {
      if (fallback !== undefined) return fallback;
      this.missing(field, `${kind === 'angle' ? 'an' : 'a'} ${kind} such as "${example}"`);
    }
    try {
      return parseQuantity(field.value, kind, { example, allowInfinity });
    } catch (err) {
      if (err instanceof QuantityError) this.fail(field, err.expected, err.detail);
      throw err;
    }
  }

  length(field: Field, example: string, fallback?: number): number {
    return this.quantity(field, 'length', example, fallback);
  }

  /** A length that must be > 0. */
  positiveLength(field: Field, example: string, fallback?: number): number {
    const valueM = this.length(field, example, fallback);
    if (!(valueM > 0)) this.fail(field, `a positive length such as "${example}"`);
    return valueM;
  }

  angle(field: Field, example: string, fallback?: number): number {
    return this.quantity(field, 'angle', example, fallback);
  }

  /** A pair of lengths [x, y]. */
  lengthPair(field: Field, example: [string, string], fallback?: [number, number]): [number, number] {
    const expected = `a pair of lengths [x, y] such as ["${example[0]}", "${example[1]}"]`;
    if (!field.present) {
      if (fallback !== undefined) return [fallback[0], fallback[1]];
      this.missing(field, expected);
    }
    if (!Array.isArray(field.value) || field.value.length !== 2) this.fail(field, expected);
    const items = field.value as unknown[];
    return [0, 1].map((i) => this.length({ value: items[i], path: childPath(field.path, i), present: true }, example[i])) as [number, number];
  }

  /** A plain JSON number (finite), optionally within [min, max] and an integer. */
  number(
    field: Field,
    spec: { example: string; what?: string; min?: number; max?: number; minExclusive?: boolean; maxExclusive?: boolean; integer?: boolean },
    fallback?: number,
  ): number {
    const what = spec.what ?? (spec.integer ? 'an integer' : 'a number');
    const range = describeRange(spec.min, spec.max, spec.minExclusive ?? false, spec.maxExclusive ?? false);
    const expected = `${what}${range}, such as ${spec.example}`;
    if (!field.present) {
      if (fallback !== undefined) return fallback;
      this.missing(field, expected);
    }
    const value = field.value;
    if (typeof value !== 'number' || !Number.isFinite(value)) {
      const detail = typeof value === 'string' ? 'write it as a JSON number, without quotes or unit' : undefined;
      this.fail(field, expected, detail);
    }
    if (spec.integer && !Number.isInteger(value)) this.fail(field, expected, 'it is not an integer');
    if (spec.min !== undefined && (spec.minExclusive ? !(value > spec.min) : !(value >= spec.min))) this.fail(field, expected);
    if (spec.max !== undefined && (spec.maxExclusive ? !(value < spec.max) : !(value <= spec.max))) this.fail(field, expected);
    return value;
  }

  /** A string from a fixed list. */
  choice<T extends string>(field: Field, choices: readonly T[], fallback?: T): T {
    const expected = `one of ${choices.map((c) => `"${c}"`).join(', ')}`;
    if (!field.present) {
      if (fallback !== undefined) return fallback;
      this.missing(field, expected);
    }
    if (typeof field.value !== 'string' || !(choices as readonly string[]).includes(field.value)) {
      const near = typeof field.value === 'string' ? closestName(field.value, choices) : undefined;
      this.fail(field, expected, near !== undefined ? `did you mean "${near}"?` : undefined);
    }
    return field.value as T;
  }
}

function describeRange(min: number | undefined, max: number | undefined, minExclusive: boolean, maxExclusive: boolean): string {
  const low = min === undefined ? '' : minExclusive ? `greater than ${min}` : `at least ${min}`;
  const high = max === undefined ? '' : maxExclusive ? `less than ${max}` : `at most ${max}`;
  if (low && high) return !minExclusive && !maxExclusive ? ` from ${min} to ${max}` : ` ${low} and ${high}`;
  if (low) return ` ${low}`;
  if (high) return ` ${high}`;
  return '';
}
