/**
 * ISO 11146-1:2021 second-moment beam widths and ISO/TR 11146-3 background treatment, on analytic
 * Gaussian beams made here: I = P·exp(−2u²/wu² − 2v²/wv²) with (u, v) the beam's own axes at angle θ from
 * +x (lab frame: x = column, y = −row). Its second moments are σu² = wu²/4, σv² = wv²/4, so the ISO widths
 * are dσu = 2·wu and dσv = 2·wv (D4σ = twice the 1/e² radius), and the ISO azimuth φ is the angle of the
 * principal axis closer to x. Point samples of a Gaussian several pixels wide have the continuous moments
 * to far better than 1e-6 (Poisson summation: aliasing terms ∝ exp(−2π²σ²)).
 */
import normal from '@stdlib/random-base-normal';
import { describe, expect, it } from 'vitest';
import { beamMoments, isoWidths } from '../../core/beam/moments.ts';

const W = 256;
const H = 200;
const DEG = Math.PI / 180;

interface Beam {
  wu: number;
  wv: number;
  thetaDeg: number;
  cx: number;
  cy: number;
  peak: number;
  background?: number;
  noise?: number;
  seed?: number;
  round?: boolean;
}

function frame(b: Beam): Float64Array {
  const d = new Float64Array(W * H);
  const g = b.noise ? normal.factory(0, b.noise, { seed: b.seed ?? 1 }) : null;
  const c = Math.cos(b.thetaDeg * DEG);
  const s = Math.sin(b.thetaDeg * DEG);
  for (let r = 0; r < H; r++) {
    for (let col = 0; col < W; col++) {
      const x = col - b.cx;
      const y = -(r - b.cy);
      const u = x * c + y * s;
      const v = -x * s + y * c;
      let val = (b.background ?? 0) + b.peak * Math.exp((-2 * u * u) / (b.wu * b.wu) - (2 * v * v) / (b.wv * b.wv)) + (g ? g() : 0);
      if (b.round) val = Math.round(val);
      d[r * W + col] = val;
    }
  }
  return d;
}

function angleDiffDeg(a: number, b: number): number {
  // Axes are defined modulo 180°.
  let d = (a - b) % 180;
  if (d > 90) d -= 180;
  if (d < -90) d += 180;
  return Math.abs(d);
}

