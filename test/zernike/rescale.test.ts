/**
 * Pupil rescaling.
 * Sources:
 * - Definition: W(r) = Σ c_j Z_j(r/R1) = Σ c'_j Z_j(r/R2), ratio ε = R2/R1 (task brief; physics notes §5).
 * - Reference 1: direct least-squares refit (our own fitCoefficients on our own quadrature nodes) of the
 *   old wavefront sampled on the new disc — independent of the Janssen–Dirksen formula in the code.
 * - Reference 2: closed form for piston, defocus, primary and secondary spherical, derived by hand below
 *   by matching powers of ρ² in the ANSI polar forms (Z4 = √3(2ρ²−1), Z12 = √5(6ρ⁴−6ρ²+1),
 *   Z24 = √7(20ρ⁶−30ρ⁴+12ρ²−1)). From memory, it agrees with the rotationally symmetric entries of
 *   J. Schwiegerling, JOSA A 19, 1937 (2002), Table 2 (c'_2^0 = ε²[c_2^0 + √15(ε²−1)c_4^0 +
 *   √21(3ε⁴−5ε²+2)c_6^0], c'_4^0 = ε⁴[c_4^0 + √35(ε²−1)c_6^0], c'_6^0 = ε⁶c_6^0); I have not re-read the paper.
 */
import { describe, expect, it } from 'vitest';
import {
  ansiToNM,
  compileWavefront,
  fitCoefficients,
  rescaleCoefficients,
  type ZernikeCoefficient,
} from '../../core/zernike/index.ts';
import { discRule, randomDiscPoints, rng } from './helpers.ts';

function asMap(c: readonly ZernikeCoefficient[]): Map<number, number> {
  const m = new Map<number, number>();
  for (const t of c) m.set(t.j, (m.get(t.j) ?? 0) + t.value);
  return m;
}

const u = rng(2024);
const ORIGINAL: ZernikeCoefficient[] = Array.from({ length: 28 }, (_, j) => ({ j, value: 2 * u() - 1 })); // n ≤ 6

describe('rescaleCoefficients vs least-squares refit on the new disc', () => {
  it.each([0.6, 1.5, 0.25, 1])('ratio %s', (eps) => {
    const rescaled = asMap(rescaleCoefficients(ORIGINAL, eps));
    const old = compileWavefront(ORIGINAL);
    const q = discRule(12, 40);
    const vals = new Float64Array(q.x.length);
    for (let i = 0; i < vals.length; i++) vals[i] = old.value(eps * q.x[i]!, eps * q.y[i]!);
    const js = Array.from({ length: 28 }, (_, j) => j);
    const fit = fitCoefficients(js, q.x, q.y, vals);
    const scale = Math.max(1, ...fit.map((t) => Math.abs(t.value)));
    for (const t of fit) {
      expect(Math.abs((rescaled.get(t.j) ?? 0) - t.value) / scale).toBeLessThan(1e-11);
    }
    // Nothing outside j ≤ 27 (same m, n' ≤ n).
    for (const j of rescaled.keys()) expect(j).toBeLessThanOrEqual(27);
  });
});

