/**
 * The constants behind the analysis region, from the Fresnel integrals of @stdlib/math-base-special-fresnel
 * (an independent library; it returns [S(x), C(x)] with C(x) = ∫₀ˣ cos(πt²/2) dt). Straight-edge Fresnel
 * diffraction (Born & Wolf, Principles of Optics, chapter 8): I(v)/I₀ = ½·[(C(v) + ½)² + (S(v) + ½)²],
 * v > 0 in the light. And chooseRegion on a prepared frame whose geometry is set by hand.
 */
import fresnel from '@stdlib/math-base-special-fresnel';
import { describe, expect, it } from 'vitest';
import { EDGE_MARGIN_V, chooseRegion } from '../../core/frames/region.ts';
import { V_STEEPEST_EDGE, type LocatedPattern } from '../../core/frames/locate.ts';
import type { PreparedFrame } from '../../core/frames/prepare.ts';

const edge = (v: number) => {
  const [S, C] = fresnel(v) as [number, number];
  return 0.5 * ((C + 0.5) ** 2 + (S + 0.5) ** 2);
};

describe('straight-edge Fresnel pattern (from @stdlib Fresnel integrals)', () => {
  it('passes the A&S Table 7.7 values the physics notes quote (C(1) = 0.7798934004, S(1) = 0.4382591474)', () => {
    const [S, C] = fresnel(1) as [number, number];
    expect(C).toBeCloseTo(0.7798934004, 9);
    expect(S).toBeCloseTo(0.4382591474, 9);
    expect(edge(0)).toBeCloseTo(0.25, 12); // a quarter of the light at the geometric edge
  });

  it('rises most steeply at v = V_STEEPEST_EDGE (0.737)', () => {
    let best = -Infinity;
    let vBest = 0;
    for (let v = 0; v < 1.5; v += 1e-4) {
      const d = (edge(v + 1e-6) - edge(v - 1e-6)) / 2e-6;
      if (d > best) {
        best = d;
        vBest = v;
      }
    }
    expect(Math.abs(vBest - V_STEEPEST_EDGE)).toBeLessThan(1e-3);
  });

  it('has its first four bright fringes inside v < EDGE_MARGIN_V = 4, the fifth beyond', () => {
    const maxima: number[] = [];
    let prev = edge(0);
    let cur = edge(1e-3);
    for (let v = 2e-3; v < 5 && maxima.length < 5; v += 1e-3) {
      const next = edge(v);
      if (cur > prev && cur > next) maxima.push(v - 1e-3);
      prev = cur;
      cur = next;
    }
    expect(maxima.slice(0, 4).map((v) => +v.toFixed(2))).toEqual([1.22, 2.34, 3.08, 3.67]);
    expect(maxima[3]).toBeLessThan(EDGE_MARGIN_V);
    expect(maxima[4]).toBeGreaterThan(EDGE_MARGIN_V);
  });
});

describe('chooseRegion', () => {
  const W = 200;
  const H = 160;
  const prepared = { widthPx: W, heightPx: H, mask: new Uint8Array(W * H) } as unknown as PreparedFrame;
  const located = (center: [number, number], rise: number | null): LocatedPattern => ({
    centerPx: center,
    shadowRadiusPx: rise,
    shadowEdgeRisePx: rise,
    confidence: 1,
    method: 'test',
    shadowCenterPx: null,
    spotCenterPx: center,
    spotScore: 1,
    warnings: [],
  });
  const expected = { shadowRadiusPx: 40, spotRadiusPx: 5, edgeFringeScalePx: 8 };

  it('covers the shadow and four fringe scales when they fit', () => {
    // Rise radius 45.9 → geometric edge 45.9 − 0.737·8 = 40.0; region 40 + 4·8 = 72.
    const r = chooseRegion(prepared, located([100, 80], 40 + V_STEEPEST_EDGE * 8), expected);
    expect(r.holdsWholeShadow).toBe(true);
    expect(r.radiusPx).toBeCloseTo(72, 9);
    let n = 0;
    for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) if ((x - 100) ** 2 + (y - 80) ** 2 <= 72 * 72) n++;
    expect(r.pixelCount).toBe(n);
  });

  it('otherwise takes the largest circle around the centre that fits in the frame', () => {
    const r = chooseRegion(prepared, located([60.2, 80], null), expected);
    expect(r.holdsWholeShadow).toBe(false);
    expect(r.radiusPx).toBeCloseTo(60.7, 9); // to the left edge of the frame, half a pixel beyond column 0
    expect(r.description).toMatch(/largest that fits in the frame/);
  });
});
