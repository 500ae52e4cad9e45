/**
 * Turning an asset's Trend (core/logbook/trend.ts) into the column arrays a chart draws: one shared
 * time axis for every series of the trend, values with gaps (null) where a series has no point, the
 * ±1σ error-bar ends, the flagged points, and the limit lines (the user's limit and the control
 * limits of the individuals chart). Pure: no DOM, no chart library; the chart wrapper
 * (charts/TrendChart.tsx) only hands these arrays to uPlot.
 */
import type { Trend, TrendSeries, TrendRule } from '../../../../core/logbook/trend.ts';
import { ruleCode } from '../../../../core/logbook/trend.ts';

/** The shared x axis: every measurement in the trend, in the trend's own order (time, then id). */
export interface TrendAxis {
  measurementIds: number[];
  takenAt: string[];
  /** Seconds since 1970 (UTC), strictly increasing (see trendAxis). */
  xs: number[];
  /** The x range to show: the points plus 4 % of the span on each side (a day each side for a single point), so edge markers are whole. */
  xRange: [number, number];
}

export type LimitRole = 'user-limit' | 'centre' | 'ucl' | 'lcl';

/** A horizontal line across the chart: the same value at every x. */
export interface LimitLine {
  role: LimitRole;
  label: string;
  value: number;
  values: number[];
}

export interface TrendChartData {
  key: string;
  title: string;
  /** Axis label: "waves" or "" (Strehl ratio). */
  unit: string;
  xs: number[];
  xRange: [number, number];
  measurementIds: number[];
  /** The measured value at each x, null where this series has no point (a gap in the line). */
  value: (number | null)[];
  sigma: (number | null)[];
  /** value − σ and value + σ, null where either is missing. */
  lo: (number | null)[];
  hi: (number | null)[];
  /** The value where the point is flagged (a limit or a run rule), null elsewhere. */
  flagged: (number | null)[];
  /** Short rule codes per x (L = user limit, N1… = Nelson tests, MR = moving-range jump). */
  flagCodes: string[][];
  limits: LimitLine[];
  /** y range that shows every value with its error bar and every limit line, padded by 5 %. */
  yRange: [number, number];
  /** Number of points that were flagged. */
  flaggedCount: number;
}

/**
 * The shared axis of a trend. Measurements at the same second (or a clock that went backwards in the
 * records) are spread 1 s apart, because a chart's time axis must increase strictly; the order is the
 * trend's own (time, then measurement id).
 * @throws Error naming the measurement when its time cannot be read
 */
export function trendAxis(trend: Trend): TrendAxis {
  const seen = new Map<number, string>();
  for (const s of trend.series) for (const p of s.points) if (!seen.has(p.measurementId)) seen.set(p.measurementId, p.takenAt);
  const entries = [...seen.entries()].sort((x, y) => (x[1] < y[1] ? -1 : x[1] > y[1] ? 1 : x[0] - y[0]));
  const xs: number[] = [];
  for (const [id, at] of entries) {
    const ms = Date.parse(at);
    if (!Number.isFinite(ms)) throw new Error(`measurement #${id}: its time "${at}" is not a date and time the chart can place`);
    let x = ms / 1000;
    if (xs.length && x <= xs[xs.length - 1]) x = xs[xs.length - 1] + 1;
    xs.push(x);
  }
  let xRange: [number, number] = [0, 1];
  if (xs.length) {
    const span = xs[xs.length - 1] - xs[0];
    const pad = span > 0 ? 0.04 * span : 86400;
    xRange = [xs[0] - pad, xs[xs.length - 1] + pad];
  }
  return { measurementIds: entries.map((e) => e[0]), takenAt: entries.map((e) => e[1]), xs, xRange };
}

const LIMIT_LABEL: Record<LimitRole, string> = {
  'user-limit': 'limit',
  centre: 'centre line',
  ucl: 'upper control limit',
  lcl: 'lower control limit',
};

