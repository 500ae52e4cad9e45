/**
 * The disc-shape parameters of the fit: their analytic derivatives, the rotation convention, the
 * ellipticity/axis uncertainties and the stored profile's checks. Fast (no fit).
 */
import { describe, expect, it } from 'vitest';
import { fastField } from '../../core/optics/fast/rimModel.ts';
import { referenceIntensity } from '../../core/optics/reference/index.ts';
import { edgeRadius } from '../../core/optics/discEdge.ts';
import { discShapeFieldDerivatives, discWithShape, shapeTermsFromParams, shapeTermsOfDisc } from '../../core/fit/disc/shape.ts';
import { ellipseFromCoefficients, harmonicFromCoefficients, parseDiscProfile, DISC_PROFILE_FORMAT } from '../../core/fit/disc/profile.ts';
import { SetupFieldError } from '../../core/setup/fieldReader.ts';
import type { BenchSetup, ZernikeTerm } from '../../core/setup/types.ts';

const base: BenchSetup = {
  wavelengthM: 632.8e-9,
  beam: { radiusM: 3e-3, centerM: [1e-4, 0], curvatureRadiusM: 2 },
  disc: { radiusM: 1.5e-3, ellipticity: 0, ellipseAngleRad: 0, edgeHarmonics: [] },
  camera: { distanceM: 0.8, pixelPitchM: 5.5e-6, bitDepth: 12, saturationCounts: 4095, orientation: { flipX: false, flipY: false, rotateDeg: 0 } },
  zernikeRadiusM: 3e-3,
  source: { sizeM: 0 },
};
const orders = [2, 3, 4];
const q0 = [1.3e-3, 0.4e-3, 2e-4, -3e-4, 1e-4, 2e-4];
const rotation = 0.4;
const setupAt = (q: number[]) => ({ ...base, disc: discWithShape(base.disc, shapeTermsFromParams(orders, q, 0), rotation) });

describe('disc-shape derivatives (Hadamard shape derivative of the Fresnel integral)', () => {
  // Independent check: central differences of the REFERENCE model (Babinet + quadrature, core/optics/reference),
  // which shares no code with the fast model or with the derivative's rim sum.
  const aberrations: ZernikeTerm[] = [
    { j: 5, waves: 0.05 },
    { j: 4, waves: 0.1 },
  ];
  // camera points inside the shadow, across the shadow edge (radius a·M ≈ 2.1 mm) and outside it
  const xs = Float64Array.from({ length: 9 }, (_, i) => -1.9e-3 + (3.8e-3 * i) / 8);
  const ys = Float64Array.from([0.38e-3, -0.1e-3, -1.1e-3]);
  const nPhi = 512;
  const f0 = fastField(setupAt(q0), aberrations, xs, ys, { nPhi });
  const der = discShapeFieldDerivatives(setupAt(q0), aberrations, xs, ys, nPhi, orders, rotation);
  for (const p of [0, 1, 2, 5]) {
    it(`∂I/∂(${['c2', 's2', 'c3', 's3', 'c4', 's4'][p]}) agrees with central differences of the reference model to 1e-5 of its largest value`, () => {
      const h = 2e-5;
      const qp = [...q0];
      const qm = [...q0];
      qp[p] += h;
      qm[p] -= h;
      const ip = referenceIntensity(setupAt(qp), aberrations, xs, ys);
      const im = referenceIntensity(setupAt(qm), aberrations, xs, ys);
      let maxRef = 0;
      let maxErr = 0;
      for (let i = 0; i < ip.length; i++) {
        const fd = (ip[i] - im[i]) / (2 * h);
        const an = 2 * (f0.re[i] * der.dRe[p][i] + f0.im[i] * der.dIm[p][i]);
        maxRef = Math.max(maxRef, Math.abs(fd));
        maxErr = Math.max(maxErr, Math.abs(an - fd));
      }
      expect(maxRef).toBeGreaterThan(0.1);
      expect(maxErr / maxRef).toBeLessThan(1e-5);
    });
  }
});

