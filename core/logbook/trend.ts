/**
 * The health of one asset over time: every coefficient, the RMS wavefront error and the Strehl ratio
 * per measurement with their 1σ, user limits (e.g. RMS ≤ λ/14, a Strehl floor) and statistical
 * control limits from a baseline period (Shewhart individuals chart, ./controlChart.ts), with the
 * points that break a limit or a run rule flagged.
 */
import type { AnalysedMeasurement } from './types.ts';
import type { Better } from './compare.ts';
import { individualsLimits, runRules, RULES } from './controlChart.ts';
import type { IndividualsLimits, RuleId } from './controlChart.ts';
import { zernikeName } from '../zernike/index.ts';

/** Baseline length used when none is given: the first 20 points (or all, when there are fewer). */
export const DEFAULT_BASELINE = 20;
/** Fewer baseline points than this give rough limits (20–25 are usual: common practice, no single published source). */
export const RECOMMENDED_BASELINE = 20;
/** The Maréchal criterion, RMS ≤ λ/14 (Strehl ≈ 0.8), a common choice of limit. */
export const MARECHAL_RMS_WAVES = 1 / 14;

export interface TrendOptions {
  /** Number of first points that set the control limits. Default: min(20, number of points). */
  baseline?: number;
  /** RMS above this (waves) is flagged. */
  limitRmsWaves?: number | null;
  /** Strehl below this is flagged. */
  limitStrehl?: number | null;
}

export type TrendRule = RuleId | 'user-limit';

export interface TrendPoint {
  measurementId: number;
  resultId: number;
  takenAt: string;
  tags: string[];
  value: number;
  sigma: number | null;
  /** Rules this point takes part in. */
  flags: TrendRule[];
}

export interface TrendSignal {
  seriesKey: string;
  seriesLabel: string;
  rule: TrendRule;
  /** Indices into the series' points. */
  indices: number[];
  measurementIds: number[];
  /** Time of the last point of the pattern. */
  takenAt: string;
  message: string;
}

export interface TrendSeries {
  /** "rms", "strehl" or "z<j>". */
  key: string;
  label: string;
  j: number | null;
  unit: 'waves' | '';
  better: Better;
  points: TrendPoint[];
  limits: IndividualsLimits | null;
  userLimit: { kind: 'max' | 'min'; value: number } | null;
  signals: TrendSignal[];
}

export interface Trend {
  assetName: string;
  /** Points of the baseline period (the first ones in time). */
  baselineCount: number;
  series: TrendSeries[];
  /** All signals of all series, in time order of their last point. */
  signals: TrendSignal[];
  notes: string[];
}

function fmt(v: number): string {
  return Math.abs(v) >= 0.01 || v === 0 ? v.toFixed(4) : v.toExponential(3);
}

/** Plain words for a run-rule signal, with its source. */
function signalText(rule: RuleId, direction: 'above' | 'below' | 'up' | 'down', points: number): string {
  const side = direction === 'above' ? 'above' : 'below';
  const refs = `Nelson test ${RULES[rule].nelson}${RULES[rule].westernElectric ? `; Western Electric rule ${RULES[rule].westernElectric}` : ''}`;
  switch (rule) {
    case 'beyond-limits':
      return `beyond the ${direction === 'above' ? 'upper' : 'lower'} 3σ control limit (${refs})`;
    case 'nine-same-side':
      return `${points} points in a row ${side} the centre line, a shift (${refs})`;
    case 'six-trend':
      return `drift: ${points} points in a row steadily ${direction === 'up' ? 'rising' : 'falling'} (${refs})`;
    case 'two-of-three-beyond-2-sigma':
      return `two of three points in a row more than 2σ ${side} the centre line (${refs})`;
    case 'four-of-five-beyond-1-sigma':
      return `four of five points in a row more than 1σ ${side} the centre line (${refs})`;
    case 'moving-range':
      return `a jump ${direction} between consecutive measurements larger than the moving-range limit 3.267·MR̄`;
  }
}

function buildSeries(
  key: string,
  label: string,
  j: number | null,
  unit: 'waves' | '',
  better: Better,
  points: TrendPoint[],
  baseline: number,
  userLimit: TrendSeries['userLimit'],
): TrendSeries {
  const values = points.map((p) => p.value);
  const k = Math.min(baseline, values.length);
  const limits = k >= 2 ? individualsLimits(values.slice(0, k)) : null;
  const signals: TrendSignal[] = [];
  const mark = (rule: TrendRule, indices: number[], message: string) => {
    for (const i of indices) if (!points[i].flags.includes(rule)) points[i].flags.push(rule);
    signals.push({ seriesKey: key, seriesLabel: label, rule, indices, measurementIds: indices.map((i) => points[i].measurementId), takenAt: points[indices[indices.length - 1]].takenAt, message });
  };
  if (userLimit) {
    points.forEach((p, i) => {
      if (userLimit.kind === 'max' ? p.value > userLimit.value : p.value < userLimit.value) {
        mark('user-limit', [i], `${label} ${fmt(p.value)}${unit ? ` ${unit}` : ''} is ${userLimit.kind === 'max' ? 'above the limit' : 'below the floor'} ${fmt(userLimit.value)}`);
      }
    });
  }
  if (limits && limits.sigma > 0) {
    for (const s of runRules(values, limits)) {
      mark(s.rule, s.indices, `${label}: ${signalText(s.rule, s.direction, s.indices.length)}`);
    }
  }
  return { key, label, j, unit, better, points, limits, userLimit, signals };
}

