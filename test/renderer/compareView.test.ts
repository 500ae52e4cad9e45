/**
 * The compare screen's table rows, picker labels, default pair and shared colour scale.
 * Sources: σ of a difference of independent estimates √(σA² + σB²) (JCGM 100:2008 "GUM" §5.1.2,
 * computed in core/logbook/compare.ts); significant at |Δ|/σ ≥ 2 (a 2σ threshold, about 95 %
 * two-sided for a normal distribution — common practice, no published source).
 */
import { describe, expect, it } from 'vitest';
import { compareResults, SIGNIFICANCE_Z } from '../../core/logbook/compare.ts';
import type { AnalysedMeasurement, MeasurementSummary } from '../../core/logbook/types.ts';
import {
  compareRowView,
  defaultPair,
  differencePlane,
  formatSignificance,
  isSignificant,
  measurementLabel,
  sharedSymmetricRange,
} from '../../app/renderer/src/lib/compareView.ts';
import { syntheticResult } from '../logbook/helpers.ts';

function analysed(id: number, takenAt: string, terms: Record<number, number>, sigma: number, tags: string[]): AnalysedMeasurement {
  return { id, takenAt, assetName: 'bench laser', tags, resultId: id, result: syntheticResult({ terms, sigma }) };
}

describe('compareRowView', () => {
  // Astigmatism 0.120 ± 0.003 before, 0.080 ± 0.004 after: Δ = −0.040, σ = √(0.003² + 0.004²) = 0.005 (GUM §5.1.2), |Δ|/σ = 8.
  const A = analysed(1, '2025-02-03T09:00:00Z', { 4: 0.05, 5: 0.12 }, 0.003, ['before cleaning']);
  const B = analysed(2, '2025-02-10T09:00:00Z', { 4: 0.051, 5: 0.08 }, 0.004, ['after cleaning']);
  const c = compareResults(A, B);
  const rows = new Map(c.rows.map((r) => [r.key, compareRowView(r, c.threshold)]));

  it('shows A, B and B − A ± σ with σ = √(σA² + σB²)', () => {
    const z5 = rows.get('z5')!;
    expect(z5.a).toBe('0.1200 ± 0.0030');
    expect(z5.b).toBe('0.0800 ± 0.0040');
    expect(z5.delta).toBe('-0.0400 ± 0.0050');
    expect(z5.significance).toBe('8.0');
    expect(z5.significant).toBe(true);
    expect(z5.verdict).toBe('improved');
    expect(z5.verdictText).toContain('improved');
  });

  it('does not mark a change of 0.2σ', () => {
    const z4 = rows.get('z4')!;
    expect(z4.significance).toBe('0.2');
    expect(z4.significant).toBe(false);
    expect(z4.verdict).toBe('no significant change');
  });
});

describe('significance', () => {
  it('is reached at |Δ|/σ = 2 either way, not below', () => {
    expect(SIGNIFICANCE_Z).toBe(2);
    expect(isSignificant(2, 2)).toBe(true);
    expect(isSignificant(-2, 2)).toBe(true);
    expect(isSignificant(1.96, 2)).toBe(false);
    expect(isSignificant(null, 2)).toBe(false);
    expect(isSignificant(-Infinity, 2)).toBe(true);
  });
  it('is written as |Δ|/σ', () => {
    expect(formatSignificance(-3.44)).toBe('3.4');
    expect(formatSignificance(Infinity)).toBe('∞');
    expect(formatSignificance(null)).toBe('—');
    expect(formatSignificance(250.4)).toBe('250');
  });
});

function summary(id: number, takenAt: string, tags: string[], assetName = 'bench laser', analysedYet = true): MeasurementSummary {
  return {
    id,
    assetId: assetName === 'bench laser' ? 1 : 2,
    assetName,
    takenAt,
    operator: '',
    tags,
    notes: '',
    resultCount: analysedYet ? 1 : 0,
    latest: analysedYet ? { resultId: id, software: 'shadowfront 0.1.0', rmsWaves: 0.05, sigmaRmsWaves: 0.001, strehl: 0.9, sigmaStrehl: 0.004 } : null,
  };
}

describe('picker labels and the first pair offered', () => {
  it('labels a measurement by date, asset and tags', () => {
    expect(measurementLabel(summary(12, '2025-02-03T09:30:00Z', ['before cleaning', 'weekly']))).toBe('2025-02-03 09:30Z · bench laser · before cleaning, weekly · #12');
    expect(measurementLabel(summary(3, '2025-02-03T09:30:00Z', []))).toContain('no tags');
  });

  it('offers before and after cleaning when the tags say so', () => {
    const list = [
      summary(1, '2025-01-06T09:00:00Z', ['weekly']),
      summary(2, '2025-01-13T09:00:00Z', ['weekly', 'before cleaning']),
      summary(3, '2025-01-13T11:00:00Z', ['weekly', 'after cleaning']),
      summary(4, '2025-01-20T09:00:00Z', ['weekly']),
    ];
    expect(defaultPair([...list].reverse())).toEqual({ a: 2, b: 3 });
  });

  it('otherwise offers the two latest of the asset measured last, skipping unanalysed ones', () => {
    const list = [
      summary(1, '2025-01-06T09:00:00Z', []),
      summary(2, '2025-01-07T09:00:00Z', [], 'other laser'),
      summary(3, '2025-01-08T09:00:00Z', []),
      summary(4, '2025-01-09T09:00:00Z', [], 'bench laser', false),
    ];
    expect(defaultPair(list)).toEqual({ a: 1, b: 3 });
    expect(defaultPair([summary(1, '2025-01-06T09:00:00Z', [])])).toEqual({ a: 1, b: null });
  });
});

describe('one colour scale for both maps', () => {
  const plane = (values: number[]) => ({ widthPx: 2, heightPx: 2, pixelM: 1e-5, data: Float32Array.from(values) });
  it('takes the largest |value| of both, ignoring NaN outside the disc', () => {
    expect(sharedSymmetricRange([plane([NaN, 0.1, -0.05, 0]), plane([0.02, NaN, -0.25, 0.1])])).toBeCloseTo(0.25, 6);
  });
  it('gives B − A pixel by pixel, or nothing for maps of different sizes', () => {
    const d = differencePlane(plane([1, 2, NaN, 4]), plane([1.5, 1, 3, 4]))!;
    expect(Array.from(d.data.slice(0, 2))).toEqual([0.5, -1]);
    expect(Number.isNaN(d.data[2])).toBe(true);
    expect(differencePlane(plane([1, 2, 3, 4]), { widthPx: 1, heightPx: 4, pixelM: 1e-5, data: new Float32Array(4) })).toBeNull();
  });
});
