/**
 * The `shadowfront` command as a user runs it: exit codes, messages that name the file, field and
 * value, and files that other tools can read (fast-png, utif2, the NumPy format).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { decode as decodePng } from 'fast-png';
import UTIF from 'utif2';
import { decodeNpy } from '../../core/imageio/npy.ts';

const root = fileURLToPath(new URL('../..', import.meta.url));
const bin = join(root, 'app/cli/shadowfront.mjs');
const tmp = mkdtempSync(join(tmpdir(), 'shadowfront-cli-'));

function run(...args: string[]) {
  const r = spawnSync(process.execPath, [bin, ...args], { cwd: root, encoding: 'utf8', timeout: 120_000 });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

const clean = join(root, 'resources/examples/scene-clean.json');

describe('shadowfront CLI', { timeout: 60_000 }, () => {
  it('prints usage with --help and lists the commands', () => {
    const r = run('--help');
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/simulate/);
    expect(r.out).toMatch(/figures/);
    const s = run('simulate', '--help');
    expect(s.code).toBe(0);
    expect(s.out).toMatch(/--model fast\|reference/);
  });

  it('rejects an unknown command and a missing argument with exit code 2', () => {
    const u = run('simulat');
    expect(u.code).toBe(2);
    expect(u.err).toMatch(/unknown command "simulat"/);
    const m = run('simulate', clean);
    expect(m.code).toBe(2);
    expect(m.err).toMatch(/missing --out/);
    const b = run('simulate', clean, '--out', join(tmp, 'x.npy'), '--model', 'slow');
    expect(b.code).toBe(2);
    expect(b.err).toMatch(/--model must be "fast" or "reference", not "slow"/);
  });

  it('writes a NumPy frame with the scene size (NumPy format spec: shape is (rows, columns))', () => {
    const out = join(tmp, 'clean.npy');
    const r = run('simulate', clean, '--out', out, '--json');
    expect(r.code).toBe(0);
    const summary = JSON.parse(r.out);
    expect(summary.model).toBe('fast');
    const scene = JSON.parse(readFileSync(clean, 'utf8'));
    const npy = decodeNpy(new Uint8Array(readFileSync(out)));
    expect(npy.dtype).toBe('<f8');
    expect(npy.shape).toEqual([scene.frame.height, scene.frame.width]);
    for (const v of npy.data) expect(Number.isFinite(v) && v >= 0).toBe(true);
  });

  it('writes 16-bit PNG and TIFF counts that fast-png and utif2 read', () => {
    const png = join(tmp, 'clean.png');
    const tif = join(tmp, 'clean.tif');
    expect(run('simulate', clean, '--out', png).code).toBe(0);
    expect(run('simulate', clean, '--out', tif).code).toBe(0);
    const p = decodePng(readFileSync(png));
    expect(p.depth).toBe(16);
    expect(p.channels).toBe(1);
    const ifds = UTIF.decode(readFileSync(tif));
    // TIFF 6.0 tags 256 (ImageWidth) and 257 (ImageLength)
    expect((ifds[0] as Record<string, number[]>).t256[0]).toBe(p.width);
    expect((ifds[0] as Record<string, number[]>).t257[0]).toBe(p.height);
    // noiseless: scaled so that the maximum is the full scale of the scene's bit depth
    const bitDepth = JSON.parse(readFileSync(clean, 'utf8')).camera.bitDepth;
    expect(Math.max(...(p.data as Uint16Array))).toBe(2 ** bitDepth - 1);
  });

  it('names the file when it does not exist or is not JSON', () => {
    const r = run('simulate', join(tmp, 'nope.json'), '--out', join(tmp, 'x.npy'));
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/nope\.json: no such file/);
    const bad = join(tmp, 'bad.json');
    writeFileSync(bad, '{ "format": ');
    const j = run('simulate', bad, '--out', join(tmp, 'x.npy'));
    expect(j.code).toBe(1);
    expect(j.err).toMatch(/bad\.json: not valid JSON/);
  });

  it('names the field and the value of a bad setting, and writes nothing', () => {
    const scene = JSON.parse(readFileSync(clean, 'utf8'));
    scene.camera.distance = '80 parsecs';
    const f = join(tmp, 'bad-field.json');
    writeFileSync(f, JSON.stringify(scene));
    const out = join(tmp, 'never.npy');
    const r = run('simulate', f, '--out', out);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/bad-field\.json: field "camera\.distance" is "80 parsecs"; expected a length/);
    expect(() => readFileSync(out)).toThrow();
    expect(r.err).not.toMatch(/at .*\.ts:\d+/); // no stack trace
  });

  it('refuses an unknown output type', () => {
    const r = run('simulate', clean, '--out', join(tmp, 'x.jpg'));
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/x\.jpg: unknown output type "\.jpg"; use \.png, \.tif or \.npy/);
  });

  it('prints the derived figures of a setup (physics notes §2 formulas)', () => {
    const r = run('figures', join(root, 'resources/examples/setup-hene-collimated.json'), '--json');
    expect(r.code).toBe(0);
    const f = JSON.parse(r.out);
    expect(f.magnification).toBe(1);
    expect(f.firstDarkRingRadiusM).toBeGreaterThan(0);
  });
});
