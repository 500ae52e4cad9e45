/**
 * The bundled demo scenario (resources/demo/, made by test/fixtures/make-demo-scenario.ts) holds together.
 *
 * Most checks here are SELF-CONSISTENCY checks: the truth scenes are our own simulation input, so "every
 * stored fit result is within its 3σ of the truth" only shows that the bundle is coherent (the logbook holds
 * the fits of exactly these frames, made with this setup), not that the physics is right; the physics is
 * checked against outside sources in test/optics and test/fit.
 *
 * The outside check is the story's claim against the Maréchal criterion (Born & Wolf, from memory): a beam
 * is diffraction-limited when its RMS wavefront error is at most about λ/14 ≈ 0.072 waves, i.e. a Strehl
 * ratio S ≈ exp(−(2π·σ)²) of at least 0.8. Before cleaning the truth must be beyond both, after it within both.
 */
import { createHash } from 'node:crypto';
import { existsSync, readFileSync, readdirSync, statSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseSetup } from '../../core/setup/parseSetup.ts';
import { parseScene } from '../../core/setup/parseScene.ts';
import type { Scene } from '../../core/setup/types.ts';
import { decodeFrame } from '../../core/imageio/decodeFrame.ts';
import { rms } from '../../core/zernike/index.ts';
import { openLogbook, framesDir, type Logbook } from '../../app/services/logbook/index.ts';

const DEMO = fileURLToPath(new URL('../../resources/demo/', import.meta.url));

interface ScenarioEntry {
  label: string;
  takenAt: string;
  tags: string[];
  setup: string;
  frames: string[];
  truth: string;
  logbookMeasurementId: number;
}
interface Scenario {
  format: string;
  note: string;
  seed: number;
  asset: { name: string; wavelengthM: number; limitRmsWaves: number; limitStrehl: number };
  disc: { name: string; nominalDiameterM: number };
  terms: number[];
  logbook: string;
  measurements: ScenarioEntry[];
  featured: { before: number; after: number };
}

const scenario = JSON.parse(readFileSync(join(DEMO, 'scenario.json'), 'utf8')) as Scenario;
const truthScene = (m: ScenarioEntry): Scene => parseScene(JSON.parse(readFileSync(join(DEMO, m.truth), 'utf8')), m.truth);
const truthRms = (s: Scene) => rms(s.aberrations.map((t) => ({ j: t.j, value: t.waves })), { excludePistonTilt: true });
/** Maréchal approximation of the Strehl ratio (physics notes §5). */
const strehl = (rmsWaves: number) => Math.exp(-((2 * Math.PI * rmsWaves) ** 2));

/** Maréchal criterion (Born & Wolf, from memory): RMS ≤ λ/14 ≈ 0.072 waves, Strehl ≥ 0.8. */
const MARECHAL_RMS_WAVES = 0.072;
const MARECHAL_STREHL = 0.8;

describe('bundled demo scenario: files (self-consistency)', () => {
  it('scenario.json is labelled synthetic, states its seed and names files that exist', () => {
    expect(scenario.format).toBe('shadowfront-demo/1');
    expect(scenario.note).toMatch(/synthetic/i);
    expect(Number.isInteger(scenario.seed)).toBe(true);
    expect(scenario.note).toContain(String(scenario.seed));
    expect(scenario.measurements.length).toBeGreaterThanOrEqual(9);
    expect(existsSync(join(DEMO, scenario.logbook))).toBe(true);
    expect(existsSync(framesDir(join(DEMO, scenario.logbook)))).toBe(true);
    for (const m of scenario.measurements) {
      for (const rel of [m.setup, m.truth, ...m.frames]) expect(existsSync(join(DEMO, rel)), `${m.label}: ${rel}`).toBe(true);
    }
    const { before, after } = scenario.featured;
    expect(scenario.measurements[before].tags).toContain('before-cleaning');
    expect(scenario.measurements[after].tags).toContain('after-cleaning');
    expect(scenario.measurements[after].takenAt > scenario.measurements[before].takenAt).toBe(true);
  });

  it('every setup and truth scene parses; the truth is labelled synthetic with its seeds; frames are 256×256', () => {
    for (const m of scenario.measurements) {
      const setup = parseSetup(JSON.parse(readFileSync(join(DEMO, m.setup), 'utf8')), m.setup);
      const truth = truthScene(m);
      const note = (JSON.parse(readFileSync(join(DEMO, m.truth), 'utf8')) as { note?: string }).note ?? '';
      expect(note).toMatch(/synthetic/i);
      expect(note).toContain(String(scenario.seed));
      expect(note).toContain(String(truth.noise!.seed));
      // the fitted coefficients and the truth share wavelength and normalisation radius
      expect(truth.wavelengthM).toBe(setup.wavelengthM);
      expect(truth.zernikeRadiusM).toBe(setup.zernikeRadiusM);
      expect(setup.wavelengthM).toBeCloseTo(scenario.asset.wavelengthM, 15);
      expect(2 * setup.disc.radiusM).toBeCloseTo(scenario.disc.nominalDiameterM, 12);
      for (const f of m.frames) {
        const frame = decodeFrame(new Uint8Array(readFileSync(join(DEMO, f))), f);
        expect([frame.widthPx, frame.heightPx]).toEqual([truth.frame.widthPx, truth.frame.heightPx]);
        expect([frame.widthPx, frame.heightPx]).toEqual([256, 256]);
      }
    }
  });

  it('resources/demo stays below 3 MB (project limit)', () => {
    const bytes = (dir: string): number => readdirSync(dir).reduce((n, f) => n + (statSync(join(dir, f)).isDirectory() ? bytes(join(dir, f)) : statSync(join(dir, f)).size), 0);
    expect(bytes(DEMO)).toBeLessThan(3e6);
  });
});