describe('rescaleCoefficients: exactness and structure', () => {
  it('W_new(x, y) = W_old(εx, εy) pointwise, inside and outside the disc', () => {
    for (const eps of [0.3, 0.6, 0.95, 1.5, 3]) {
      const old = compileWavefront(ORIGINAL);
      const neu = compileWavefront(rescaleCoefficients(ORIGINAL, eps));
      for (const [x, y] of randomDiscPoints(50, 9, 1.4)) {
        const ref = old.value(eps * x, eps * y);
        expect(Math.abs(neu.value(x, y) - ref)).toBeLessThan(1e-11 * Math.max(1, Math.abs(ref), eps ** 6));
      }
    }
  });

  it('ratio then 1/ratio returns the original coefficients', () => {
    const back = asMap(rescaleCoefficients(rescaleCoefficients(ORIGINAL, 0.6), 1 / 0.6));
    for (const t of ORIGINAL) expect(back.get(t.j)).toBeCloseTo(t.value, 11);
  });

  it('ratio 1 is the identity, with exact zeros for the added lower terms', () => {
    const out = rescaleCoefficients([{ j: 24, value: 0.7 }], 1);
    expect(out.map((t) => t.j)).toEqual([0, 4, 12, 24]);
    expect(out.map((t) => t.value)).toEqual([0, 0, 0, 0.7]);
  });

  it('keeps the signed m: sin terms feed only sin terms, cos only cos', () => {
    const out = rescaleCoefficients([{ j: 7, value: 1 }, { j: 13, value: 2 }], 0.5);
    for (const t of out) {
      const { m } = ansiToNM(t.j);
      expect([-1, 2]).toContain(m);
    }
    expect(out.map((t) => t.j)).toEqual([1, 5, 7, 13]);
  });

  it('the highest term of each m scales as ε^n (leading power of ρ)', () => {
    const out = asMap(rescaleCoefficients([{ j: 8, value: 1 }, { j: 14, value: 1 }], 0.7));
    expect(out.get(8)).toBeCloseTo(0.7 ** 3, 14);
    expect(out.get(14)).toBeCloseTo(0.7 ** 4, 14);
  });

  it('sums duplicate indices', () => {
    const a = rescaleCoefficients([{ j: 12, value: 0.5 }, { j: 12, value: 0.5 }], 0.8);
    const b = rescaleCoefficients([{ j: 12, value: 1 }], 0.8);
    expect(a).toEqual(b);
  });

  it.each([0, -0.5, NaN, Infinity])('rejects ratio %s', (r) => {
    expect(() => rescaleCoefficients(ORIGINAL, r)).toThrow(RangeError);
  });
});

describe('closed form for rotationally symmetric terms (derived here; cf. Schwiegerling 2002)', () => {
  function closedForm(p: number, a: number, b: number, d: number, e: number) {
    // p, a, b, d: piston, defocus (Z4), primary spherical (Z12), secondary spherical (Z24).
    const d2 = e ** 6 * d;
    const b2 = e ** 4 * (b + Math.sqrt(35) * (e ** 2 - 1) * d);
    const a2 = e ** 2 * (a + Math.sqrt(15) * (e ** 2 - 1) * b + Math.sqrt(21) * (3 * e ** 4 - 5 * e ** 2 + 2) * d);
    // Constant term W(0) is unchanged: p − √3 a + √5 b − √7 d.
    const p2 = p - Math.sqrt(3) * a + Math.sqrt(5) * b - Math.sqrt(7) * d + Math.sqrt(3) * a2 - Math.sqrt(5) * b2 + Math.sqrt(7) * d2;
    return { p2, a2, b2, d2 };
  }

  it.each([0.6, 0.85, 1.5])('defocus + spherical, ratio %s', (e) => {
    const [p, a, b, d] = [0.1, 0.8, -0.3, 0.12];
    const out = asMap(
      rescaleCoefficients(
        [
          { j: 0, value: p },
          { j: 4, value: a },
          { j: 12, value: b },
          { j: 24, value: d },
        ],
        e,
      ),
    );
    const ref = closedForm(p, a, b, d, e);
    expect([...out.keys()]).toEqual([0, 4, 12, 24]);
    expect(out.get(0)).toBeCloseTo(ref.p2, 13);
    expect(out.get(4)).toBeCloseTo(ref.a2, 13);
    expect(out.get(12)).toBeCloseTo(ref.b2, 13);
    expect(out.get(24)).toBeCloseTo(ref.d2, 13);
  });

  it('pure defocus on a smaller pupil: c4 → ε² c4, and a piston √3(ε² − 1) c4 appears', () => {
    const out = asMap(rescaleCoefficients([{ j: 4, value: 1 }], 0.5));
    expect(out.get(4)).toBeCloseTo(0.25, 15);
    expect(out.get(0)).toBeCloseTo(Math.sqrt(3) * (0.25 - 1), 15);
  });
});
