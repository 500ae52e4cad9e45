/**
 * prepareFrames: averaging, dark subtraction, orientation, masks, background, refusals.
 * The thresholds (30 % saturated, 20 counts / 5 % of full scale for "mostly dark", hot pixels 8 robust
 * standard deviations and 50 counts above the neighbours' median) are common practice, no published
 * source; the tests check that the documented rules are applied, on data whose truth is known by
 * construction. Noise: @stdlib/random-base-normal (seeded) and the project's camera model.
 */
import { describe, expect, it } from 'vitest';
import { prepareFrames, findHotPixels } from '../../core/frames/prepare.ts';
import { FrameError } from '../../core/frames/errors.ts';
import { applyCameraNoise } from '../../core/camera/noise.ts';
import { bump, camera12, frameOf, gaussianNoise } from './helpers.ts';

function frameErrorOf(f: () => unknown): FrameError {
  try {
    f();
  } catch (e) {
    if (e instanceof FrameError) return e;
    throw e;
  }
  throw new Error('no error');
}

const W = 64;
const H = 48;

describe('prepareFrames: averaging and darks', () => {
  it('averages the frames and subtracts the mean of the dark frames, pixel by pixel', () => {
    const a = bump(W, H, 3000, 40);
    const b = bump(W, H, 2800, 44);
    const d1 = Float64Array.from({ length: W * H }, (_, k) => 40 + (k % 5));
    const d2 = Float64Array.from({ length: W * H }, (_, k) => 42 + (k % 3));
    const p = prepareFrames([frameOf(a, W, H), frameOf(b, W, H)], [frameOf(d1, W, H), frameOf(d2, W, H)], camera12(), ['a.png', 'b.png', 'd1.png', 'd2.png']);
    for (const k of [0, 77, 1234, W * H - 1]) expect(p.counts[k]).toBeCloseTo((a[k] + b[k]) / 2 - (d1[k] + d2[k]) / 2, 12);
    expect([p.frameCount, p.darkCount, p.backgroundCounts, p.backgroundMethod]).toEqual([2, 2, 0, 'dark frames subtracted']);
    let s = 0;
    for (let k = 0; k < W * H; k++) s += (d1[k] + d2[k]) / 2;
    expect(p.darkMeanCounts).toBeCloseTo(s / (W * H), 9);
    expect(p.names).toEqual(['a.png', 'b.png']);
    expect(p.darkNames).toEqual(['d1.png', 'd2.png']);
    expect(p.label).toMatch(/a\.png \(mean of 2 frames/);
  });

  it('estimates the read noise from two dark frames (the difference of two independent normals has variance 2σ²)', () => {
    const n = 128 * 128;
    const d1 = gaussianNoise(n, 3, 11).map((v) => 50 + v);
    const d2 = gaussianNoise(n, 3, 12).map((v) => 50 + v);
    const f = bump(128, 128, 3000, 50);
    const p = prepareFrames([frameOf(f, 128, 128)], [frameOf(d1, 128, 128), frameOf(d2, 128, 128)], camera12(), ['f.png', 'd1.png', 'd2.png']);
    expect(p.readNoiseCounts).toBeGreaterThan(3 * 0.95);
    expect(p.readNoiseCounts).toBeLessThan(3 * 1.05);
    expect(p.noiseMethod).toMatch(/difference of the first two dark frames/);
  });

  it('without darks, takes the background from the darkest border block', () => {
    // A centred bump with dark corners on an offset of 37 counts.
    const f = bump(W, H, 3000, 37, 8);
    const p = prepareFrames([frameOf(f, W, H)], [], camera12(), ['f.png']);
    expect(p.backgroundMethod).toBe('darkest border block');
    expect(p.backgroundCounts).toBe(37);
    expect(p.darkMeanCounts).toBe(null);
    expect(p.warnings.join()).toMatch(/no dark frames/);
  });

  it('refuses frames or darks of another size, naming the file and both sizes', () => {
    const e = frameErrorOf(() => prepareFrames([frameOf(bump(W, H, 3000, 40), W, H), frameOf(bump(W + 1, H, 3000, 40), W + 1, H)], [], camera12(), ['a.png', 'b.png']));
    expect(e.reason).toBe('wrong dimensions');
    expect(e.message).toBe(`b.png: wrong dimensions: this frame is ${W + 1} × ${H} px but a.png is ${W} × ${H} px; every frame and dark frame of a measurement must have the same size`);
    const d = frameErrorOf(() => prepareFrames([frameOf(bump(W, H, 3000, 40), W, H)], [frameOf(new Float64Array(W * (H - 2)), W, H - 2)], camera12(), ['a.png', 'dark.png']));
    expect(d.message).toMatch(/^dark\.png: wrong dimensions: this dark frame is 64 × 46 px but a\.png is 64 × 48 px/);
    expect(frameErrorOf(() => prepareFrames([], [], camera12(), [])).reason).toBe('no frames');
  });
});

describe('prepareFrames: bit depth and saturation', () => {
  it('warns when the file is deeper than the camera but every count fits', () => {
    const p = prepareFrames([frameOf(bump(W, H, 3000, 40), W, H, 16)], [], camera12(), ['deep.png']);
    expect(p.warnings.join('\n')).toMatch(/deep\.png: the file holds 16-bit samples and the setup says a 12-bit camera/);
  });

  it('refuses counts above 2^bitDepth − 1, naming the file, the maximum and the setup bit depth', () => {
    const f = bump(W, H, 3000, 40);
    f[100] = 5000;
    const e = frameErrorOf(() => prepareFrames([frameOf(f, W, H, 16)], [], camera12(), ['hi.png']));
    expect(e.reason).toBe('wrong bit depth');
    expect(e.message).toMatch(/^hi\.png: wrong bit depth: the frame holds counts up to 5000, above 4095, the largest a 12-bit camera \(setup camera\.bitDepth = 12\) can record/);
    // 12-bit data shifted into the high bits of 16-bit samples: every value a multiple of 16.
    const shifted = bump(W, H, 3000, 40).map((v) => v * 16);
    expect(frameErrorOf(() => prepareFrames([frameOf(shifted, W, H, 16)], [], camera12(), ['msb.tif'])).message).toMatch(/Every value is a multiple of 16/);
  });

  it('masks a pixel saturated in any one frame, before averaging', () => {
    const a = bump(W, H, 3000, 40);
    const b = bump(W, H, 3000, 40);
    a[500] = 4095; // saturated in the first frame only: the average (3547…) is below saturation
    b[600] = 4095; // saturated in the second frame only
    const p = prepareFrames([frameOf(a, W, H), frameOf(b, W, H)], [], camera12(), ['a.png', 'b.png']);
    expect(p.saturatedMask[500]).toBe(1);
    expect(p.saturatedMask[600]).toBe(1);
    expect(p.mask[500]).toBe(1);
    expect(p.saturatedCount).toBe(2);
    // A lower saturation level in the setup counts too.
    const q = prepareFrames([frameOf(bump(W, H, 3000, 40), W, H)], [], camera12({ saturationCounts: 3000 }), ['c.png']);
    expect(q.saturatedCount).toBeGreaterThan(0);
  });

  it('refuses a frame with more than 30 % saturated pixels, with advice', () => {
    const f = bump(W, H, 3000, 40);
    for (let k = 0; k < 0.31 * W * H; k++) f[k] = 4095;
    const e = frameErrorOf(() => prepareFrames([frameOf(f, W, H)], [], camera12(), ['bright.png']));
    expect(e.reason).toBe('mostly saturated');
    expect(e.message).toMatch(/^bright\.png: mostly saturated: 31 % of the pixels reach the saturation level \(4095 counts\); attenuate the beam or shorten the exposure$/);
  });

  it('refuses a mostly dark frame (95th percentile within 20 counts, or peak below 5 % of full scale), with advice', () => {
    const flat = Float64Array.from(gaussianNoise(W * H, 2, 5), (v) => Math.round(30 + v));
    const e = frameErrorOf(() => prepareFrames([frameOf(flat, W, H)], [], camera12(), ['dark.png']));
    expect(e.reason).toBe('mostly dark');
    expect(e.message).toMatch(/^dark\.png: mostly dark: 95 % of the pixels are within .* counts of the background .*; lengthen the exposure or remove attenuation$/);
    // A faint bump: most pixels clear the 20-count rule but the peak (150) is below 5 % of 4095.
    const faint = bump(W, H, 150, 30, 40);
    const g = frameErrorOf(() => prepareFrames([frameOf(faint, W, H)], [], camera12(), ['faint.png']));
    expect(g.message).toMatch(/^faint\.png: mostly dark: the peak is .* below 5 % of full scale \(4095\); lengthen the exposure/);
    // Relative intensities (as `simulate` writes to .npy) instead of counts: said so.
    const rel = bump(W, H, 0, 0).map((_, k) => 0.5 + 0.4 * Math.sin(k / 50));
    expect(frameErrorOf(() => prepareFrames([frameOf(rel, W, H, null)], [], camera12(), ['sim.npy'])).message).toMatch(/relative intensities, not counts/);
  });
});

describe('hot pixels (rule: > 8 robust σ and > 50 counts above the median of the 8 neighbours; common practice, no published source)', () => {
  const hotAt = [101, 2000, 3333, 5000, 7777];

  it('finds hot pixels in a dark frame and nowhere else', () => {
    const n = 128 * 96;
    const dark = Float64Array.from(gaussianNoise(n, 3, 21), (v) => Math.round(40 + v));
    for (const k of hotAt) dark[k] += 300;
    const frame = bump(128, 96, 3000, 40);
    const p = prepareFrames([frameOf(frame, 128, 96)], [frameOf(dark, 128, 96)], camera12(), ['f.png', 'dark.png']);
    expect(p.hotCount).toBe(hotAt.length);
    for (const k of hotAt) expect(p.hotMask[k]).toBe(1);
    expect(p.warnings.join()).toMatch(/5 hot pixels are excluded/);
  });

  it('finds them in a shot-noise frame without darks, with no false alarms where the signal is high', () => {
    const w = 128;
    const h = 96;
    const I = Float64Array.from({ length: w * h }, (_, k) => {
      const r = Math.floor(k / w) - h / 2;
      const c = (k % w) - w / 2;
      return 0.05 + Math.exp(-(r * r + c * c) / (2 * 20 * 20));
    });
    const clean = Float64Array.from(applyCameraNoise(I, { peakCounts: 3500, readNoise: 3, offset: 30, seed: 9 }, { bitDepth: 12, saturationCounts: 4095 }));
    expect(findHotPixels(clean, w, h, 12, null).reduce((s, v) => s + v, 0)).toBe(0);
    const withHot = clean.slice();
    for (const k of hotAt) withHot[k] += 400;
    const hot = findHotPixels(withHot, w, h, 12, null);
    expect(hot.reduce((s, v) => s + v, 0)).toBe(hotAt.length);
    for (const k of hotAt) expect(hot[k]).toBe(1);
  });
});

describe('prepareFrames: orientation', () => {
  it('turns the counts and the masks into the lab frame (flip, then rotate counter-clockwise)', () => {
    const f = bump(W, H, 3000, 40);
    f[0] = 4095; // top-left pixel saturated
    const p = prepareFrames([frameOf(f, W, H)], [], camera12({ orientation: { flipX: true, flipY: false, rotateDeg: 90 } }), ['o.png']);
    // Mirror left↔right: (row 0, col 0) → (0, W−1); then 90° counter-clockwise: (r, c) → (W−1−c, r) = (0, 0).
    expect([p.widthPx, p.heightPx]).toEqual([H, W]);
    expect(p.saturatedMask[0]).toBe(1);
    expect(p.counts[0]).toBe(4095);
    // The original pixel (row 5, col 9) lands at (row 9, col 5).
    expect(p.counts[9 * H + 5]).toBe(f[5 * W + 9]);
  });
});
