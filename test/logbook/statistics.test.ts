/**
 * The comparison statistics (Δ, combined σ, z, verdict) and the Shewhart individuals chart with its
 * run rules, against worked examples.
 */
import { describe, expect, it } from 'vitest';
import { compareResults, difference, verdict } from '../../core/logbook/compare.ts';
import { D2_MR2, D4_MR2, individualsLimits, movingRanges, runRules } from '../../core/logbook/controlChart.ts';
import type { IndividualsLimits } from '../../core/logbook/controlChart.ts';
import { buildTrend } from '../../core/logbook/trend.ts';
import type { AnalysedMeasurement } from '../../core/logbook/types.ts';
import type { FitResult } from '../../core/fit/result.ts';
import { syntheticResult } from './helpers.ts';

function measured(id: number, takenAt: string, result: FitResult, tags: string[] = []): AnalysedMeasurement {
  return { id, takenAt, assetName: 'HeNe 1', tags, resultId: id, result };
}

/** A result with the given summary values and coefficients (value, 1σ), all in waves. */
function resultWith(rms: [number, number], strehl: [number, number], terms: Record<number, [number, number]>): FitResult {
  const r = syntheticResult({ terms: Object.fromEntries(Object.entries(terms).map(([j, [v]]) => [j, v])) });
  r.rmsWaves = rms[0];
  r.sigmaRmsWaves = rms[1];
  r.strehl = strehl[0];
  r.sigmaStrehl = strehl[1];
  for (const t of r.zernike.terms) t.sigmaWaves = terms[t.j][1];
  return r;
}

describe('comparison of two measurements', () => {
  /*
   * Worked example, computed by hand. Formula: for Δ = B − A of two independent (uncorrelated)
   * estimates, the combined standard uncertainty is u_c(Δ) = √(u(A)² + u(B)²) — the law of propagation
   * of uncertainty, JCGM 100:2008 (GUM) §5.1.2 eq. (10), with sensitivity coefficients +1 and −1.
   * z = Δ/u_c; "no significant change" when |z| < 2.
   *
   *   quantity        A ± u(A)          B ± u(B)         Δ        u_c                         z        verdict
   *   RMS (waves)     0.080 ± 0.003     0.060 ± 0.004   −0.020   √(9+16)·1e-3 = 0.005         −4.000   improved (lower is better)
   *   Strehl          0.78  ± 0.012     0.87  ± 0.009   +0.090   √(144+81)·1e-6 = 0.015       +6.000   improved (higher is better)
   *   defocus j=4     0.010 ± 0.0024    0.030 ± 0.0070  +0.020   √(5.76+49)·1e-6 = 0.0074     +2.7027  worse (|c| grew by 0.020 = 2.70σ)
   *   astig. j=5      0.040 ± 0.006     0.035 ± 0.008   −0.005   √(36+64)·1e-6 = 0.010        −0.500   no significant change
   *   coma j=7       −0.030 ± 0.005     0.032 ± 0.012   +0.062   √(25+144)·1e-6 = 0.013       +4.7692  changed (|c| grew by only 0.002 = 0.15σ: the sign flipped)
   */
  const A = measured(1, '2025-03-03T08:00:00.000Z', resultWith([0.08, 0.003], [0.78, 0.012], { 4: [0.01, 0.0024], 5: [0.04, 0.006], 7: [-0.03, 0.005] }), ['before-cleaning']);
  const B = measured(2, '2025-03-03T10:00:00.000Z', resultWith([0.06, 0.004], [0.87, 0.009], { 4: [0.03, 0.007], 5: [0.035, 0.008], 7: [0.032, 0.012] }), ['after-cleaning']);
  const c = compareResults(A, B);
  const row = (key: string) => c.rows.find((r) => r.key === key)!;

  it('matches the hand-worked example row by row (GUM §5.1.2)', () => {
    expect(row('rms').delta).toBeCloseTo(-0.02, 12);
    expect(row('rms').sigma).toBeCloseTo(0.005, 12);
    expect(row('rms').z).toBeCloseTo(-4, 9);
    expect(row('rms').verdict).toBe('improved');
    expect(row('strehl').delta).toBeCloseTo(0.09, 12);
    expect(row('strehl').sigma).toBeCloseTo(0.015, 12);
    expect(row('strehl').z).toBeCloseTo(6, 9);
    expect(row('strehl').verdict).toBe('improved');
    expect(row('z4').sigma).toBeCloseTo(0.0074, 12);
    expect(row('z4').z).toBeCloseTo(2.7027027027, 8);
    expect(row('z4').verdict).toBe('worse');
    expect(row('z5').sigma).toBeCloseTo(0.01, 12);
    expect(row('z5').z).toBeCloseTo(-0.5, 9);
    expect(row('z5').verdict).toBe('no significant change');
    expect(row('z7').sigma).toBeCloseTo(0.013, 12);
    expect(row('z7').z).toBeCloseTo(4.769230769, 8);
    expect(row('z7').verdict).toBe('changed');
  });

  it('reads the direction right: the same change is worse for RMS and better for Strehl', () => {
    const d = difference(0.5, 0.1, 0.9, 0.1);
    expect(verdict(0.5, 0.9, d, 'lower')).toBe('worse');
    expect(verdict(0.5, 0.9, d, 'higher')).toBe('improved');
    // Size of a coefficient: −0.10 → −0.02 is a smaller aberration although the signed value rose.
    expect(verdict(-0.1, -0.02, difference(-0.1, 0.01, -0.02, 0.01), 'smaller magnitude')).toBe('improved');
  });

  it('puts the 2σ threshold where it says: |z| = 2 is significant, just below is not (3-4-5 triangle: σ = 5 exactly)', () => {
    expect(difference(0, 3, 10, 4)).toEqual({ delta: 10, sigma: 5, z: 2 });
    expect(verdict(0, 10, difference(0, 3, 10, 4), 'lower')).toBe('worse');
    expect(verdict(0, 9.99, difference(0, 3, 9.99, 4), 'lower')).toBe('no significant change');
  });

  it('gives no verdict without uncertainties, and notes it', () => {
    const r = syntheticResult({ terms: { 4: 0.1 } });
    const r2 = { ...syntheticResult({ terms: { 4: 0.2 } }), sigmaRmsWaves: null as unknown as number };
    const cmp = compareResults(measured(1, '2025-01-01T00:00:00Z', r), measured(2, '2025-01-02T00:00:00Z', r2));
    expect(cmp.rows.find((x) => x.key === 'rms')!.verdict).toBe('unknown');
    expect(cmp.notes.join(' ')).toMatch(/uncertainties are missing/);
  });

  it('warns when the two fits used different terms, wavelengths or an untrusted fit', () => {
    const a = syntheticResult({ terms: { 3: 0.01, 4: 0.02 } });
    const b = { ...syntheticResult({ terms: { 3: 0.01, 4: 0.02, 12: 0.01 }, wavelengthM: 532e-9 }), trusted: false };
    const cmp = compareResults(measured(1, '2025-01-01T00:00:00Z', a), measured(2, '2025-01-02T00:00:00Z', b));
    const notes = cmp.notes.join('\n');
    expect(notes).toMatch(/different sets of terms/);
    expect(notes).toMatch(/only B has j = 12/);
    expect(notes).toMatch(/different wavelengths/);
    expect(notes).toMatch(/B is marked untrusted/);
    expect(cmp.rows.map((r) => r.key)).toEqual(['rms', 'strehl', 'z3', 'z4']);
  });
});

