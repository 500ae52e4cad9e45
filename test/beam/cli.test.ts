/**
 * `shadowfront beam` as a user runs it, on the synthetic example frame (resources/examples/
 * beam-synthetic-binned.png, made by test/beam/make-example-beam-frame.ts) whose beam is known by
 * construction: an elliptical Gaussian with 1/e² radii 0.90 mm and 0.65 mm at the camera. ISO 11146-1:
 * its D4σ widths are twice those radii; the setup radius is their mean, transferred to the disc plane by
 * R/(R + L) (see core/beam/beamSpec.ts).
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it, vi } from 'vitest';
import { main } from '../../app/cli/main.ts';
import { parseLength } from '../../core/units/parseQuantity.ts';
import { encodePng16 } from '../../core/imageio/png.ts';
import { EXAMPLE_BEAM, makeExampleBeamFrame } from './make-example-beam-frame.ts';
import { parseScene } from '../../core/setup/parseScene.ts';
import { simulateIntensity } from '../../core/optics/simulate.ts';
import { applyCameraNoise } from '../../core/camera/noise.ts';

const root = fileURLToPath(new URL('../..', import.meta.url));
const frame = join(root, 'resources/examples/beam-synthetic-binned.png');
const setup = join(root, 'resources/examples/setup-beam-example.json');
const tmp = mkdtempSync(join(tmpdir(), 'shadowfront-beam-'));

/** Run the command in this process (as app/cli/shadowfront.mjs does), capturing what it prints. */
async function run(...args: string[]) {
  let out = '';
  let err = '';
  const o = vi.spyOn(process.stdout, 'write').mockImplementation((s: string | Uint8Array) => ((out += String(s)), true));
  const e = vi.spyOn(process.stderr, 'write').mockImplementation((s: string | Uint8Array) => ((err += String(s)), true));
  try {
    const code = await main(args);
    return { code, out, err };
  } finally {
    o.mockRestore();
    e.mockRestore();
  }
}

describe('shadowfront beam', { timeout: 60_000 }, () => {
  it('the committed example frame is exactly what its generator makes', () => {
    expect(Buffer.compare(Buffer.from(readFileSync(frame)), Buffer.from(makeExampleBeamFrame()))).toBe(0);
  });

  it('prints the ISO 11146 results, the suggested setup fields and the safety reminder', async () => {
    const r = await run('beam', frame, '--setup', setup);
    expect(r.code).toBe(0);
    expect(r.out.split('\n')[0]).toMatch(/^Laser safety: Attenuate the beam before the camera/);
    expect(r.out).toMatch(/D4σ widths {7}dσx = 1\.\d{3} mm, dσy = 1\.\d{3} mm \(ISO 11146-1/);
    expect(r.out).toMatch(/"beam": \{ "radius": "0\.6\d\d mm", "center": \["0\.08\d mm", "-0\.04\d mm"\] \}/);
  });

  it('--json: widths, azimuth and the suggested radius and centre match the beam that was drawn', async () => {
    const r = await run('beam', frame, '--setup', setup, '--json');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.safety).toMatch(/Attenuate the beam/);
    const b = EXAMPLE_BEAM;
    const p = b.pixelPitchM;
    // ISO 11146-1: D4σ = 2 × the 1/e² radius; φ is the angle of the axis closer to x (here the major one, 15°).
    expect(Math.abs((j.moments.dSigmaXPx * p) / (2 * b.radiusUM) - 1)).toBeLessThan(0.01);
    expect(Math.abs((j.moments.dSigmaYPx * p) / (2 * b.radiusVM) - 1)).toBeLessThan(0.01);
    expect(Math.abs((j.moments.azimuthRad - b.angleRad) * (180 / Math.PI))).toBeLessThan(0.5);
    const setupJson = JSON.parse(readFileSync(setup, 'utf8'));
    const R = parseLength(setupJson.beam.curvatureRadius);
    const L = parseLength(setupJson.camera.distance);
    const wDisc = (((b.radiusUM + b.radiusVM) / 2) * R) / (R + L);
    expect(Math.abs(parseLength(j.suggestedFields.radius) / wDisc - 1)).toBeLessThan(0.005);
    expect(Math.abs(parseLength(j.suggestedFields.center[0]) - (b.centerM[0] * R) / (R + L))).toBeLessThan(2e-6);
    expect(Math.abs(parseLength(j.suggestedFields.center[1]) - (b.centerM[1] * R) / (R + L))).toBeLessThan(2e-6);
  });

  it('--shadow: the disc axis is the pattern centre of a shadow frame from the same camera position', async () => {
    // A shadow frame of the example bench (project simulator), its axis 3 px left and 2 px below the frame centre.
    const setupJson = JSON.parse(readFileSync(setup, 'utf8'));
    const p = EXAMPLE_BEAM.pixelPitchM;
    const scene = parseScene({ ...setupJson, format: 'shadowfront-scene/1', frame: { width: 320, height: 256, center: [`${3 * p * 1e6} um`, `${2 * p * 1e6} um`] } });
    const I = simulateIntensity(scene, { oversample: 1 }).intensity;
    const shadow = join(tmp, 'shadow.png');
    writeFileSync(shadow, encodePng16(applyCameraNoise(I, { peakCounts: 3000, readNoise: 3, offset: 20, seed: 3 }, scene.camera), 320, 256));
    const r = await run('beam', frame, '--setup', setup, '--shadow', shadow, '--json');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    const axis = [159.5 - 3, 127.5 + 2];
    expect(Math.hypot(j.axisPx[0] - axis[0], j.axisPx[1] - axis[1])).toBeLessThanOrEqual(1);
    expect(j.axisSource).toMatch(/pattern centre in .*shadow\.png/);
    // The beam centre is now measured from that axis: 3 px further right and 2 px further up (lab frame).
    const R = parseLength(setupJson.beam.curvatureRadius);
    const L = parseLength(setupJson.camera.distance);
    const k = R / (R + L);
    expect(Math.abs(j.suggestion.centerM[0] - (EXAMPLE_BEAM.centerM[0] + 3 * p) * k)).toBeLessThan(1.5 * p * k);
    expect(Math.abs(j.suggestion.centerM[1] - (EXAMPLE_BEAM.centerM[1] + 2 * p) * k)).toBeLessThan(1.5 * p * k);
  });

  it('refuses bad calls and bad files with messages that name the file', async () => {
    expect((await run('beam', frame)).code).toBe(2);
    expect((await run('beam', frame, '--setup', setup, '--plane', 'sensor')).err).toMatch(/--plane must be "camera" or "disc", not "sensor"/);
    const notImage = await run('beam', setup, '--setup', setup);
    expect(notImage.code).toBe(1);
    expect(notImage.err).toContain(`${setup}: unsupported format`);
    // A dark frame (offset and read noise only): refused with advice.
    const dark = join(tmp, 'dark.png');
    writeFileSync(dark, encodePng16(Uint16Array.from({ length: 64 * 48 }, (_, k) => 20 + (k % 3)), 64, 48));
    const d = await run('beam', dark, '--setup', setup);
    expect(d.code).toBe(1);
    expect(d.err).toMatch(/dark\.png: mostly dark: .*lengthen the exposure or remove attenuation/);
  });
});