describe('beamMoments (ISO 11146-1)', () => {
  it('circular Gaussian: D4σ = 2w, centroid exact (ISO 11146-1: second-moment diameter of a Gaussian = 1/e² diameter)', () => {
    const m = beamMoments(frame({ wu: 20, wv: 20, thetaDeg: 0, cx: 120.37, cy: 95.81, peak: 3000 }), W, H);
    // Truncating at the 3× area (±3w) leaves out exp(−18) of the power: the widths are exact to ~1e-6.
    expect(m.dSigmaXPx).toBeCloseTo(40, 4);
    expect(m.dSigmaYPx).toBeCloseTo(40, 4);
    expect(m.generalisedDiameterPx).toBeCloseTo(40, 4);
    expect(m.ellipticity).toBeCloseTo(1, 6);
    expect(Math.abs(m.centroidPx[0] - 120.37)).toBeLessThan(0.05);
    expect(Math.abs(m.centroidPx[1] - 95.81)).toBeLessThan(0.05);
    expect(m.converged).toBe(true);
    expect(m.integrationArea.insideFrame).toBe(true);
  });

  it('rotated elliptical Gaussian: widths along the principal axes, azimuth φ of the axis closer to x', () => {
    // θ = 30°: the major axis is the one closer to x → φ = 30°, dσx = 2·wu, dσy = 2·wv.
    const a = beamMoments(frame({ wu: 30, wv: 18, thetaDeg: 30, cx: 130.2, cy: 101.7, peak: 3000 }), W, H);
    expect(Math.abs(a.dSigmaXPx / 60 - 1)).toBeLessThan(0.01);
    expect(Math.abs(a.dSigmaYPx / 36 - 1)).toBeLessThan(0.01);
    expect(angleDiffDeg(a.azimuthRad / DEG, 30)).toBeLessThan(0.5);
    expect(a.ellipticity).toBeCloseTo(0.6, 3);
    // θ = 60°: the axis closer to x is now the minor one, at −30° → φ = −30°, dσx = 2·wv, dσy = 2·wu.
    const b = beamMoments(frame({ wu: 30, wv: 18, thetaDeg: 60, cx: 130.2, cy: 101.7, peak: 3000 }), W, H);
    expect(Math.abs(b.dSigmaXPx / 36 - 1)).toBeLessThan(0.01);
    expect(Math.abs(b.dSigmaYPx / 60 - 1)).toBeLessThan(0.01);
    expect(Math.abs(b.azimuthRad / DEG - -30)).toBeLessThan(0.5);
    expect(Math.abs(b.majorAxisAngleRad / DEG - 60)).toBeLessThan(0.5);
    expect(b.majorWidthPx).toBeCloseTo(b.dSigmaYPx, 12);
  });

  it('with camera noise and a background offset: widths within 1 %, azimuth within 0.5°, centroid within 0.05 px', () => {
    for (const [theta, seed] of [
      [-20, 1],
      [45, 2],
      [75, 3],
    ]) {
      const b: Beam = { wu: 28, wv: 17, thetaDeg: theta, cx: 127.6, cy: 98.3, peak: 3000, background: 100.3, noise: 3, seed, round: true };
      const m = beamMoments(frame(b), W, H);
      const major = Math.max(m.dSigmaXPx, m.dSigmaYPx);
      const minor = Math.min(m.dSigmaXPx, m.dSigmaYPx);
      expect(Math.abs(major / 56 - 1), `θ = ${theta}°`).toBeLessThan(0.01);
      expect(Math.abs(minor / 34 - 1), `θ = ${theta}°`).toBeLessThan(0.01);
      expect(angleDiffDeg(m.majorAxisAngleRad / DEG, theta)).toBeLessThan(0.5);
      expect(Math.abs(m.centroidPx[0] - 127.6)).toBeLessThan(0.05);
      expect(Math.abs(m.centroidPx[1] - 98.3)).toBeLessThan(0.05);
      // ISO/TR 11146-3 baseline: the mean outside the integration area recovers the offset.
      expect(Math.abs(m.backgroundCounts - 100.3)).toBeLessThan(0.1);
    }
  });

  it("an elliptical Gaussian's D4σ equals twice its 1/e² radius, read off the profile directly", () => {
    const b: Beam = { wu: 30, wv: 18, thetaDeg: 30, cx: 130, cy: 100, peak: 3000 };
    const img = frame(b);
    const m = beamMoments(img, W, H);
    // Walk from the centroid along the axis of dσx until the profile falls to 1/e² of its peak.
    const at = (x: number, y: number) => {
      const c0 = Math.floor(x);
      const r0 = Math.floor(y);
      const fx = x - c0;
      const fy = y - r0;
      const v = (c: number, r: number) => img[r * W + c];
      return (1 - fy) * ((1 - fx) * v(c0, r0) + fx * v(c0 + 1, r0)) + fy * ((1 - fx) * v(c0, r0 + 1) + fx * v(c0 + 1, r0 + 1));
    };
    const radiusAlong = (angle: number) => {
      const peak = at(m.centroidPx[0], m.centroidPx[1]);
      let t = 0;
      // Lab direction (cos, sin) is (+column, −row) on the image.
      while (at(m.centroidPx[0] + t * Math.cos(angle), m.centroidPx[1] - t * Math.sin(angle)) > peak * Math.exp(-2)) t += 0.01;
      return t;
    };
    expect(Math.abs(m.dSigmaXPx / (2 * radiusAlong(m.azimuthRad)) - 1)).toBeLessThan(0.01);
    expect(Math.abs(m.dSigmaYPx / (2 * radiusAlong(m.azimuthRad + Math.PI / 2)) - 1)).toBeLessThan(0.01);
  });

  it('needs the iterative 3× area: over the whole frame the same noisy background biases the widths', () => {
    // Integer counts on a 100.3-count offset: the border median (100) is off by 0.3 counts, and every pixel
    // of the frame, weighted by its squared distance, adds that error (and its noise) to the second moments.
    const b: Beam = { wu: 20, wv: 20, thetaDeg: 0, cx: 130.3, cy: 101.6, peak: 3000, background: 100.3, noise: 3, seed: 4, round: true };
    const img = frame(b);
    const iso = beamMoments(img, W, H);
    const whole = beamMoments(img, W, H, { integration: 'whole frame' });
    expect(Math.abs(iso.dSigmaXPx / 40 - 1)).toBeLessThan(0.01);
    expect(Math.abs(iso.dSigmaYPx / 40 - 1)).toBeLessThan(0.01);
    expect(iso.iterations).toBeGreaterThan(1);
    expect(whole.dSigmaXPx / 40 - 1).toBeGreaterThan(0.05);
  });

  it('isoWidths: equal second moments give φ = ±45° (ISO 11146-1), and circular moments equal widths', () => {
    const e = isoWidths(100, 100, 30);
    expect(e.azimuthRad).toBeCloseTo(Math.PI / 4, 12);
    expect(e.dSigmaX).toBeCloseTo(2 * Math.SQRT2 * Math.sqrt(260), 12);
    expect(e.dSigmaY).toBeCloseTo(2 * Math.SQRT2 * Math.sqrt(140), 12);
    expect(isoWidths(100, 100, -30).azimuthRad).toBeCloseTo(-Math.PI / 4, 12);
    const c = isoWidths(25, 25, 0);
    expect(c.dSigmaX).toBeCloseTo(20, 12);
    expect(c.dSigmaY).toBeCloseTo(20, 12);
    expect(c.azimuthRad).toBe(0);
  });

  it('warns when the 3× area leaves the frame, and refuses a frame without a beam', () => {
    const big = beamMoments(frame({ wu: 60, wv: 50, thetaDeg: 0, cx: 128, cy: 100, peak: 3000 }), W, H);
    expect(big.integrationArea.insideFrame).toBe(false);
    expect(big.warnings.join()).toMatch(/does not fit in the frame/);
    expect(() => beamMoments(new Float64Array(W * H).fill(50), W, H)).toThrow(/no beam/);
  });
});