/** Build the trend of one asset from its measurements (any order; sorted by time here). */
export function buildTrend(assetName: string, measurements: readonly AnalysedMeasurement[], options: TrendOptions = {}): Trend {
  const untrusted = measurements.filter((m) => m.result.trusted === false);
  const ms = measurements.filter((m) => m.result.trusted !== false).sort((x, y) => (x.takenAt < y.takenAt ? -1 : x.takenAt > y.takenAt ? 1 : x.id - y.id));
  const notes: string[] = [];
  if (untrusted.length) {
    notes.push(`Left out, because their fits are marked untrusted (stopped in a wrong minimum): ${untrusted.map((m) => `#${m.id}`).join(', ')}. Re-analyse them to include them.`);
  }
  const baseline = options.baseline ?? DEFAULT_BASELINE;
  if (!Number.isInteger(baseline) || baseline < 2) throw new RangeError(`the baseline must be a whole number of measurements, 2 or more, not ${baseline}`);
  const k = Math.min(baseline, ms.length);
  if (ms.length < 2) notes.push('Fewer than two measurements: no control limits.');
  else {
    notes.push(`Control limits from the first ${k} measurement${k === 1 ? '' : 's'} (baseline period${k < ms.length ? `, up to ${ms[k - 1].takenAt}` : ''}).`);
    if (k < RECOMMENDED_BASELINE) notes.push(`The baseline has only ${k} points, so the limits are rough; 20–25 points are usual (common practice).`);
  }
  const point = (m: AnalysedMeasurement, value: number, sigma: number | null): TrendPoint => ({
    measurementId: m.id,
    resultId: m.resultId,
    takenAt: m.takenAt,
    tags: [...m.tags],
    value,
    sigma,
    flags: [],
  });

  const series: TrendSeries[] = [];
  const rmsLimit = options.limitRmsWaves ?? null;
  const strehlLimit = options.limitStrehl ?? null;
  series.push(
    buildSeries('rms', 'RMS wavefront error', null, 'waves', 'lower', ms.map((m) => point(m, m.result.rmsWaves, m.result.sigmaRmsWaves)), baseline, rmsLimit !== null ? { kind: 'max', value: rmsLimit } : null),
  );
  series.push(
    buildSeries('strehl', 'Strehl ratio', null, '', 'higher', ms.map((m) => point(m, m.result.strehl, m.result.sigmaStrehl)), baseline, strehlLimit !== null ? { kind: 'min', value: strehlLimit } : null),
  );
  const js = [...new Set(ms.flatMap((m) => m.result.zernike.terms.map((t) => t.j)))].sort((a, b) => a - b);
  for (const j of js) {
    const pts: TrendPoint[] = [];
    for (const m of ms) {
      const t = m.result.zernike.terms.find((q) => q.j === j);
      if (t) pts.push(point(m, t.waves, t.sigmaWaves));
    }
    if (pts.length < ms.length) notes.push(`${zernikeName(j)} (j=${j}) was fitted in ${pts.length} of ${ms.length} measurements.`);
    series.push(buildSeries(`z${j}`, `${zernikeName(j)} (j=${j})`, j, 'waves', 'smaller magnitude', pts, baseline, null));
  }
  for (const s of series) if (s.limits && !(s.limits.sigma > 0)) notes.push(`${s.label}: the baseline values do not vary, so no run rules apply.`);
  const wavelengths = new Set(ms.map((m) => m.result.wavelength_m.toPrecision(6)));
  if (wavelengths.size > 1) notes.push('The results are at different wavelengths; values in waves are not directly comparable.');
  const signals = series
    .flatMap((s) => s.signals)
    .sort((x, y) => (x.takenAt < y.takenAt ? -1 : x.takenAt > y.takenAt ? 1 : 0));
  return { assetName, baselineCount: ms.length >= 2 ? k : 0, series, signals, notes };
}

/** Short code of a rule, for tables: L = user limit, N1/N2/N3/N5/N6 = Nelson tests, MR = moving-range jump. */
export function ruleCode(rule: TrendRule): string {
  if (rule === 'user-limit') return 'L';
  if (rule === 'moving-range') return 'MR';
  return `N${RULES[rule].nelson}`;
}