describe('Shewhart individuals chart', () => {
  /*
   * NIST/SEMATECH e-Handbook of Statistical Methods, §6.3.2.2 "Individuals Control Charts", example of
   * a new process monitored for flow rate, first 10 batches (data and published limits quoted from
   * memory; the mean and MR̄ follow from the data, and the limits from them with d2 = 1.128, D4 = 3.267):
   *   x = 49.6 47.6 49.9 51.3 47.8 51.2 52.6 52.4 53.6 52.1
   *   x̄ = 50.81, MR̄ = 1.8778, UCL = 55.8041, LCL = 45.8159; moving-range chart UCL = 6.1347, LCL = 0.
   */
  const flow = [49.6, 47.6, 49.9, 51.3, 47.8, 51.2, 52.6, 52.4, 53.6, 52.1];

  it('reproduces the NIST/SEMATECH §6.3.2.2 flow-rate example (from memory)', () => {
    const l = individualsLimits(flow);
    expect(l.center).toBeCloseTo(50.81, 10);
    expect(l.mrBar).toBeCloseTo(1.8778, 4);
    expect(l.ucl).toBeCloseTo(55.8041, 3);
    expect(l.lcl).toBeCloseTo(45.8159, 3);
    expect(l.mrUcl).toBeCloseTo(6.1347, 3);
    expect(movingRanges(flow).slice(1).map((v) => Number(v!.toFixed(1)))).toEqual([2.0, 2.3, 1.4, 3.5, 3.4, 1.4, 0.2, 1.2, 1.5]);
    // The process is in control in that example: no run rule fires.
    expect(runRules(flow, l)).toEqual([]);
  });

  it('uses the textbook constants for moving ranges of two', () => {
    // d2 = E|X1 − X2|/σ = 2/√π for normal X (|X1 − X2| is half-normal with scale √2σ);
    // d3 = sd|X1 − X2|/σ = √(2 − 4/π); D4 = 1 + 3·d3/d2 (definition of the range-chart limit, e.g.
    // Montgomery, Introduction to Statistical Quality Control). Tables print d2 = 1.128, D4 = 3.267.
    const d2 = 2 / Math.sqrt(Math.PI);
    const d3 = Math.sqrt(2 - 4 / Math.PI);
    expect(D2_MR2).toBeCloseTo(d2, 3);
    expect(D4_MR2).toBeCloseTo(1 + (3 * d3) / d2, 3);
  });

  it('refuses a baseline of fewer than two points', () => {
    expect(() => individualsLimits([1])).toThrow(RangeError);
  });
});

