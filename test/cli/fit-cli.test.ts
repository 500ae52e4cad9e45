/**
 * `shadowfront fit` as other tools use it: the JSON contract, and clear errors with a non-zero exit for
 * each kind of bad input (never a crash dump or a silent nonsense result).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { encodePng16 } from '../../core/imageio/png.ts';
import { encodeNpy } from '../../core/imageio/npy.ts';

const root = fileURLToPath(new URL('../..', import.meta.url));
const bin = join(root, 'app/cli/shadowfront.mjs');
const tmp = mkdtempSync(join(tmpdir(), 'shadowfront-fit-'));
const fixtures = JSON.parse(readFileSync(join(root, 'test/fixtures/fit/fixtures.json'), 'utf8')).entries;
const entry = fixtures.find((f: { file: string }) => f.file === 'sign-z5-plus.png');
const frame = join(root, 'test/fixtures/fit', entry.file);
// The setup part of the fixture's scene.
const setupJson = { ...entry.scene, format: 'shadowfront-setup/1' };
delete setupJson.aberrations;
delete setupJson.frame;
delete setupJson.noise;
const setup = join(tmp, 'setup.json');
writeFileSync(setup, JSON.stringify(setupJson));

function run(...args: string[]) {
  const r = spawnSync(process.execPath, [bin, ...args], { cwd: root, encoding: 'utf8', timeout: 300_000 });
  return { code: r.status, out: r.stdout, err: r.stderr };
}
function noStack(text: string) {
  expect(text).not.toMatch(/\n\s+at .*:\d+:\d+/);
}

describe('shadowfront fit', { timeout: 300_000 }, () => {
  it('prints exactly one JSON object in the documented format', () => {
    const r = run('fit', frame, '--setup', setup, '--json', '--gain', '1', '--read-noise', '3');
    expect(r.code).toBe(0);
    const lines = r.out.trim().split('\n');
    expect(lines.length).toBe(1);
    const res = JSON.parse(lines[0]);
    expect(res.format).toBe('shadowfront-result/1');
    expect(res.zernike.radius_m).toBeCloseTo(0.003, 9);
    expect(res.zernike.terms.map((t: { j: number }) => t.j)).toEqual([3, 4, 5, 7, 8]);
    for (const t of res.zernike.terms) {
      for (const k of ['name', 'waves', 'sigmaWaves', 'nm', 'sigmaNm']) expect(t).toHaveProperty(k);
      expect(t.nm).toBeCloseTo(t.waves * 632.8, 6);
    }
    for (const k of ['rmsWaves', 'pvWaves', 'strehl', 'center_m', 'chi2PerDof', 'termination', 'iterations', 'elapsedMs', 'warnings']) expect(res).toHaveProperty(k);
    const z5 = res.zernike.terms.find((t: { j: number }) => t.j === 5);
    expect(Math.abs(z5.waves - 0.15)).toBeLessThan(3 * z5.sigmaWaves);
  });

  it('prints a readable table without --json', () => {
    const r = run('fit', frame, '--setup', setup, '--terms', '4,5', '--gain', '1', '--read-noise', '3');
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/vertical astigmatism/);
    expect(r.out).toMatch(/Strehl ratio/);
  });

  it('refuses a bad --terms list and a missing setup', () => {
    expect(run('fit', frame).code).toBe(2);
    const t = run('fit', frame, '--setup', setup, '--terms', '1,2');
    expect(t.code).toBe(1);
    expect(t.err).toMatch(/term j = 1 cannot be fitted/);
  });

  it('names a truncated file', () => {
    const bytes = readFileSync(frame);
    const bad = join(tmp, 'truncated.png');
    writeFileSync(bad, bytes.subarray(0, 200));
    const r = run('fit', bad, '--setup', setup);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/truncated\.png/);
    expect(r.err).toMatch(/truncated or corrupt/);
    noStack(r.err);
  });

  it('names a frame whose counts exceed the setup bit depth', () => {
    const counts = new Uint16Array(128 * 128).fill(30000);
    const bad = join(tmp, 'deep.png');
    writeFileSync(bad, encodePng16(counts, 128, 128));
    const r = run('fit', bad, '--setup', setup);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/deep\.png/);
    expect(r.err).toMatch(/bit depth|bitDepth|12-bit/);
    noStack(r.err);
  });

  it('refuses a frame with no shadow in it', () => {
    const counts = new Uint16Array(128 * 128);
    for (let r = 0; r < 128; r++) for (let c = 0; c < 128; c++) counts[r * 128 + c] = 20 + Math.round(2500 * Math.exp(-(((c - 64) ** 2 + (r - 64) ** 2) / 2000)));
    const bad = join(tmp, 'beam-only.png');
    writeFileSync(bad, encodePng16(counts, 128, 128));
    const r = run('fit', bad, '--setup', setup);
    expect(r.code).not.toBe(0);
    expect(r.err + r.out).toMatch(/beam-only\.png/);
    expect(r.err + r.out).toMatch(/no disc shadow|not trustworthy|no coefficients/i);
    noStack(r.err);
  });

  it('refuses an all-saturated frame with advice', () => {
    const counts = new Uint16Array(128 * 128).fill(4095);
    const bad = join(tmp, 'saturated.png');
    writeFileSync(bad, encodePng16(counts, 128, 128));
    const r = run('fit', bad, '--setup', setup);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/saturated\.png/);
    expect(r.err).toMatch(/attenuate/i);
    noStack(r.err);
  });

  it('refuses NaN in a NumPy frame', () => {
    const data = new Float64Array(128 * 128).fill(100);
    data[500] = NaN;
    const bad = join(tmp, 'nan.npy');
    writeFileSync(bad, encodeNpy(data, [128, 128]));
    const r = run('fit', bad, '--setup', setup);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/nan\.npy/);
    expect(r.err).toMatch(/NaN|non-finite|not finite/i);
    noStack(r.err);
  });

  it('names a missing setup field', () => {
    const s = JSON.parse(JSON.stringify(setupJson));
    delete s.camera.pixelPitch;
    const badSetup = join(tmp, 'no-pitch.json');
    writeFileSync(badSetup, JSON.stringify(s));
    const r = run('fit', frame, '--setup', badSetup);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/no-pitch\.json: field "camera\.pixelPitch" is missing/);
    noStack(r.err);
  });
});
