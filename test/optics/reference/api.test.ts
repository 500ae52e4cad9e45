/** Behaviour of the public API: layout, progress, cancellation and refusals. */
import { describe, expect, it } from 'vitest';
import { referenceField, referenceIntensity } from '../../../core/optics/reference/index.ts';
import { referenceFieldWithInfo } from '../../../core/optics/reference/field.ts';
import { ORIGIN, axis, bench } from './scenes.ts';

describe('reference API', () => {
  it('row-major layout [iy·nx + ix]: each entry equals the single-point evaluation', () => {
    const xs = axis(3, -0.1e-3, 0.13e-3);
    const ys = axis(2, 0.2e-3, -0.31e-3);
    const setup = bench({ beamCenterM: [0.3e-3, 0.1e-3] });
    const ab = [{ j: 8, waves: 0.05 }];
    const grid = referenceField(setup, ab, xs, ys);
    expect(grid.nx).toBe(3);
    expect(grid.ny).toBe(2);
    for (let iy = 0; iy < 2; iy++) {
      for (let ix = 0; ix < 3; ix++) {
        const one = referenceField(setup, ab, xs.subarray(ix, ix + 1), ys.subarray(iy, iy + 1));
        // Node counts depend on the extent of the camera points, so agreement is to the accuracy target.
        expect(Math.abs(grid.re[iy * 3 + ix] - one.re[0])).toBeLessThan(1e-7);
        expect(Math.abs(grid.im[iy * 3 + ix] - one.im[0])).toBeLessThan(1e-7);
      }
    }
  });

  it('referenceIntensity is |referenceField|²', () => {
    const xs = axis(5, 0, 0.1e-3);
    const f = referenceField(bench(), [], xs, ORIGIN);
    const I = referenceIntensity(bench(), [], xs, ORIGIN);
    for (let i = 0; i < xs.length; i++) expect(I[i]).toBeCloseTo(f.re[i] ** 2 + f.im[i] ** 2, 14);
  });

  it('empty point lists give empty grids', () => {
    const g = referenceField(bench(), [], new Float64Array(0), ORIGIN);
    expect(g.nx).toBe(0);
    expect(g.re.length).toBe(0);
  });

  it('reports progress from 0 to 1, non-decreasing', () => {
    const seen: number[] = [];
    referenceIntensity(bench({ ellipticity: 0.02 }), [{ j: 7, waves: 0.05 }], axis(8, 0, 0.1e-3), axis(4, 0, 0.1e-3), {
      onProgress: (f) => {
        seen.push(f);
      },
    });
    expect(seen[0]).toBe(0);
    expect(seen[seen.length - 1]).toBe(1);
    expect(seen.length).toBeGreaterThan(5);
    for (let i = 1; i < seen.length; i++) expect(seen[i]).toBeGreaterThanOrEqual(seen[i - 1]);
  });

  it("onProgress returning false cancels with an Error named 'CancelledError'", () => {
    let calls = 0;
    let caught: unknown = null;
    try {
      referenceIntensity(bench(), [{ j: 7, waves: 0.05 }], axis(8, 0, 0.1e-3), ORIGIN, {
        onProgress: (f) => {
          calls++;
          return f < 0.2;
        },
      });
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(Error);
    expect((caught as Error).name).toBe('CancelledError');
    expect(calls).toBeGreaterThan(1);
  });

  it('refuses a scene whose free-beam grid would exceed the cap, with a clear message', () => {
    // Non-separable aberration on a 60 mm beam: the chirp over the beam is far too fine to sample.
    expect(() => referenceField(bench({ beamRadiusM: 60e-3 }), [{ j: 7, waves: 0.1 }], ORIGIN, ORIGIN)).toThrow(
      /free-beam grid would need .* points \(limit 6000 per axis\)/,
    );
    // The same beam without a non-separable term uses the closed form and is fine.
    const I = referenceIntensity(bench({ beamRadiusM: 60e-3 }), [{ j: 4, waves: 0.1 }], ORIGIN, ORIGIN)[0];
    expect(I).toBeGreaterThan(0.9);
    // A custom cap is honoured.
    expect(() => referenceFieldWithInfo(bench(), [{ j: 7, waves: 0.1 }], ORIGIN, ORIGIN, { maxGridPerAxis: 500 })).toThrow(RangeError);
  });

  it('rejects invalid setups', () => {
    expect(() => referenceField(bench({ discRadiusM: 0 }), [], ORIGIN, ORIGIN)).toThrow(RangeError);
    expect(() => referenceField(bench({ wavelengthM: -1 }), [], ORIGIN, ORIGIN)).toThrow(RangeError);
    expect(() => referenceField(bench({ curvatureRadiusM: 0 }), [], ORIGIN, ORIGIN)).toThrow(RangeError);
    expect(() => referenceField(bench({ beamCenterM: [NaN, 0] }), [], ORIGIN, ORIGIN)).toThrow(RangeError);
    expect(() => referenceField(bench(), [{ j: 2.5, waves: 1 }], ORIGIN, ORIGIN)).toThrow(RangeError);
    expect(() => referenceField(bench(), [], new Float64Array([Infinity]), ORIGIN)).toThrow(RangeError);
    // An edge that reaches the centre is not star-shaped.
    expect(() => referenceField(bench({ edgeHarmonics: [{ order: 3, amplitudeM: 2e-3, phaseRad: 0 }] }), [], ORIGIN, ORIGIN)).toThrow(
      /star-shaped/,
    );
    expect(() => referenceField(bench({ edgeHarmonics: [{ order: 2.5, amplitudeM: 1e-6, phaseRad: 0 }] }), [], ORIGIN, ORIGIN)).toThrow(
      RangeError,
    );
  });
});
