/**
 * The logbook screen's search form, row flags and number formatting.
 * Sources: value ± uncertainty with the uncertainty to at most two significant digits
 * (JCGM 100:2008 "GUM" §7.2.6); decimal byte prefixes (SI, kB = 1000 B).
 */
import { describe, expect, it } from 'vitest';
import { buildQuery, EMPTY_FILTER, formatBytes, formatPm, formatSignedPm, measurementFlags, splitTags } from '../../app/renderer/src/lib/logbookView.ts';
import type { Asset, AnalysedMeasurement, MeasurementSummary } from '../../core/logbook/types.ts';
import { buildTrend, MARECHAL_RMS_WAVES } from '../../core/logbook/trend.ts';
import { syntheticResult } from '../logbook/helpers.ts';

describe('buildQuery', () => {
  it('sends only the fields that were filled, dates as typed and tags split at commas', () => {
    expect(buildQuery(EMPTY_FILTER)).toEqual({ ok: true, query: {} });
    const r = buildQuery({ asset: ' bench laser ', since: '2025-01-01', until: '2025-02-28', tags: 'after cleaning, weekly,, ', text: ' mirror ' });
    expect(r).toEqual({ ok: true, query: { asset: 'bench laser', since: '2025-01-01', until: '2025-02-28', tags: ['after cleaning', 'weekly'], text: 'mirror' } });
  });

  it('names the field and the value of a date that is not a date', () => {
    const r = buildQuery({ ...EMPTY_FILTER, since: '2025-13-45x' });
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.field).toBe('since');
      expect(r.message).toContain('2025-13-45x');
      expect(r.message).toContain('YYYY-MM-DD');
    }
  });

  it('refuses a range that ends before it starts, naming both dates', () => {
    const r = buildQuery({ ...EMPTY_FILTER, since: '2025-03-01', until: '2025-02-01' });
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.field).toBe('until');
      expect(r.message).toContain('2025-02-01');
      expect(r.message).toContain('2025-03-01');
    }
    // One day is a valid range ("until" includes its day).
    expect(buildQuery({ ...EMPTY_FILTER, since: '2025-03-01', until: '2025-03-01' }).ok).toBe(true);
  });

  it('drops duplicate and empty tags', () => {
    expect(splitTags('a, b ,a,,')).toEqual(['a', 'b']);
    expect(splitTags('  ')).toEqual([]);
  });
});

const asset: Asset = {
  id: 1,
  name: 'bench laser',
  wavelengthM: 632.8e-9,
  location: 'lab 2',
  notes: '',
  // The Maréchal criterion RMS ≤ λ/14 and its Strehl ratio ≈ 0.8 (Born & Wolf; physics notes §5).
  limitRmsWaves: MARECHAL_RMS_WAVES,
  limitStrehl: 0.8,
  createdAt: '2025-01-01T00:00:00Z',
};

function summary(id: number, rmsWaves: number, strehl: number): MeasurementSummary {
  return {
    id,
    assetId: 1,
    assetName: 'bench laser',
    takenAt: `2025-01-${String(id).padStart(2, '0')}T09:00:00Z`,
    operator: '',
    tags: [],
    notes: '',
    resultCount: 1,
    latest: { resultId: id, software: 'shadowfront 0.1.0', rmsWaves, sigmaRmsWaves: 0.002, strehl, sigmaStrehl: 0.01 },
  };
}

describe('measurementFlags', () => {
  it('flags an RMS above the limit and a Strehl ratio below the floor, and nothing inside them', () => {
    expect(measurementFlags(summary(1, 0.05, 0.906), asset)).toEqual([]);
    const over = measurementFlags(summary(2, 0.08, 0.777), asset);
    expect(over.map((f) => f.kind)).toEqual(['rms-limit', 'strehl-floor']);
    expect(over[0].text).toContain('0.0800');
    expect(over[0].text).toContain('0.0714');
    expect(over[1].text).toContain('0.7770');
  });

  it('has no limit flags for an asset without limits, or a measurement without a result', () => {
    expect(measurementFlags(summary(3, 0.5, 0.01), { ...asset, limitRmsWaves: null, limitStrehl: null })).toEqual([]);
    expect(measurementFlags({ ...summary(4, 0.5, 0.01), latest: null }, asset)).toEqual([]);
  });

  it('adds the trend signals that name the measurement', () => {
    const ms: AnalysedMeasurement[] = [0.1, 0.101, 0.099, 0.1, 0.3].map((c, i) => ({
      id: i + 1,
      takenAt: `2025-01-0${i + 1}T09:00:00Z`,
      assetName: 'bench laser',
      tags: [],
      resultId: i + 1,
      result: syntheticResult({ terms: { 5: c } }),
    }));
    const trend = buildTrend('bench laser', ms, { baseline: 4 });
    const flagged = measurementFlags(summary(5, 0.3, 0.03), { ...asset, limitRmsWaves: null, limitStrehl: null }, trend);
    expect(flagged.map((f) => f.kind)).toEqual(['trend-signal']);
    expect(measurementFlags(summary(2, 0.101, 0.67), { ...asset, limitRmsWaves: null, limitStrehl: null }, trend)).toEqual([]);
  });
});

describe('formatPm', () => {
  it('gives the uncertainty two significant digits and the value the same decimals (GUM §7.2.6)', () => {
    expect(formatPm(0.031234, 0.00081)).toBe('0.03123 ± 0.00081');
    expect(formatPm(0.9312, 0.012)).toBe('0.931 ± 0.012');
    expect(formatPm(12.345, 1.5)).toBe('12.3 ± 1.5');
  });
  it('says so when a value or its uncertainty is missing', () => {
    expect(formatPm(null, 0.1)).toBe('—');
    expect(formatPm(0.05, null)).toMatch(/± \?$/);
  });
  it('signs a difference', () => {
    expect(formatSignedPm(0.012, 0.0034)).toBe('+0.0120 ± 0.0034');
    expect(formatSignedPm(-0.04, 0.005)).toBe('-0.0400 ± 0.0050');
  });
});

describe('formatBytes', () => {
  it('uses decimal SI prefixes', () => {
    expect(formatBytes(812)).toBe('812 B');
    expect(formatBytes(14_200)).toBe('14.2 kB');
    expect(formatBytes(3_100_000)).toBe('3.1 MB');
  });
});
