/**
 * The logbook's trend charts: a Trend (core/logbook/trend.ts) reshaped into chart columns.
 * The inputs are synthetic fit results (test/logbook/helpers.ts); the checks are of the reshaping —
 * a shared time axis, gaps where a term was not fitted, ±1σ bar ends, flagged points and limit lines —
 * plus the individuals-chart limits as the NIST/SEMATECH e-Handbook §6.3.2.2 defines them
 * (x̄ ± 3·MR̄/d2, d2 = 1.128 for moving ranges of two).
 */
import { describe, expect, it } from 'vitest';
import { buildTrend } from '../../core/logbook/trend.ts';
import type { AnalysedMeasurement } from '../../core/logbook/types.ts';
import { paddedRange, tickDecimals, trendAxis, trendChartData, trendCharts } from '../../app/renderer/src/lib/trendSeries.ts';
import { syntheticResult } from '../logbook/helpers.ts';

function m(id: number, takenAt: string, terms: Record<number, number>, tags: string[] = []): AnalysedMeasurement {
  return { id, takenAt, assetName: 'bench laser', tags, resultId: 100 + id, result: syntheticResult({ terms, sigma: 0.002 }) };
}

// Weekly measurements; #3 did not fit spherical (j = 12); #5 has the same time as #4.
const weekly: AnalysedMeasurement[] = [
  m(1, '2025-01-06T09:00:00Z', { 4: 0.08, 5: 0.12, 12: 0.01 }),
  m(2, '2025-01-13T09:00:00Z', { 4: 0.081, 5: 0.121, 12: 0.011 }),
  m(3, '2025-01-20T09:00:00Z', { 4: 0.079, 5: 0.119 }),
  m(4, '2025-01-27T09:00:00Z', { 4: 0.082, 5: 0.122, 12: 0.012 }),
  m(5, '2025-01-27T09:00:00Z', { 4: 0.08, 5: 0.25, 12: 0.01 }),
];

