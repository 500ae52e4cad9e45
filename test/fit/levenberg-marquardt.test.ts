/**
 * The Levenberg–Marquardt solver against a certified reference problem: NIST Statistical Reference
 * Datasets (StRD), nonlinear regression, "Misra1a" (lower difficulty): y = b1·(1 − exp(−b2·x)).
 * Data and certified values from memory of the NIST StRD page (ITL, 1999) — checked here to the digits
 * quoted by NIST; the certified standard deviations use the residual variance s² = RSS/(n − p).
 */
import { describe, expect, it } from 'vitest';
import { levenbergMarquardt, invertSPD } from '../../core/fit/levenbergMarquardt.ts';

const x = [77.6, 114.9, 141.1, 190.8, 239.9, 289.0, 332.8, 378.4, 434.8, 477.3, 536.8, 593.1, 689.1, 760.0];
const y = [10.07, 14.73, 17.94, 23.93, 29.61, 35.18, 40.02, 44.82, 50.76, 55.05, 61.01, 66.4, 75.47, 81.78];
const CERTIFIED = { b1: 2.3894212918e2, b2: 5.5015643181e-4, sd1: 2.7070075241, sd2: 7.2668688436e-6, rss: 1.2455138894e-1 };

const problem = {
  nParams: 2,
  evaluate(p: Float64Array, withJacobian: boolean) {
    const r = new Float64Array(x.length);
    const J = withJacobian ? new Float64Array(2 * x.length) : null;
    for (let i = 0; i < x.length; i++) {
      const e = Math.exp(-p[1] * x[i]);
      r[i] = y[i] - p[0] * (1 - e);
      if (J) {
        J[2 * i] = 1 - e;
        J[2 * i + 1] = p[0] * x[i] * e;
      }
    }
    return { r, J };
  },
};

describe('Levenberg–Marquardt on NIST StRD Misra1a', () => {
  for (const [label, start] of [
    ['NIST start 1', [500, 1e-4]],
    ['NIST start 2', [250, 5e-4]],
  ] as const) {
    it(`reaches the certified values from ${label}`, () => {
      const res = levenbergMarquardt(problem, Float64Array.from(start), { maxIterations: 200, chi2Tolerance: 1e-15, stepTolerance: 1e-9 });
      expect(res.termination).toBe('converged');
      expect(res.params[0] / CERTIFIED.b1 - 1).toBeCloseTo(0, 6);
      expect(res.params[1] / CERTIFIED.b2 - 1).toBeCloseTo(0, 6);
      expect(res.chi2 / CERTIFIED.rss - 1).toBeCloseTo(0, 6);
      const cov = invertSPD(res.normalMatrix, 2)!;
      const s2 = res.chi2 / (x.length - 2);
      expect(Math.sqrt(cov[0] * s2) / CERTIFIED.sd1 - 1).toBeCloseTo(0, 3);
      expect(Math.sqrt(cov[3] * s2) / CERTIFIED.sd2 - 1).toBeCloseTo(0, 3);
    });
  }
  it('reaches the same certified values keeping the Jacobian between steps, with a fresh normal matrix at the end', () => {
    let jacobians = 0;
    let values = 0;
    const counting = {
      nParams: 2,
      evaluate(p: Float64Array, withJacobian: boolean) {
        if (withJacobian) jacobians++;
        else values++;
        return problem.evaluate(p, withJacobian);
      },
    };
    const res = levenbergMarquardt(counting, Float64Array.from([250, 5e-4]), { maxIterations: 200, chi2Tolerance: 1e-15, stepTolerance: 1e-9, reuseJacobian: true });
    expect(res.termination).toBe('converged');
    expect(res.params[0] / CERTIFIED.b1 - 1).toBeCloseTo(0, 6);
    expect(res.params[1] / CERTIFIED.b2 - 1).toBeCloseTo(0, 6);
    const cov = invertSPD(res.normalMatrix, 2)!;
    const s2 = res.chi2 / (x.length - 2);
    expect(Math.sqrt(cov[0] * s2) / CERTIFIED.sd1 - 1).toBeCloseTo(0, 3);
    expect(Math.sqrt(cov[3] * s2) / CERTIFIED.sd2 - 1).toBeCloseTo(0, 3);
    // Accepted steps reuse the Jacobian: fewer derivative evaluations than value evaluations.
    expect(jacobians).toBeLessThan(values);
  });

  it('stops on a negligible absolute change of χ² (normalised residuals)', () => {
    // Misra1a with residuals divided by s = √(RSS/(n − p)), so that χ² counts in units of the noise.
    const s = Math.sqrt(CERTIFIED.rss / (x.length - 2));
    const scaled = {
      nParams: 2,
      evaluate(p: Float64Array, withJacobian: boolean) {
        const { r, J } = problem.evaluate(p, withJacobian);
        return { r: r.map((v) => v / s), J: J ? J.map((v) => v / s) : null };
      },
    };
    const res = levenbergMarquardt(scaled, Float64Array.from([250, 5e-4]), { maxIterations: 200, chi2Tolerance: 0, stepTolerance: 0, chi2AbsoluteTolerance: 0.01 });
    expect(res.termination).toBe('converged');
    // Δχ² < 0.01 leaves each parameter within about 0.1 of its certified standard deviation.
    expect(Math.abs(res.params[0] - CERTIFIED.b1) / CERTIFIED.sd1).toBeLessThan(0.1);
    expect(Math.abs(res.params[1] - CERTIFIED.b2) / CERTIFIED.sd2).toBeLessThan(0.1);
  });

  it('reports a non-finite model instead of returning nonsense', () => {
    const bad = { nParams: 1, evaluate: () => ({ r: Float64Array.from([NaN]), J: Float64Array.from([1]) }) };
    expect(levenbergMarquardt(bad, Float64Array.from([1])).termination).toBe('non-finite');
  });
});
