/**
 * Setups for the logbook: read and check a setup file, or turn an SI setup into the file form that
 * the logbook stores. Kept apart from logbook.ts because the unit parser it needs takes a moment to
 * load, and most logbook commands do not need it.
 */
import type { BenchSetup } from '../../../core/setup/types.ts';
import { parseSetup, setupToJson } from '../../../core/setup/parseSetup.ts';
import { readJson } from '../files.ts';

export interface LogbookSetup {
  /** What the logbook stores: the file's JSON ("shadowfront-setup/1"), verbatim. */
  json: unknown;
  /** The same in SI units. */
  bench: BenchSetup;
}

/** Read and check a setup file (errors name the file, the field and what was expected). */
export function readSetupFile(path: string): LogbookSetup {
  const json = readJson(path);
  return { json, bench: parseSetup(json, path) };
}

/** The file form of an SI setup (every field explicit). */
export function setupFromBench(bench: BenchSetup, note?: string): LogbookSetup {
  return { json: setupToJson(bench, note !== undefined ? { note } : {}), bench };
}