describe('disc shape turned with the disc (lab frame: θ counter-clockwise, looking downstream; physics notes §5)', () => {
  it('the lab-frame edge of a disc turned by α is its own edge at θ − α, and the order-2 term is DiscSpec ellipticity/axis', () => {
    const own = shapeTermsFromParams(orders, q0, 0);
    const at0 = discWithShape(base.disc, own, 0);
    const turned = discWithShape(base.disc, own, 1.1);
    for (let k = 0; k < 24; k++) {
      const th = (2 * Math.PI * k) / 24;
      expect(edgeRadius(turned, th + 1.1).r).toBeCloseTo(edgeRadius(at0, th).r, 15);
      // r(θ) = a·(1 + Σ c_n cos nθ + s_n sin nθ) in the disc's own frame
      const expected = base.disc.radiusM * (1 + own.reduce((s, t) => s + t.cos * Math.cos(t.order * th) + t.sin * Math.sin(t.order * th), 0));
      expect(edgeRadius(at0, th).r).toBeCloseTo(expected, 15);
    }
    expect(at0.ellipticity).toBeCloseTo(Math.hypot(q0[0], q0[1]), 15);
    expect(at0.ellipseAngleRad).toBeCloseTo(0.5 * Math.atan2(q0[1], q0[0]), 15);
    // and back: the terms of a DiscSpec
    const back = shapeTermsOfDisc(at0);
    back.forEach((t, i) => {
      expect(t.cos).toBeCloseTo(own[i].cos, 15);
      expect(t.sin).toBeCloseTo(own[i].sin, 15);
    });
  });
});

describe('ellipticity and axis with uncertainties (first-order propagation, JCGM 100:2008 (GUM) eq. 13)', () => {
  it('for an ellipse along x: σ_e = σ_c and σ_axis = σ_s/(2e)', () => {
    const r = ellipseFromCoefficients(2e-3, 0, (1e-4) ** 2, (2e-4) ** 2, 0);
    expect(r.e).toBeCloseTo(2e-3, 15);
    expect(r.axisRad).toBe(0);
    expect(r.sigmaE).toBeCloseTo(1e-4, 12);
    expect(r.sigmaAxisRad).toBeCloseTo(2e-4 / (2 * 2e-3), 12);
  });
  it('for an ellipse along 45°: (c, s) = (0, e), σ_e = σ_s, σ_axis = σ_c/(2e)', () => {
    const r = ellipseFromCoefficients(0, 1e-3, (3e-5) ** 2, (5e-5) ** 2, 0);
    expect(r.axisRad).toBeCloseTo(Math.PI / 4, 15);
    expect(r.sigmaE).toBeCloseTo(5e-5, 12);
    expect(r.sigmaAxisRad).toBeCloseTo(3e-5 / 2e-3, 12);
  });
  it('a harmonic of amplitude A: σ_A = a·σ, σ_phase = σ/|q|', () => {
    const h = harmonicFromCoefficients(3, 1.5e-3, 0, 4e-4, 1e-10, 1e-10, 0);
    expect(h.amplitudeM).toBeCloseTo(1.5e-3 * 4e-4, 15);
    expect(h.phaseRad).toBeCloseTo(Math.PI / 2, 15);
    expect(h.sigmaAmplitudeM).toBeCloseTo(1.5e-3 * 1e-5, 15);
    expect(h.sigmaPhaseRad).toBeCloseTo(1e-5 / 4e-4, 12);
  });
});

describe('stored disc profiles', () => {
  const good = {
    format: DISC_PROFILE_FORMAT,
    radiusM: 1.5e-3,
    ellipticity: 1.3e-3,
    sigmaEllipticity: 3e-5,
    axisRad: 0.44,
    sigmaAxisRad: 0.01,
    harmonics: [],
    coefficients: [{ order: 2, cos: 8.1e-4, sin: 1.0e-3, sigmaCos: 3e-5, sigmaSin: 3e-5, correlation: 0.1 }],
    calibratedAt: '2024-05-01T10:00:00.000Z',
    method: 'rotation',
    beam: 'fitted',
    beamTerms: [],
    anglesRad: [0, Math.PI / 2],
    frames: ['a0.png', 'a90.png'],
    separation: [],
    degenerate: false,
    trusted: true,
    chi2PerDof: 1,
    warnings: [],
    software: 'shadowfront 0.1.0',
  };
  it('reads back what it wrote (through JSON, NaN σ written as null)', () => {
    const p = parseDiscProfile(JSON.parse(JSON.stringify({ ...good, sigmaAxisRad: NaN })), 'disc #1');
    expect(p.coefficients[0].cos).toBe(8.1e-4);
    expect(Number.isNaN(p.sigmaAxisRad)).toBe(true);
  });
  it('names the source, the field and the value of a bad entry', () => {
    const bad = { ...good, coefficients: [{ ...good.coefficients[0], order: 5 }] };
    expect(() => parseDiscProfile(bad, 'disc #7 "ball"')).toThrow(SetupFieldError);
    expect(() => parseDiscProfile(bad, 'disc #7 "ball"')).toThrow(/disc #7 "ball": field "coefficients\[0\]\.order" is 5/);
    expect(() => parseDiscProfile({ ...good, format: 'x/1' }, 'disc #2')).toThrow(/field "format" is "x\/1"/);
    expect(() => parseDiscProfile({ ...good, calibratedAt: 'yesterday' }, 'disc #2')).toThrow(/field "calibratedAt" is "yesterday"/);
  });
});
