/**
 * The Node side: reading frame files and preparing a measurement for the fit, end to end through files
 * written with the project's encoders (frames simulated by the project's simulator with camera noise).
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadFramesForFit, readFrameFile, loadBenchSetup } from '../../app/services/frames.ts';
import { parseScene } from '../../core/setup/parseScene.ts';
import { simulateIntensity } from '../../core/optics/simulate.ts';
import { applyCameraNoise } from '../../core/camera/noise.ts';
import { encodePng16 } from '../../core/imageio/png.ts';
import { encodeTiff16 } from '../../core/imageio/tiff.ts';
import { FileProblem } from '../../app/services/files.ts';
import { ImageDecodeError } from '../../core/imageio/errors.ts';

const tmp = mkdtempSync(join(tmpdir(), 'shadowfront-frames-'));

describe('readFrameFile', () => {
  it('names the file in every problem', () => {
    const missing = join(tmp, 'missing.png');
    expect(() => readFrameFile(missing)).toThrow(FileProblem);
    expect(() => readFrameFile(missing)).toThrow(`${missing}: no such file`);
    const junk = join(tmp, 'junk.tif');
    writeFileSync(junk, 'not an image at all');
    expect(() => readFrameFile(junk)).toThrow(ImageDecodeError);
    expect(() => readFrameFile(junk)).toThrow(new RegExp(`^${junk.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}: unsupported format`));
  });
});

describe('loadFramesForFit', { timeout: 60_000 }, () => {
  it('reads frames and darks of mixed formats, averages, locates the pattern within 1 px and chooses the region', () => {
    const scene = parseScene({
      format: 'shadowfront-scene/1',
      wavelength: '632.8 nm',
      beam: { radius: '1.5 mm', curvatureRadius: 'collimated' },
      disc: { diameter: '0.9 mm' },
      camera: { distance: '80 mm', pixelPitch: '10 um', bitDepth: 12 },
      frame: { width: 256, height: 256, center: ['-40 um', '70 um'] },
    });
    const I = simulateIntensity(scene, { oversample: 1 }).intensity;
    const files: string[] = [];
    for (const [seed, ext] of [
      [1, 'png'],
      [2, 'tif'],
    ] as const) {
      const c = applyCameraNoise(I, { peakCounts: 3000, readNoise: 3, offset: 20, seed }, scene.camera);
      const path = join(tmp, `frame${seed}.${ext}`);
      writeFileSync(path, ext === 'png' ? encodePng16(c, 256, 256) : encodeTiff16(c, 256, 256));
      files.push(path);
    }
    const darks: string[] = [];
    for (const seed of [3, 4]) {
      const c = applyCameraNoise(new Float64Array(256 * 256), { peakCounts: 3000, readNoise: 3, offset: 20, seed }, scene.camera);
      const path = join(tmp, `dark${seed}.png`);
      writeFileSync(path, encodePng16(c, 256, 256));
      darks.push(path);
    }
    const setupPath = join(tmp, 'scene.json');
    writeFileSync(setupPath, JSON.stringify({ format: 'shadowfront-scene/1', wavelength: '632.8 nm', beam: { radius: '1.5 mm', curvatureRadius: 'collimated' }, disc: { diameter: '0.9 mm' }, camera: { distance: '80 mm', pixelPitch: '10 um', bitDepth: 12 }, frame: { width: 256, height: 256 } }));
    const setup = loadBenchSetup(setupPath);
    const r = loadFramesForFit(files, darks, setup);
    expect([r.frameCount, r.darkCount, r.backgroundMethod]).toEqual([2, 2, 'dark frames subtracted']);
    expect(r.darkMeanCounts!).toBeCloseTo(20, 0);
    expect(r.readNoiseCounts).toBeGreaterThan(2.5);
    expect(r.readNoiseCounts).toBeLessThan(3.5);
    const truth = [127.5 + 4, 127.5 + 7];
    expect(Math.hypot(r.located.centerPx[0] - truth[0], r.located.centerPx[1] - truth[1])).toBeLessThanOrEqual(1);
    expect(r.region.holdsWholeShadow).toBe(true);
    expect(r.expected.shadowRadiusPx).toBeCloseTo(45, 9);
  });
});
