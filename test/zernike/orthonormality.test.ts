/**
 * Orthonormality: (1/π) ∫∫_disc Z_i Z_j dA = δ_ij (unit-RMS normalisation of ANSI Z80.28 / ISO 24157;
 * Noll 1976 eq. 3 with the weight 1/π). The quadrature is our own (test/zernike/helpers.ts):
 * Gauss–Legendre in ρ × trapezoid in θ, exact for these polynomial integrands.
 */
import { describe, expect, it } from 'vitest';
import { zernikePolar, zernikeXY } from '../../core/zernike/index.ts';
import { discRule, gaussLegendre } from './helpers.ts';

describe('quadrature self-check', () => {
  it('Gauss–Legendre integrates x^k exactly up to degree 2n − 1', () => {
    const { nodes, weights } = gaussLegendre(10);
    for (let k = 0; k < 20; k++) {
      let sum = 0;
      for (let i = 0; i < 10; i++) sum += weights[i]! * nodes[i]! ** k;
      expect(sum).toBeCloseTo(k % 2 ? 0 : 2 / (k + 1), 14);
    }
  });
  it('the disc rule has area π and ∫ρ² dA = π/2', () => {
    const q = discRule(12, 32);
    let a = 0;
    let b = 0;
    for (let i = 0; i < q.w.length; i++) {
      a += q.w[i]!;
      b += q.w[i]! * q.rho[i]! ** 2;
    }
    expect(a).toBeCloseTo(Math.PI, 13);
    expect(b).toBeCloseTo(Math.PI / 2, 13);
  });
});

describe('orthonormality over the unit disc, j ≤ 27', () => {
  const J = 28;
  const q = discRule(16, 64); // exact: degree ≤ 13 in ρ (incl. Jacobian), angular frequency ≤ 12
  const P = q.w.length;

  it.each([
    ['zernikeXY', (j: number, i: number) => zernikeXY(j, q.x[i]!, q.y[i]!)],
    ['zernikePolar', (j: number, i: number) => zernikePolar(j, q.rho[i]!, q.theta[i]!)],
  ] as const)('Gram matrix of %s is the identity within 1e-10', (_name, f) => {
    const vals: Float64Array[] = [];
    for (let j = 0; j < J; j++) {
      const v = new Float64Array(P);
      for (let i = 0; i < P; i++) v[i] = f(j, i);
      vals.push(v);
    }
    let worst = 0;
    for (let a = 0; a < J; a++) {
      for (let b = 0; b <= a; b++) {
        let g = 0;
        for (let i = 0; i < P; i++) g += q.w[i]! * vals[a]![i]! * vals[b]![i]!;
        g /= Math.PI;
        worst = Math.max(worst, Math.abs(g - (a === b ? 1 : 0)));
      }
    }
    expect(worst).toBeLessThan(1e-10);
  });
});
