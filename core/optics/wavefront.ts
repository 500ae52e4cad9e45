/**
 * The beam's wavefront W(Q) in metres at the disc plane, as an explicit polynomial in lab-frame
 * metres (Zernike terms centred on the disc centre, normalised over the Zernike radius), with
 * first and second derivatives, for real points and — for the fast model's saddle points — complex points.
 */
import { zernikeMonomials } from '../zernike/index.ts';
import type { ZernikeTerm } from '../setup/types.ts';

/** Sum of coef·x^px·y^py with x, y in metres. */
export interface Polynomial2D {
  px: Int32Array;
  py: Int32Array;
  coef: Float64Array;
  degree: number;
}

/** Value and derivatives, real. */
export interface Derivs {
  v: number;
  x: number;
  y: number;
  xx: number;
  xy: number;
  yy: number;
}

export function emptyDerivs(): Derivs {
  return { v: 0, x: 0, y: 0, xx: 0, xy: 0, yy: 0 };
}

/**
 * Polynomial in metres for Σ scale·value_j·Z_j(x/ρz, y/ρz).
 * With scale = λ and values in waves this is W in metres.
 */
export function zernikePolynomialM(terms: readonly { j: number; value: number }[], radiusM: number, scale: number): Polynomial2D {
  const acc = new Map<string, { px: number; py: number; c: number }>();
  for (const t of terms) {
    if (t.value === 0) continue;
    for (const m of zernikeMonomials(t.j)) {
      const key = `${m.px},${m.py}`;
      const c = (scale * t.value * m.coef) / Math.pow(radiusM, m.px + m.py);
      const prev = acc.get(key);
      if (prev) prev.c += c;
      else acc.set(key, { px: m.px, py: m.py, c });
    }
  }
  const list = [...acc.values()].filter((m) => m.c !== 0);
  return {
    px: Int32Array.from(list.map((m) => m.px)),
    py: Int32Array.from(list.map((m) => m.py)),
    coef: Float64Array.from(list.map((m) => m.c)),
    degree: list.reduce((d, m) => Math.max(d, m.px + m.py), 0),
  };
}

let rx = new Float64Array(16), ry = new Float64Array(16);

/** Real evaluation with first and second derivatives. */
export function evalPolynomial(p: Polynomial2D, x: number, y: number, out: Derivs): Derivs {
  const n = p.degree + 1;
  if (rx.length < n + 1) {
    rx = new Float64Array(n + 1); ry = new Float64Array(n + 1);
  }
  const xp = rx, yp = ry;
  xp[0] = 1;
  yp[0] = 1;
  for (let i = 1; i <= n; i++) {
    xp[i] = xp[i - 1] * x;
    yp[i] = yp[i - 1] * y;
  }
  let v = 0, dx = 0, dy = 0, dxx = 0, dxy = 0, dyy = 0;
  for (let k = 0; k < p.coef.length; k++) {
    const a = p.px[k];
    const b = p.py[k];
    const c = p.coef[k];
    v += c * xp[a] * yp[b];
    if (a > 0) dx += c * a * xp[a - 1] * yp[b];
    if (b > 0) dy += c * b * xp[a] * yp[b - 1];
    if (a > 1) dxx += c * a * (a - 1) * xp[a - 2] * yp[b];
    if (a > 0 && b > 0) dxy += c * a * b * xp[a - 1] * yp[b - 1];
    if (b > 1) dyy += c * b * (b - 1) * xp[a] * yp[b - 2];
  }
  out.v = v; out.x = dx; out.y = dy; out.xx = dxx; out.xy = dxy; out.yy = dyy;
  return out;
}

let cxr = new Float64Array(16), cxi = new Float64Array(16), cyr = new Float64Array(16), cyi = new Float64Array(16);

