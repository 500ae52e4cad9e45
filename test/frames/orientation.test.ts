/**
 * camera.orientation: flip, then rotate counter-clockwise (physics notes section 5; core/setup/README.md).
 * Checked two ways: against NumPy's documented functions (numpy.fliplr mirrors left↔right, numpy.flipud
 * top↔bottom, numpy.rot90 turns counter-clockwise as displayed; e.g. np.rot90([[1, 2], [3, 4]]) =
 * [[2, 4], [1, 3]], the example of the numpy.rot90 documentation, from memory) and against the geometry
 * itself: lab coordinates x = column − (W−1)/2, y = (H−1)/2 − row, mirrored by x → −x or y → −y and turned
 * by the rotation matrix [[cos θ, −sin θ], [sin θ, cos θ]].
 */
import { describe, expect, it } from 'vitest';
import { orientImage, orientIndex } from '../../core/frames/orientation.ts';
import type { CameraOrientation } from '../../core/setup/types.ts';

const o = (flipX: boolean, flipY: boolean, rotateDeg: 0 | 90 | 180 | 270): CameraOrientation => ({ flipX, flipY, rotateDeg });
const rows = (d: Float64Array, w: number) => Array.from({ length: d.length / w }, (_, r) => Array.from(d.subarray(r * w, (r + 1) * w)));

describe('orientImage', () => {
  // An asymmetric 3 × 2 image (W = 3, H = 2): no flip or turn maps it onto itself.
  const img = Float64Array.from([1, 2, 3, 4, 5, 6]);

  it('matches numpy.rot90 / fliplr / flipud on a 2 × 2 and a 3 × 2 image', () => {
    expect(rows(orientImage(Float64Array.from([1, 2, 3, 4]), 2, 2, o(false, false, 90)).data, 2)).toEqual([
      [2, 4],
      [1, 3],
    ]);
    const r90 = orientImage(img, 3, 2, o(false, false, 90));
    expect([r90.widthPx, r90.heightPx]).toEqual([2, 3]);
    expect(rows(r90.data, 2)).toEqual([
      [3, 6],
      [2, 5],
      [1, 4],
    ]);
    expect(rows(orientImage(img, 3, 2, o(false, false, 180)).data, 3)).toEqual([
      [6, 5, 4],
      [3, 2, 1],
    ]);
    expect(rows(orientImage(img, 3, 2, o(false, false, 270)).data, 2)).toEqual([
      [4, 1],
      [5, 2],
      [6, 3],
    ]);
    expect(rows(orientImage(img, 3, 2, o(true, false, 0)).data, 3)).toEqual([
      [3, 2, 1],
      [6, 5, 4],
    ]);
    expect(rows(orientImage(img, 3, 2, o(false, true, 0)).data, 3)).toEqual([
      [4, 5, 6],
      [1, 2, 3],
    ]);
    // Flip first, then turn: fliplr then rot90.
    expect(rows(orientImage(img, 3, 2, o(true, false, 90)).data, 2)).toEqual([
      [1, 4],
      [2, 5],
      [3, 6],
    ]);
  });

  it('agrees with the lab-frame geometry for all 16 orientations on an asymmetric 5 × 3 image', () => {
    const W = 5;
    const H = 3;
    for (const flipX of [false, true]) {
      for (const flipY of [false, true]) {
        for (const rot of [0, 90, 180, 270] as const) {
          for (let r = 0; r < H; r++) {
            for (let c = 0; c < W; c++) {
              let x = c - (W - 1) / 2;
              let y = (H - 1) / 2 - r;
              if (flipX) x = -x;
              if (flipY) y = -y;
              const t = (rot * Math.PI) / 180;
              const x2 = Math.round(x * Math.cos(t) - y * Math.sin(t));
              const y2 = Math.round(x * Math.sin(t) + y * Math.cos(t));
              const W2 = rot % 180 === 0 ? W : H;
              const H2 = rot % 180 === 0 ? H : W;
              const p = orientIndex(r, c, W, H, o(flipX, flipY, rot));
              expect([p.col, p.row, p.widthPx, p.heightPx]).toEqual([x2 + (W2 - 1) / 2, (H2 - 1) / 2 - y2, W2, H2]);
            }
          }
        }
      }
    }
  });

  it('carries masks the same way and refuses a bad rotation', () => {
    const m = Uint8Array.from([1, 0, 0, 0, 0, 0]);
    const r = orientImage(m, 3, 2, o(false, false, 90));
    expect(r.data).toBeInstanceOf(Uint8Array);
    expect(Array.from(r.data)).toEqual([0, 0, 0, 0, 1, 0]);
    expect(() => orientImage(img, 3, 2, { flipX: false, flipY: false, rotateDeg: 45 as 0 })).toThrow(/0, 90, 180 or 270/);
  });
});
