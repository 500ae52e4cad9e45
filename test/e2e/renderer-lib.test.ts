/**
 * The interface's own small pieces that need no browser: colour maps, number formatting, setup-field
 * paths, and the HTTP client of the local web mode (against the real local server).
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { colormapLut, LUT_SIZE, paint, parseCssColor, ticks, valueMapping } from '../../app/renderer/src/lib/colormaps.ts';
import { decimalsFor, fmtLength, fmtNum, fmtPm } from '../../app/renderer/src/lib/format.ts';
import { getAt, parsePath, pathMatches, setAt } from '../../app/renderer/src/lib/jsonPath.ts';
import { createHttpApi, tokenFromHash } from '../../app/renderer/src/api.ts';
import { API_CHANNELS } from '../../app/shared/contract.ts';

/** CIE 1976 L* of an 8-bit sRGB colour: sRGB transfer function and luminance weights of IEC 61966-2-1, L* of CIE 15. */
function lightness(r: number, g: number, b: number): number {
  const lin = (c: number): number => {
    const v = c / 255;
    return v <= 0.04045 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4;
  };
  const y = 0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b);
  return y > 216 / 24389 ? 116 * Math.cbrt(y) - 16 : (24389 / 27) * y;
}

function lutAt(lut: Uint8ClampedArray, i: number): [number, number, number] {
  return [lut[3 * i]!, lut[3 * i + 1]!, lut[3 * i + 2]!];
}

describe('colour maps', () => {
  it('viridis runs from #440154 to #fde725 (matplotlib _viridis_data, first and last rows; from memory)', () => {
    const lut = colormapLut('viridis');
    expect(lutAt(lut, 0)).toEqual([0x44, 0x01, 0x54]);
    expect(lutAt(lut, LUT_SIZE - 1)).toEqual([0xfd, 0xe7, 0x25]);
  });

  it('viridis and cividis rise in lightness from end to end (their published design aim: van der Walt & Smith 2015; Nuñez, Anderton & Renslow, PLoS ONE 2018)', () => {
    for (const name of ['viridis', 'cividis'] as const) {
      const lut = colormapLut(name);
      let prev = -Infinity;
      for (let i = 0; i < LUT_SIZE; i += 8) {
        const l = lightness(...lutAt(lut, i));
        expect(l, `${name} at ${i}`).toBeGreaterThan(prev);
        prev = l;
      }
      expect(lightness(...lutAt(lut, LUT_SIZE - 1)) - lightness(...lutAt(lut, 0))).toBeGreaterThan(60);
    }
  });

  it('the diverging map is ColorBrewer RdBu turned round: blue #053061 for the most negative, red #67001f for the most positive (colorbrewer2.org, 11 classes), lightest in the middle', () => {
    const lut = colormapLut('diverging');
    expect(lutAt(lut, 0)).toEqual([0x05, 0x30, 0x61]);
    expect(lutAt(lut, LUT_SIZE - 1)).toEqual([0x67, 0x00, 0x1f]);
    const mid = lightness(...lutAt(lut, 128));
    // The middle class of RdBu is #f7f7f7 (L* ≈ 97); d3's spline blends its neighbours a little.
    expect(mid).toBeGreaterThan(90);
    for (let i = 0; i + 16 <= 128; i += 16) expect(lightness(...lutAt(lut, i + 16))).toBeGreaterThan(lightness(...lutAt(lut, i)));
    for (let i = 128; i + 16 < LUT_SIZE; i += 16) expect(lightness(...lutAt(lut, i + 16))).toBeLessThan(lightness(...lutAt(lut, i)));
  });

  it('reads both colour forms d3 returns', () => {
    expect(parseCssColor('#fde725')).toEqual([253, 231, 37]);
    expect(parseCssColor('rgb(5, 48, 97)')).toEqual([5, 48, 97]);
    expect(() => parseCssColor('hsl(1,2%,3%)')).toThrow(/not in a form/);
  });

  it('paints NaN transparent and maps a symmetric range so that zero sits in the middle', () => {
    const data = new Float32Array([-2, 0, 1, NaN]);
    const m = valueMapping(data, 'linear', true);
    expect([m.lo, m.hi]).toEqual([-2, 2]);
    expect(m.toUnit(0)).toBe(0.5);
    const out = new Uint8ClampedArray(16);
    paint(data, m, colormapLut('diverging'), out);
    expect(out[15]).toBe(0); // NaN: alpha 0
    expect(out[3]).toBe(255);
    expect(Array.from(out.subarray(0, 3))).toEqual(Array.from(lutAt(colormapLut('diverging'), 0)));
  });

  it('log scale puts decades at equal steps and ticks on 1-2-5 values', () => {
    const m = valueMapping(new Float32Array([1, 10, 100, 1000]), 'log', false);
    expect(m.toUnit(10) - m.toUnit(1)).toBeCloseTo(m.toUnit(1000) - m.toUnit(100), 12);
    const t = ticks(m, 5);
    expect(t).toContain(10);
    expect(t).toContain(100);
    expect(t.every((v) => [1, 2, 5].includes(Math.round(v / 10 ** Math.floor(Math.log10(v) + 1e-12))))).toBe(true);
  });
});

