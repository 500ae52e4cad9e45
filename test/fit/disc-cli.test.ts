/**
 * `shadowfront disc calibrate | list` and `shadowfront fit --disc` as a user runs them, on the reference-model
 * frames of test/fixtures/make-disc-fixtures.ts: a calibration stored in the logbook's disc library, used by a
 * later fit, which records it; a single-angle calibration that is refused rather than stored; errors that
 * name what is wrong. Run in-process through the CLI's `main` (the same entry app/cli/shadowfront.mjs calls).
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it, vi } from 'vitest';
import { main } from '../../app/cli/main.ts';
import { setupToJson } from '../../core/setup/parseSetup.ts';
import { entry, sceneOf, trueC2, trueS2 } from './disc-helpers.ts';

const fx = (f: string) => fileURLToPath(new URL(`../fixtures/disc/${f}`, import.meta.url));
const tmp = mkdtempSync(join(tmpdir(), 'shadowfront-disc-'));
const db = join(tmp, 'logbook.sqlite');

/** Run the command in this process (as app/cli/shadowfront.mjs does), capturing what it prints. */
async function run(...args: string[]) {
  let out = '';
  let err = '';
  const o = vi.spyOn(process.stdout, 'write').mockImplementation((c: string | Uint8Array) => ((out += String(c)), true));
  const e = vi.spyOn(process.stderr, 'write').mockImplementation((c: string | Uint8Array) => ((err += String(c)), true));
  try {
    const code = await main(args);
    return { code, out, err };
  } finally {
    o.mockRestore();
    e.mockRestore();
  }
}

// The bench setup a user writes: the nominal, round disc (its shape is what is measured).
const scene = sceneOf(entry('disc-s0-a0.png'));
const setupPath = join(tmp, 'setup.json');
writeFileSync(setupPath, JSON.stringify(setupToJson({ ...scene, disc: { radiusM: scene.disc.radiusM, ellipticity: 0, ellipseAngleRad: 0, edgeHarmonics: [] } }), null, 2));
const common = ['--setup', setupPath, '--terms', '3,4,5', '--gain', '1', '--read-noise', '3'];

describe('shadowfront disc', { timeout: 600_000 }, () => {
  it('calibrates from two angles, stores the profile, lists it, and a later fit uses and records it', async () => {
    const c = await run('disc', 'calibrate', fx('disc-s0-a0.png'), fx('disc-s0-a90.png'), '--angles', '0,90', ...common, '--name', 'ball 3 mm #1', '--db', db, '--json');
    expect(c.err).toBe('');
    expect(c.code).toBe(0);
    const out = JSON.parse(c.out);
    expect(out.safety.some((s: string) => /laser safety officer/.test(s))).toBe(true);
    expect(out.trusted).toBe(true);
    expect(out.stored).toMatchObject({ name: 'ball 3 mm #1', created: true });
    expect(out.profile.format).toBe('shadowfront-disc-profile/1');
    const c2 = out.profile.coefficients[0];
    expect(Math.abs(c2.cos - trueC2)).toBeLessThan(3 * c2.sigmaCos);
    expect(Math.abs(c2.sin - trueS2)).toBeLessThan(3 * c2.sigmaSin);

    const l = await run('disc', 'list', '--db', db, '--json');
    expect(l.code).toBe(0);
    const discs = JSON.parse(l.out);
    expect(discs).toHaveLength(1);
    expect(discs[0]).toMatchObject({ id: out.stored.id, name: 'ball 3 mm #1' });
    expect(discs[0].profile.ellipticity).toBeCloseTo(out.profile.ellipticity, 12);
    const text = await run('disc', 'list', '--db', db);
    expect(text.out).toMatch(/ball 3 mm #1/);
    expect(text.out).toMatch(/rotation/);

    // the same name again without --replace: refused before any fitting, nothing changed
    const again = await run('disc', 'calibrate', fx('disc-s1-a0.png'), fx('disc-s1-a90.png'), '--angles', '0,90', ...common, '--name', 'ball 3 mm #1', '--db', db);
    expect(again.code).toBe(1);
    expect(again.err).toMatch(/disc #\d+ "ball 3 mm #1" already has a calibration \(made .*\): nothing was changed/);

    const f = await run('fit', fx('disc-s2-a90.png'), ...common, '--disc', 'ball 3 mm #1', '--disc-angle', '90 deg', '--db', db, '--json');
    expect(f.code).toBe(0);
    const r = JSON.parse(f.out);
    expect(r.disc).toEqual({ id: out.stored.id, name: 'ball 3 mm #1', calibratedAt: out.profile.calibratedAt });
    expect(r.warnings.some((w: string) => /disc shape is not calibrated/.test(w))).toBe(false);
    const plain = await run('fit', fx('disc-s2-a90.png'), ...common, '--json');
    expect(JSON.parse(plain.out).disc).toBeNull();
  });

  it('a single angle is not stored: exit 3, the degeneracy said in words', async () => {
    const c = await run('disc', 'calibrate', fx('disc-s1-a0.png'), '--angles', '0', ...common, '--name', 'ball B', '--db', db);
    expect(c.code).toBe(3);
    expect(c.err).toMatch(/all frames have the disc at one angle/);
    expect(c.out).toMatch(/cannot be told apart from the beam's same-order terms/);
    expect(c.out).toMatch(/not stored/);
    const l = JSON.parse((await run('disc', 'list', '--db', db, '--json')).out);
    expect(l.some((d: { name: string }) => d.name === 'ball B')).toBe(false);
  });

  it('usage and input errors name what is wrong', async () => {
    const n = await run('disc', 'calibrate', fx('disc-s0-a0.png'), fx('disc-s0-a90.png'), '--angles', '0', ...common);
    expect(n.code).toBe(2);
    expect(n.err).toMatch(/--angles gives 1 angle for 2 frame arguments/);
    const a = await run('disc', 'calibrate', fx('disc-s0-a0.png'), '--angles', '90 parsecs', ...common);
    expect(a.code).toBe(2);
    expect(a.err).toMatch(/--angles: "90 parsecs" is not an angle/);
    const u = await run('fit', fx('disc-s0-a0.png'), ...common, '--disc', 'no such disc', '--db', db);
    expect(u.code).toBe(1);
    expect(u.err).toMatch(/no disc named "no such disc" in the logbook .*known discs: #\d+ "ball 3 mm #1"/);
    const k = await run('disc', 'calibrate', fx('disc-s0-a0.png'), '--angles', '0', ...common, '--beam-known', setupPath);
    expect(k.code).toBe(1);
    expect(k.err).toMatch(/setup\.json: field "format" is "shadowfront-setup\/1"; expected "shadowfront-result\/1"/);
  });
});
