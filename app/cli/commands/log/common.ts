/** Shared bits of the `shadowfront log` actions: the --db option, opening, small parsers. */
import { UsageError } from '../../output.ts';
import { openLogbook, type Logbook } from '../../../services/logbook/logbook.ts';
import { resolveLogbookPath } from '../../../services/logbook/paths.ts';

export const DB_OPTION = { db: { type: 'string' as const } };
export const HELP_OPTION = { help: { type: 'boolean' as const, short: 'h', default: false } };

export const DB_HELP = `  --db <file>             the logbook file (default: $SHADOWFRONT_DB, else the user data folder,
                          e.g. ~/.local/share/shadowfront/logbook.sqlite)`;

export function dbPath(db: string | undefined): string {
  return resolveLogbookPath(db).path;
}

/** Open, run, print warnings, close. */
export async function withLogbook<T>(db: string | undefined, write: boolean, command: string, fn: (lb: Logbook) => T | Promise<T>): Promise<T> {
  const lb = await openLogbook(dbPath(db), { write, command });
  try {
    const out = await fn(lb);
    printWarnings(lb.takeWarnings());
    return out;
  } finally {
    lb.close();
  }
}

export function printWarnings(warnings: readonly string[]): void {
  for (const w of warnings) process.stderr.write(`warning: ${w}\n`);
}

/** A measurement id: "12" or "#12". */
export function parseId(s: string | undefined, what = 'measurement id'): number {
  if (s === undefined) throw new UsageError(`missing the ${what}`);
  const m = /^#?(\d+)$/.exec(s.trim());
  if (!m || Number(m[1]) < 1) throw new UsageError(`${what} must be a whole number such as 12, not "${s}"`);
  return Number(m[1]);
}

/**
 * An RMS limit in waves: a number ("0.07"), or a fraction of the wavelength ("lambda/14", "λ/14", "1/14").
 */
export function parseWavesLimit(s: string | undefined, option: string): number | undefined {
  if (s === undefined) return undefined;
  const t = s.trim().toLowerCase().replace(/\s+/g, '');
  const frac = /^(?:λ|lambda|1)\/(\d+(?:\.\d+)?)$/.exec(t);
  const v = frac ? 1 / Number(frac[1]) : /^\d*\.?\d+(?:e-?\d+)?$/.test(t) ? Number(t) : NaN;
  if (!(v > 0 && v < 10)) throw new UsageError(`${option} must be a number of waves such as 0.0714 or a fraction such as lambda/14, not "${s}"`);
  return v;
}

export function parseFraction01(s: string | undefined, option: string): number | undefined {
  if (s === undefined) return undefined;
  const v = Number(s);
  if (!(s.trim() !== '' && v > 0 && v <= 1)) throw new UsageError(`${option} must be a number between 0 and 1 such as 0.8, not "${s}"`);
  return v;
}

export function parseCount(s: string | undefined, option: string, min: number): number | undefined {
  if (s === undefined) return undefined;
  const v = Number(s);
  if (!Number.isInteger(v) || v < min) throw new UsageError(`${option} must be a whole number, ${min} or more, not "${s}"`);
  return v;
}

/** "3,4,5" or "3-8" or a mix → ANSI indices. */
export function parseTerms(s: string | undefined): number[] | undefined {
  if (s === undefined) return undefined;
  const out: number[] = [];
  for (const part of s.split(',')) {
    const p = part.trim();
    const range = /^(\d+)-(\d+)$/.exec(p);
    if (range && Number(range[1]) <= Number(range[2])) for (let j = Number(range[1]); j <= Number(range[2]); j++) out.push(j);
    else if (/^\d+$/.test(p)) out.push(Number(p));
    else throw new UsageError(`--terms must list ANSI indices such as 3,4,5 or 3-8, not "${s}"`);
  }
  return [...new Set(out)].sort((a, b) => a - b);
}

export function requireNoPositionals(positionals: string[], action: string): void {
  if (positionals.length) throw new UsageError(`"log ${action}" takes no plain arguments, got "${positionals.join(' ')}"`);
}