describe('trendAxis', () => {
  it('puts every measurement on one strictly increasing time axis, in the trend order', () => {
    const trend = buildTrend('bench laser', weekly, { baseline: 3 });
    const axis = trendAxis(trend);
    expect(axis.measurementIds).toEqual([1, 2, 3, 4, 5]);
    expect(axis.xs[0]).toBe(Date.UTC(2025, 0, 6, 9) / 1000);
    for (let i = 1; i < axis.xs.length; i++) expect(axis.xs[i]).toBeGreaterThan(axis.xs[i - 1]);
    // #4 and #5 share a time: #5 is placed one second later.
    expect(axis.xs[4] - axis.xs[3]).toBe(1);
    // The shown range holds every point with a margin.
    expect(axis.xRange[0]).toBeLessThan(axis.xs[0]);
    expect(axis.xRange[1]).toBeGreaterThan(axis.xs[4]);
  });

  it('names the measurement whose time cannot be read', () => {
    const trend = buildTrend('bench laser', [m(7, 'last tuesday', { 4: 0.1 }), m(8, '2025-02-01T00:00:00Z', { 4: 0.1 })]);
    expect(() => trendAxis(trend)).toThrow(/#7.*last tuesday/);
  });
});

describe('trendChartData', () => {
  const trend = buildTrend('bench laser', weekly, { baseline: 3, limitRmsWaves: 1 / 14 });
  const charts = trendCharts(trend);
  const byKey = new Map(charts.map((c) => [c.key, c]));

  it('gives one chart per series, RMS and Strehl first, then the coefficients by j', () => {
    expect(charts.map((c) => c.key)).toEqual(['rms', 'strehl', 'z4', 'z5', 'z12']);
    for (const c of charts) {
      expect(c.xs.length).toBe(5);
      expect(c.value.length).toBe(5);
      expect(c.lo.length).toBe(5);
      expect(c.flagged.length).toBe(5);
    }
  });

  it('leaves a gap (null) where a term was not fitted, and nowhere else', () => {
    const z12 = byKey.get('z12')!;
    expect(z12.value[2]).toBeNull();
    expect(z12.lo[2]).toBeNull();
    expect(z12.hi[2]).toBeNull();
    expect(z12.value.filter((v) => v === null).length).toBe(1);
    expect(byKey.get('z5')!.value.every((v) => v !== null)).toBe(true);
  });

  it('puts the error-bar ends at value ± 1σ', () => {
    const z5 = byKey.get('z5')!;
    for (let i = 0; i < 5; i++) {
      expect(z5.lo[i]).toBeCloseTo((z5.value[i] as number) - 0.002, 12);
      expect(z5.hi[i]).toBeCloseTo((z5.value[i] as number) + 0.002, 12);
    }
  });

  it('draws the user limit and the control limits x̄ ± 3·MR̄/1.128 (NIST/SEMATECH e-Handbook §6.3.2.2) from the baseline', () => {
    const rms = byKey.get('rms')!;
    const limit = rms.limits.find((l) => l.role === 'user-limit')!;
    expect(limit.value).toBeCloseTo(1 / 14, 12);
    expect(limit.values).toEqual(new Array(5).fill(limit.value));
    // Baseline: the first three RMS values.
    const base = weekly.slice(0, 3).map((w) => w.result.rmsWaves);
    const mean = (base[0] + base[1] + base[2]) / 3;
    const mrBar = (Math.abs(base[1] - base[0]) + Math.abs(base[2] - base[1])) / 2;
    expect(rms.limits.find((l) => l.role === 'centre')!.value).toBeCloseTo(mean, 12);
    expect(rms.limits.find((l) => l.role === 'ucl')!.value).toBeCloseTo(mean + (3 * mrBar) / 1.128, 9);
    expect(rms.limits.find((l) => l.role === 'lcl')!.value).toBeCloseTo(mean - (3 * mrBar) / 1.128, 9);
  });

  it('marks flagged points with their value and rule codes, and only those', () => {
    // #5 jumps to 0.25 waves of astigmatism: far beyond the 3σ limits of the first three points.
    const z5 = byKey.get('z5')!;
    expect(z5.flagged[4]).toBe(z5.value[4]);
    expect(z5.flagCodes[4]).toContain('N1');
    const rms = byKey.get('rms')!;
    // RMS of #5 is above 1/14 waves: the user limit (L) flags it.
    expect(rms.flagCodes[4]).toContain('L');
    for (const c of charts) {
      c.flagged.forEach((v, i) => {
        if (v === null) expect(c.flagCodes[i]).toEqual([]);
        else expect(c.flagCodes[i].length).toBeGreaterThan(0);
      });
      expect(c.flaggedCount).toBe(c.flagged.filter((v) => v !== null).length);
    }
  });

  it('keeps every bar end and limit line inside the y range', () => {
    for (const c of charts) {
      const [lo, hi] = c.yRange;
      for (let i = 0; i < 5; i++) {
        if (c.lo[i] !== null) expect(c.lo[i]!).toBeGreaterThan(lo);
        if (c.hi[i] !== null) expect(c.hi[i]!).toBeLessThan(hi);
      }
      for (const l of c.limits) {
        expect(l.value).toBeGreaterThan(lo);
        expect(l.value).toBeLessThan(hi);
      }
    }
  });

  it('refuses a point whose measurement is not on the axis', () => {
    const other = buildTrend('other', [m(9, '2025-03-01T00:00:00Z', { 4: 0.1 }), m(10, '2025-03-08T00:00:00Z', { 4: 0.1 })]);
    const axis = trendAxis(trend);
    expect(() => trendChartData(other.series[0], axis)).toThrow(/#9/);
  });
});

describe('paddedRange', () => {
  it('pads a span by 5 % on each side', () => {
    const [lo, hi] = paddedRange([1, 3]);
    expect(lo).toBeCloseTo(0.9, 12);
    expect(hi).toBeCloseTo(3.1, 12);
  });
  it('never returns an empty range', () => {
    expect(paddedRange([])).toEqual([-0.01, 0.01]);
    expect(paddedRange([0, 0])).toEqual([-0.01, 0.01]);
    const [lo, hi] = paddedRange([0.5]);
    expect(hi - lo).toBeCloseTo(0.1, 12);
    expect(paddedRange([NaN, 2, Infinity])[0]).toBeLessThan(2);
  });
});

describe('tickDecimals', () => {
  it('shows every tick of a step with the same, sufficient number of decimals', () => {
    expect(tickDecimals(0.01)).toBe(2);
    expect(tickDecimals(0.02)).toBe(2);
    expect(tickDecimals(0.005)).toBe(3);
    expect(tickDecimals(0.1)).toBe(1);
    expect(tickDecimals(1)).toBe(0);
    expect(tickDecimals(20)).toBe(0);
    expect(tickDecimals(0.025)).toBe(3);
    expect(tickDecimals(0.2)).toBe(1);
    // Every tick of a 0.025 step is written exactly: 0.000, 0.025, 0.050, 0.075.
    const d = tickDecimals(0.025);
    const labels = [0, 1, 2, 3].map((k) => (0.025 * k).toFixed(d));
    expect(labels).toEqual(['0.000', '0.025', '0.050', '0.075']);
  });
});