describe('bundled demo scenario: the filled logbook (self-consistency: the truth is our own simulation input)', () => {
  let lb: Logbook;
  beforeAll(async () => {
    lb = await openLogbook(join(DEMO, scenario.logbook), { write: false });
  });
  afterAll(() => lb?.close());

  it('holds the asset with the Maréchal limits and the disc', () => {
    const asset = lb.getAsset(scenario.asset.name)!;
    expect(asset).toBeDefined();
    expect(asset.limitRmsWaves).toBe(MARECHAL_RMS_WAVES);
    expect(asset.limitStrehl).toBe(MARECHAL_STREHL);
    expect(lb.getDisc(scenario.disc.name)?.nominalDiameterM).toBe(scenario.disc.nominalDiameterM);
    expect(lb.listMeasurements({ asset: scenario.asset.name }).length).toBe(scenario.measurements.length);
  });

  for (const [i, m] of scenario.measurements.entries()) {
    it(`${m.label}: stored frames are the bundled ones, and each fitted term is within its 3σ of the truth`, () => {
      const rec = lb.requireMeasurement(m.logbookMeasurementId);
      expect(rec.takenAt).toBe(new Date(m.takenAt).toISOString());
      expect([...rec.tags].sort()).toEqual([...m.tags].sort());
      expect(rec.notes).toMatch(/synthetic/i);
      const stored = rec.frames.filter((f) => f.role === 'frame').map((f) => f.sha256);
      const bundled = m.frames.map((f) => createHash('sha256').update(readFileSync(join(DEMO, f))).digest('hex'));
      expect(stored).toEqual(bundled);
      const result = rec.results[rec.results.length - 1].result;
      const truth = truthScene(m);
      expect(result.trusted).toBe(true);
      expect(result.wavelength_m).toBe(truth.wavelengthM);
      expect(result.zernike.radius_m).toBe(truth.zernikeRadiusM);
      expect(result.zernike.terms.map((t) => t.j)).toEqual(scenario.terms);
      for (const t of result.zernike.terms) {
        const want = truth.aberrations.find((a) => a.j === t.j)?.waves ?? 0;
        expect(Math.abs(t.waves - want), `${m.label} (#${i}) j=${t.j}: ${t.waves} ± ${t.sigmaWaves} vs ${want}`).toBeLessThanOrEqual(3 * t.sigmaWaves);
      }
    });
  }
});

describe('the story against the Maréchal criterion (Born & Wolf, from memory)', () => {
  it('λ/14 and Strehl 0.8 are the same criterion under S ≈ exp(−(2πσ)²)', () => {
    expect(strehl(1 / 14)).toBeGreaterThan(0.8);
    expect(strehl(1 / 14)).toBeLessThan(0.83);
  });

  it('before cleaning the truth is beyond the limit (RMS > 0.072 waves, Strehl < 0.8); after cleaning well within', () => {
    const before = truthRms(truthScene(scenario.measurements[scenario.featured.before]));
    const after = truthRms(truthScene(scenario.measurements[scenario.featured.after]));
    expect(before).toBeGreaterThan(MARECHAL_RMS_WAVES);
    expect(strehl(before)).toBeLessThan(MARECHAL_STREHL);
    expect(after).toBeLessThan(MARECHAL_RMS_WAVES / 2);
    expect(strehl(after)).toBeGreaterThan(MARECHAL_STREHL);
  });

  it('the cleaning is the only measurement beyond the limit: astigmatism grows before it and drops after', () => {
    const rmsAll = scenario.measurements.map((m) => truthRms(truthScene(m)));
    const beyond = rmsAll.map((r, k) => (r > MARECHAL_RMS_WAVES ? k : -1)).filter((k) => k >= 0);
    expect(beyond).toEqual([scenario.featured.before]);
    const astig = scenario.measurements.map((m) => {
      const s = truthScene(m);
      return Math.hypot(s.aberrations.find((a) => a.j === 3)?.waves ?? 0, s.aberrations.find((a) => a.j === 5)?.waves ?? 0);
    });
    for (let k = 1; k <= scenario.featured.before; k++) expect(astig[k]).toBeGreaterThan(astig[k - 1]);
    expect(astig[scenario.featured.after]).toBeLessThan(astig[scenario.featured.before] / 3);
  });
});
