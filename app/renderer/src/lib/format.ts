/** Number and length formatting for people. Values arrive in SI units (metres); the text says the unit. */

/** A number with `sig` significant digits, plain (no exponent) between 1e-3 and 1e6; ASCII minus. */
export function fmtNum(v: number | null | undefined, sig = 4): string {
  if (v === null || v === undefined || Number.isNaN(v)) return '—';
  if (!Number.isFinite(v)) return v > 0 ? '∞' : '-∞';
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e-3 && a < 1e6) {
    const digits = Math.max(0, sig - 1 - Math.floor(Math.log10(a)));
    return v.toFixed(Math.min(digits, 12));
  }
  return v.toExponential(Math.max(0, sig - 1));
}

/** Decimal places that show `sigma` with two significant digits (at least 0, at most 9). */
export function decimalsFor(sigma: number): number {
  if (!(sigma > 0) || !Number.isFinite(sigma)) return 4;
  return Math.min(9, Math.max(0, 1 - Math.floor(Math.log10(sigma))));
}

/** "value ± sigma", both rounded so that sigma has two significant digits. */
export function fmtPm(value: number, sigma: number | null | undefined, fallbackDecimals = 4): string {
  if (sigma === null || sigma === undefined || !Number.isFinite(sigma)) return `${fmtNum(value, 4)} ± ?`;
  const d = sigma > 0 ? decimalsFor(sigma) : fallbackDecimals;
  return `${value.toFixed(d)} ± ${sigma.toFixed(d)}`;
}

const LENGTH_UNITS: [number, string][] = [
  [1, 'm'],
  [1e-3, 'mm'],
  [1e-6, 'µm'],
  [1e-9, 'nm'],
];

/** A length in metres, in the largest unit that keeps the number at or above 1. */
export function fmtLength(m: number | null | undefined, sig = 4): string {
  if (m === null || m === undefined || Number.isNaN(m)) return '—';
  if (!Number.isFinite(m)) return m > 0 ? '∞' : '-∞';
  const a = Math.abs(m);
  const [f, u] = LENGTH_UNITS.find(([f]) => a >= f) ?? LENGTH_UNITS[LENGTH_UNITS.length - 1]!;
  return `${fmtNum(m / f, sig)} ${u}`;
}

/** A fraction as a percentage. */
export function fmtPercent(x: number, decimals = 1): string {
  return `${(100 * x).toFixed(decimals)} %`;
}

/** A short tick label: at most about 5 characters where possible. */
export function fmtTick(v: number): string {
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e4 || a < 1e-2) return v.toExponential(0).replace('e+', 'e');
  if (a >= 100) return v.toFixed(0);
  if (a >= 10) return String(Math.round(v * 10) / 10);
  return String(Math.round(v * 1000) / 1000);
}