/** Powers 0…n of x = xr + i·xi and y = yr + i·yi into the shared tables cxr, cxi, cyr, cyi. */
function complexPowers(n: number, xr: number, xi: number, yr: number, yi: number): void {
  if (cxr.length < n + 1) {
    cxr = new Float64Array(n + 1); cxi = new Float64Array(n + 1); cyr = new Float64Array(n + 1); cyi = new Float64Array(n + 1);
  }
  cxr[0] = 1; cyr[0] = 1; cxi[0] = 0; cyi[0] = 0;
  for (let i = 1; i <= n; i++) {
    cxr[i] = cxr[i - 1] * xr - cxi[i - 1] * xi;
    cxi[i] = cxr[i - 1] * xi + cxi[i - 1] * xr;
    cyr[i] = cyr[i - 1] * yr - cyi[i - 1] * yi;
    cyi[i] = cyr[i - 1] * yi + cyi[i - 1] * yr;
  }
}

function addMonomial(out: Float64Array, slot: number, c: number, xr: number, xi: number, yr: number, yi: number): void {
  out[2 * slot] += c * (xr * yr - xi * yi);
  out[2 * slot + 1] += c * (xr * yi + xi * yr);
}

/**
 * Complex evaluation at (x, y) = (xr + i·xi, yr + i·yi).
 * out = [v, x, y, xx, xy, yy] as interleaved (re, im): length 12.
 */
export function evalPolynomialComplex(p: Polynomial2D, xr: number, xi: number, yr: number, yi: number, out: Float64Array): Float64Array {
  complexPowers(p.degree + 1, xr, xi, yr, yi);
  const xpr = cxr, xpi = cxi, ypr = cyr, ypi = cyi;
  out.fill(0);
  for (let k = 0; k < p.coef.length; k++) {
    const a = p.px[k];
    const b = p.py[k];
    const c = p.coef[k];
    addMonomial(out, 0, c, xpr[a], xpi[a], ypr[b], ypi[b]);
    if (a > 0) addMonomial(out, 1, c * a, xpr[a - 1], xpi[a - 1], ypr[b], ypi[b]);
    if (b > 0) addMonomial(out, 2, c * b, xpr[a], xpi[a], ypr[b - 1], ypi[b - 1]);
    if (a > 1) addMonomial(out, 3, c * a * (a - 1), xpr[a - 2], xpi[a - 2], ypr[b], ypi[b]);
    if (a > 0 && b > 0) addMonomial(out, 4, c * a * b, xpr[a - 1], xpi[a - 1], ypr[b - 1], ypi[b - 1]);
    if (b > 1) addMonomial(out, 5, c * b * (b - 1), xpr[a], xpi[a], ypr[b - 2], ypi[b - 2]);
  }
  return out;
}

/** The wavefront of a setup's aberrations in metres (W = λ·Σ waves_j·Z_j). */
export function wavefrontPolynomial(wavelengthM: number, zernikeRadiusM: number, aberrations: readonly ZernikeTerm[]): Polynomial2D {
  return zernikePolynomialM(
    aberrations.map((t) => ({ j: t.j, value: t.waves })),
    zernikeRadiusM,
    wavelengthM,
  );
}

/**
 * Third derivatives at the complex point (x, y) = (xr + i·xi, yr + i·yi):
 * out = [xxx, xxy, xyy, yyy] as interleaved (re, im): length 8.
 */
export function evalThirdDerivativesComplex(p: Polynomial2D, xr: number, xi: number, yr: number, yi: number, out: Float64Array): Float64Array {
  complexPowers(p.degree + 1, xr, xi, yr, yi);
  const xpr = cxr, xpi = cxi, ypr = cyr, ypi = cyi;
  out.fill(0);
  for (let k = 0; k < p.coef.length; k++) {
    const a = p.px[k];
    const b = p.py[k];
    const c = p.coef[k];
    if (a > 2) addMonomial(out, 0, c * a * (a - 1) * (a - 2), xpr[a - 3], xpi[a - 3], ypr[b], ypi[b]);
    if (a > 1 && b > 0) addMonomial(out, 1, c * a * (a - 1) * b, xpr[a - 2], xpi[a - 2], ypr[b - 1], ypi[b - 1]);
    if (a > 0 && b > 1) addMonomial(out, 2, c * a * b * (b - 1), xpr[a - 1], xpi[a - 1], ypr[b - 2], ypi[b - 2]);
    if (b > 2) addMonomial(out, 3, c * b * (b - 1) * (b - 2), xpr[a], xpi[a], ypr[b - 3], ypi[b - 3]);
  }
  return out;
}