describe('number formatting', () => {
  it('rounds value and uncertainty to two significant digits of the uncertainty (JCGM 100:2008, GUM §7.2.6)', () => {
    expect(fmtPm(0.0781342, 0.000213)).toBe('0.07813 ± 0.00021');
    expect(fmtPm(19.1834, 0.1527)).toBe('19.18 ± 0.15');
    expect(fmtPm(-0.018262, 0.000298)).toBe('-0.01826 ± 0.00030');
    expect(decimalsFor(0.0014)).toBe(4);
  });

  it('writes lengths in the unit that keeps the number at or above 1 (SI prefixes, BIPM SI Brochure §3)', () => {
    expect(fmtLength(0.8)).toBe('800.0 mm');
    expect(fmtLength(2.02e-4)).toBe('202.0 µm');
    expect(fmtLength(6.328e-7)).toBe('632.8 nm');
    expect(fmtLength(Infinity)).toBe('∞');
    expect(fmtNum(NaN)).toBe('—');
  });
});

describe('setup field paths', () => {
  it('reads and writes dotted paths with list indices, without touching the original', () => {
    expect(parsePath('beam.center[1]')).toEqual(['beam', 'center', 1]);
    const setup = { beam: { radius: '4 mm', center: ['0 mm', '0 mm'] } };
    const next = setAt(setup, 'beam.center[1]', '0.1 mm');
    expect(getAt(next, 'beam.center[1]')).toBe('0.1 mm');
    expect(getAt(setup, 'beam.center[1]')).toBe('0 mm');
    const noSource = setAt({ source: { size: '0 mm' }, wavelength: '632.8 nm' }, 'source.size', undefined);
    expect(noSource).toEqual({ wavelength: '632.8 nm' });
    expect(pathMatches('beam.center[1]', 'beam.center')).toBe(true);
    expect(pathMatches('beam.centre', 'beam.center')).toBe(false);
  });
});

describe('HTTP client of the local web mode', () => {
  it('takes the token from the address fragment (RFC 3986 §3.5: the part after "#" stays in the browser)', () => {
    expect(tokenFromHash('#token=abc-_1')).toBe('abc-_1');
    expect(tokenFromHash('#x=1&token=q%2Bz')).toBe('q+z');
    expect(tokenFromHash('')).toBe('');
  });

  let tmp = '';
  let server: { url: string; token: string; close(): Promise<void> } | null = null;
  beforeAll(async () => {
    tmp = mkdtempSync(join(tmpdir(), 'shadowfront-client-'));
    const { startWebServer } = await import('../../app/web/server.ts');
    server = await startWebServer({ port: 0, dataDir: join(tmp, 'data'), logbookPath: join(tmp, 'logbook.sqlite'), demo: false, staticDir: tmp });
  }, 60_000);
  afterAll(async () => {
    await server?.close();
    if (tmp) rmSync(tmp, { recursive: true, force: true });
  });

  it('has every channel of the contract and works against the real server', async () => {
    const base = server!.url.replace(/\/#.*$/, '');
    const api = createHttpApi({ baseUrl: base, token: server!.token });
    for (const ch of API_CHANNELS) {
      const [g, m] = ch.split('.') as [string, string];
      expect(typeof (api as unknown as Record<string, Record<string, unknown>>)[g]?.[m], ch).toBe('function');
    }
    const info = await api.app.info();
    expect(info.ok && info.value.shell).toBe('web');
    // A unit the setup format does not know is named with its field (core/setup/README.md, "Errors").
    const example = await api.setup.example({ which: 'blank' });
    expect(example.ok).toBe(true);
    if (!example.ok) return;
    const check = await api.setup.check({ setup: { ...example.value, wavelength: '632.8 parsecs' } });
    expect(check.ok).toBe(true);
    if (check.ok) {
      expect(check.value.derived).toBeNull();
      expect(check.value.problem?.message).toContain('wavelength');
      expect(check.value.problem?.message).toContain('parsecs');
    }
  });

  it('says in plain words when the token is wrong or the service is gone', async () => {
    const base = server!.url.replace(/\/#.*$/, '');
    const wrong = await createHttpApi({ baseUrl: base, token: 'not-the-token' }).app.info();
    expect(wrong.ok).toBe(false);
    if (!wrong.ok) expect(wrong.problem.message).toMatch(/token/i);
    const gone = await createHttpApi({ baseUrl: 'http://127.0.0.1:9', token: 'x' }).app.info();
    expect(gone.ok).toBe(false);
    if (!gone.ok) expect(gone.problem.kind).toBe('connection');
  });
});
