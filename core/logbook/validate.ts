/**
 * Check a fit result ("shadowfront-result/1", core/fit/result.ts) before it goes into the logbook.
 * Only the fields the logbook relies on are checked; everything else is stored as it came, so that
 * fields added by later versions survive.
 */
import { RESULT_FORMAT } from '../fit/result.ts';
import type { FitResult } from '../fit/result.ts';
import { LogbookDataError } from './errors.ts';

function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/**
 * Return `json` typed as a FitResult when the fields the logbook uses are present and sensible.
 * An uncertainty may be null (a fit that could not estimate it); values must be finite numbers.
 * @throws LogbookDataError naming the source, the field and what was expected.
 */
export function checkFitResult(json: unknown, sourceName = 'result'): FitResult {
  const fail = (field: string, expected: string, got?: unknown): never => {
    const shown = got === undefined ? 'missing' : `got ${JSON.stringify(got)?.slice(0, 60)}`;
    throw new LogbookDataError(`${sourceName}: field "${field}": expected ${expected}, ${shown}`);
  };
  if (!isObject(json)) {
    throw new LogbookDataError(`${sourceName}: expected a fit result, a JSON object with "format": "${RESULT_FORMAT}" (as written by "shadowfront fit --json")`);
  }
  if (json.format !== RESULT_FORMAT) {
    const hint =
      typeof json.format === 'string' && json.format.startsWith('shadowfront-')
        ? ` (this is a "${json.format}" file, not a fit result)`
        : '';
    throw new LogbookDataError(`${sourceName}: field "format": expected "${RESULT_FORMAT}", got ${JSON.stringify(json.format)}${hint}`);
  }
  const num = (obj: Record<string, unknown>, key: string, path: string, opts: { min?: number; max?: number; positive?: boolean; nullable?: boolean } = {}) => {
    const v = obj[key];
    if (v === null && opts.nullable) return;
    const what = opts.positive ? 'a positive number' : opts.min !== undefined ? `a number ≥ ${opts.min}` : 'a finite number';
    if (typeof v !== 'number' || !Number.isFinite(v)) fail(path, `${what}${opts.nullable ? ' (or null)' : ''}`, v);
    const x = v as number;
    if (opts.positive && !(x > 0)) fail(path, what, v);
    if (opts.min !== undefined && x < opts.min) fail(path, what, v);
    if (opts.max !== undefined && x > opts.max) fail(path, `a number ≤ ${opts.max}`, v);
  };
  if (typeof json.software !== 'string') fail('software', 'the name and version of the program that made it, e.g. "shadowfront 0.1.0"', json.software);
  num(json, 'wavelength_m', 'wavelength_m', { positive: true });
  if (!isObject(json.zernike)) fail('zernike', 'an object with radius_m, basis and terms', json.zernike);
  const z = json.zernike as Record<string, unknown>;
  num(z, 'radius_m', 'zernike.radius_m', { positive: true });
  if (!Array.isArray(z.terms)) fail('zernike.terms', 'a list of fitted terms', z.terms);
  const seen = new Set<number>();
  (z.terms as unknown[]).forEach((t, i) => {
    const p = `zernike.terms[${i}]`;
    if (!isObject(t)) fail(p, 'an object {j, name, waves, sigmaWaves, nm, sigmaNm}', t);
    const term = t as Record<string, unknown>;
    if (typeof term.j !== 'number' || !Number.isInteger(term.j) || term.j < 0) fail(`${p}.j`, 'an ANSI index (integer ≥ 0)', term.j);
    if (seen.has(term.j as number)) fail(`${p}.j`, 'each term once', term.j);
    seen.add(term.j as number);
    num(term, 'waves', `${p}.waves`);
    num(term, 'sigmaWaves', `${p}.sigmaWaves`, { min: 0, nullable: true });
  });
  num(json, 'rmsWaves', 'rmsWaves', { min: 0 });
  num(json, 'sigmaRmsWaves', 'sigmaRmsWaves', { min: 0, nullable: true });
  num(json, 'strehl', 'strehl', { min: 0, max: 1 });
  num(json, 'sigmaStrehl', 'sigmaStrehl', { min: 0, nullable: true });
  if (json.trusted !== undefined && typeof json.trusted !== 'boolean') fail('trusted', 'true or false', json.trusted);
  if (json.settings !== undefined && !isObject(json.settings)) fail('settings', 'an object (the solver settings)', json.settings);
  return json as unknown as FitResult;
}