/** One series of a trend on the shared axis. */
export function trendChartData(series: TrendSeries, axis: TrendAxis): TrendChartData {
  const n = axis.xs.length;
  const at = new Map(axis.measurementIds.map((id, i) => [id, i]));
  const value: (number | null)[] = new Array(n).fill(null);
  const sigma: (number | null)[] = new Array(n).fill(null);
  const flagged: (number | null)[] = new Array(n).fill(null);
  const flagCodes: string[][] = Array.from({ length: n }, () => []);
  let flaggedCount = 0;
  for (const p of series.points) {
    const i = at.get(p.measurementId);
    if (i === undefined) throw new Error(`measurement #${p.measurementId} of "${series.label}" is not on the trend's axis`);
    value[i] = Number.isFinite(p.value) ? p.value : null;
    sigma[i] = p.sigma !== null && Number.isFinite(p.sigma) ? p.sigma : null;
    if (p.flags.length && value[i] !== null) {
      flagged[i] = value[i];
      flagCodes[i] = [...new Set(p.flags.map((f: TrendRule) => ruleCode(f)))];
      flaggedCount++;
    }
  }
  const lo = value.map((v, i) => (v !== null && sigma[i] !== null ? v - (sigma[i] as number) : null));
  const hi = value.map((v, i) => (v !== null && sigma[i] !== null ? v + (sigma[i] as number) : null));

  const limits: LimitLine[] = [];
  const line = (role: LimitRole, v: number, label = LIMIT_LABEL[role]) => {
    if (Number.isFinite(v)) limits.push({ role, label, value: v, values: new Array(n).fill(v) });
  };
  if (series.userLimit) line('user-limit', series.userLimit.value, series.userLimit.kind === 'max' ? 'limit (at most)' : 'floor (at least)');
  if (series.limits && series.limits.sigma > 0) {
    line('centre', series.limits.center);
    line('ucl', series.limits.ucl);
    line('lcl', series.limits.lcl);
  }

  const all: number[] = [];
  value.forEach((v, i) => {
    if (v === null) return;
    all.push(lo[i] ?? v, hi[i] ?? v);
  });
  for (const l of limits) all.push(l.value);
  return {
    key: series.key,
    title: series.label,
    unit: series.unit,
    xs: axis.xs,
    xRange: axis.xRange,
    measurementIds: axis.measurementIds,
    value,
    sigma,
    lo,
    hi,
    flagged,
    flagCodes,
    limits,
    yRange: paddedRange(all),
    flaggedCount,
  };
}

/** Every series of a trend on one shared axis: RMS, Strehl, then the coefficients by j (the trend's order). */
export function trendCharts(trend: Trend): TrendChartData[] {
  const axis = trendAxis(trend);
  return trend.series.map((s) => trendChartData(s, axis));
}

/**
 * [min, max] of the values, widened by 5 % of the span on each side. A single value (or none) gets a
 * span of 10 % of its size, or ±0.01 around zero, so the chart never has an empty y range.
 */
export function paddedRange(values: readonly number[]): [number, number] {
  const finite = values.filter((v) => Number.isFinite(v));
  if (!finite.length) return [-0.01, 0.01];
  let lo = Math.min(...finite);
  let hi = Math.max(...finite);
  if (hi - lo <= 0) {
    const half = Math.abs(hi) > 0 ? Math.abs(hi) * 0.1 : 0.01;
    return [lo - half, hi + half];
  }
  const pad = (hi - lo) * 0.05;
  lo -= pad;
  hi += pad;
  return [lo, hi];
}

/**
 * Decimals that label ticks spaced by `incr` exactly and alike: the fewest that write the step itself
 * without rounding (0.01 → 2, 0.005 → 3, 0.025 → 3, 0.2 → 1, 20 → 0), at most 8.
 */
export function tickDecimals(incr: number): number {
  if (!(incr > 0) || !Number.isFinite(incr)) return 3;
  for (let d = Math.max(0, Math.ceil(-Math.log10(incr) - 1e-9)); d < 8; d++) {
    const scaled = incr * 10 ** d;
    if (Math.abs(scaled - Math.round(scaled)) < 1e-6 * Math.max(1, scaled)) return d;
  }
  return 8;
}