describe('run rules (Nelson 1984, J. Quality Technology 16(4) 237–239; Western Electric 1956)', () => {
  // Unit zones: centre 0, σ̂ = 1, limits ±3, moving-range limit D4·MR̄ with MR̄ = d2 (σ̂ = 1).
  const unit: IndividualsLimits = { baselineCount: 20, center: 0, mrBar: D2_MR2, sigma: 1, ucl: 3, lcl: -3, mrUcl: D4_MR2 * D2_MR2 };
  const rules = (v: number[]) => runRules(v, unit).map((s) => `${s.rule}:${s.direction}:${s.indices.join(',')}`);

  it('test 1: one point beyond 3σ', () => {
    expect(rules([0, 3.2])).toContain('beyond-limits:above:1');
    expect(rules([0, -3.2])).toContain('beyond-limits:below:1');
    expect(rules([0, 2.9]).filter((s) => s.startsWith('beyond'))).toEqual([]);
  });

  it('test 2: nine points in a row on one side; eight are not enough', () => {
    const nine = [0.5, 0.6, 0.5, 0.6, 0.5, 0.6, 0.5, 0.6, 0.5];
    expect(rules(nine)).toEqual(['nine-same-side:above:0,1,2,3,4,5,6,7,8']);
    expect(rules(nine.slice(1))).toEqual([]);
    // A tenth point extends the same signal instead of adding another.
    expect(rules([...nine, 0.6])).toEqual(['nine-same-side:above:0,1,2,3,4,5,6,7,8,9']);
  });

  it('test 3: six points in a row steadily rising (a drift); five are not, and a tie breaks the run', () => {
    expect(rules([-0.5, -0.3, -0.1, 0.1, 0.3, 0.5])).toEqual(['six-trend:up:0,1,2,3,4,5']);
    expect(rules([-0.3, -0.1, 0.1, 0.3, 0.5])).toEqual([]);
    expect(rules([-0.5, -0.3, -0.1, -0.1, 0.1, 0.3, 0.5])).toEqual([]);
    expect(rules([0.5, 0.3, 0.1, -0.1, -0.3, -0.5])).toEqual(['six-trend:down:0,1,2,3,4,5']);
  });

  it('test 5: two of three points beyond 2σ on the same side', () => {
    expect(rules([0, 2.5, 0, 2.5])).toEqual(['two-of-three-beyond-2-sigma:above:1,3']);
    expect(rules([2.5, 0, 0, 2.5])).toEqual([]);
    expect(rules([0, 2.5, 0, -2.5])).toEqual([]);
  });

  it('test 6: four of five points beyond 1σ on the same side', () => {
    expect(rules([1.5, 1.5, 0, 1.5, 1.5])).toEqual(['four-of-five-beyond-1-sigma:above:0,1,3,4']);
    expect(rules([1.5, 1.5, 0, 0, 1.5, 1.5])).toEqual([]);
  });

  it('moving-range chart: a jump above D4·MR̄', () => {
    // D4·MR̄ = 3.267 × 1.128 = 3.685 here.
    expect(rules([-1.9, 1.9, -1.9])).toEqual(['moving-range:up:0,1', 'moving-range:down:1,2']);
    expect(rules([-1.8, 1.8, -1.8])).toEqual([]);
  });
});

describe('trend of an asset', () => {
  const week = [0.05, 0.052, 0.049, 0.051, 0.05, 0.048, 0.051, 0.05, 0.049, 0.052, 0.05, 0.08].map((rms, i) =>
    measured(i + 1, `2025-03-${String(i + 1).padStart(2, '0')}T09:00:00.000Z`, syntheticResult({ terms: { 4: rms } })),
  );

  it('flags the point above the user limit and beyond the control limit of the baseline', () => {
    const t = buildTrend('HeNe 1', week, { baseline: 11, limitRmsWaves: 1 / 14 });
    const rms = t.series.find((s) => s.key === 'rms')!;
    expect(t.baselineCount).toBe(11);
    expect(rms.limits!.center).toBeCloseTo(week.slice(0, 11).reduce((s, m) => s + m.result.rmsWaves, 0) / 11, 12);
    expect(rms.points[11].flags).toContain('user-limit');
    expect(rms.points[11].flags).toContain('beyond-limits');
    expect(rms.points.slice(0, 11).every((p) => !p.flags.includes('user-limit'))).toBe(true);
    const strehl = t.series.find((s) => s.key === 'strehl')!;
    const t2 = buildTrend('HeNe 1', week, { baseline: 11, limitStrehl: 0.85 });
    expect(t2.series.find((s) => s.key === 'strehl')!.points[11].flags).toContain('user-limit');
    expect(strehl.points[11].flags).toContain('beyond-limits');
    expect(t.notes.join(' ')).toMatch(/only 11 points/);
  });

  it('leaves untrusted fits out and says so', () => {
    const bad = measured(99, '2025-03-20T09:00:00.000Z', syntheticResult({ terms: { 4: 0.5 }, trusted: false }));
    const t = buildTrend('HeNe 1', [...week, bad], {});
    expect(t.series[0].points.map((p) => p.measurementId)).not.toContain(99);
    expect(t.notes.join(' ')).toMatch(/#99/);
  });
});
