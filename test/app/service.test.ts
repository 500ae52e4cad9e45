/**
 * The app service (app/services/appService.ts) that both shells call: jobs in a worker thread with
 * progress and cancel, the fit outcome's images, the day-only safety acknowledgement, presets, previews,
 * and the logbook calls on a working copy of the bundled synthetic demo. Mostly contract checks; the one
 * statistical check names its source.
 */
import { cpSync, existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ApiReply, FitOutcome, JobStatus, SimulateOutcome } from '../../app/shared/contract.ts';
import { createAppService, type AppService } from '../../app/services/appService.ts';
import { parseScene } from '../../core/setup/parseScene.ts';
import { simulateFrame } from '../../core/optics/simulate.ts';
import { encodePng16 } from '../../core/imageio/png.ts';

const N = 128;
/** A 632.8 nm collimated beam, 2.5 mm disc, camera 0.8 m behind with 5.5 µm pixels: the frame holds the spot and rings. */
const SETUP = {
  format: 'shadowfront-setup/1',
  wavelength: '632.8 nm',
  beam: { radius: '2.5 mm', curvatureRadius: 'collimated' },
  disc: { diameter: '2.5 mm' },
  camera: { distance: '800 mm', pixelPitch: '5.5 um', bitDepth: 12 },
  zernike: { radius: '2.5 mm' },
};

function syntheticFrame(): { counts: Uint16Array; png: Uint8Array } {
  const scene = parseScene({ ...SETUP, format: 'shadowfront-scene/1', aberrations: { '4': 0.03, '5': 0.05 }, frame: { width: N, height: N }, noise: { peakCounts: 3000, readNoise: 3, offset: 20, seed: 5 } });
  const counts = simulateFrame(scene, { oversample: 1 }).counts;
  return { counts, png: encodePng16(counts, N, N) };
}

function value<T>(r: ApiReply<T>): T {
  if (!r.ok) throw new Error(`unexpected problem: ${JSON.stringify(r.problem)}`);
  return r.value;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function waitForEnd(svc: AppService, id: string, seen: JobStatus[] = []): Promise<JobStatus> {
  for (;;) {
    const s = value(await svc.jobs.status({ id }));
    seen.push(s);
    if (s.state !== 'running') return s;
    await sleep(100);
  }
}

describe('app service', () => {
  const dir = mkdtempSync(join(tmpdir(), 'shadowfront-service-'));
  const logbookDir = join(dir, 'logbook');
  const logbookPath = join(logbookDir, 'shadowfront-logbook.sqlite');
  let clock = new Date(2026, 2, 10, 9, 0, 0);
  let svc: AppService;
  let frame: { counts: Uint16Array; png: Uint8Array };
  let fitted: FitOutcome | null = null;

  beforeAll(() => {
    cpSync(join('resources', 'demo', 'logbook'), logbookDir, { recursive: true });
    svc = createAppService({ dataDir: join(dir, 'data'), logbookPath, demo: true, shell: 'web', now: () => clock });
    frame = syntheticFrame();
  }, 120_000);

  afterAll(async () => {
    await svc?.close();
  });

  it('remembers the safety acknowledgement for the current local day only', async () => {
    const first = value(await svc.safety.notice());
    expect(first.acknowledgedToday).toBe(false);
    expect(first.points.length).toBeGreaterThanOrEqual(5);
    expect(first.points.join(' ')).toMatch(/laser safety officer/);
    value(await svc.safety.acknowledge());
    expect(value(await svc.safety.notice()).acknowledgedToday).toBe(true);
    clock = new Date(2026, 2, 10, 23, 59, 0);
    expect(value(await svc.safety.notice()).acknowledgedToday).toBe(true);
    clock = new Date(2026, 2, 11, 0, 1, 0);
    expect(value(await svc.safety.notice()).acknowledgedToday).toBe(false);
    clock = new Date(2027, 2, 10, 9, 0, 0); // the same date a year later is another day
    expect(value(await svc.safety.notice()).acknowledgedToday).toBe(false);
    const stored = JSON.parse(readFileSync(join(dir, 'data', 'safety.json'), 'utf8'));
    expect(Object.keys(stored).sort()).toEqual(['acknowledgedAt', 'acknowledgedDay', 'format', 'note']);
  });

  it('checks a setup: derived figures from the worked example of the physics notes, the sensor comparison, and a bad field', async () => {
    // Physics notes §2 worked example (Fresnel diffraction, Goodman / Born & Wolf): λ = 532 nm, a point
    // source 2 m before a 3 mm disc, camera 0.8 m after it: L' = 0.571 m and Δr = λL'/(2a) ≈ 101 µm.
    const setup = {
      format: 'shadowfront-setup/1',
      wavelength: '532 nm',
      beam: { radius: '4 mm', curvatureRadius: '2 m' },
      disc: { diameter: '3 mm' },
      camera: { distance: '800 mm', pixelPitch: '5.5 um', bitDepth: 12, sensorSize: [1280, 1024] },
    };
    const c = value(await svc.setup.check({ setup }));
    expect(c.problem).toBeNull();
    expect(c.derived!.effectiveDistanceM).toBeCloseTo(0.571, 3);
    expect(c.derived!.zoneWidthM * 1e6).toBeCloseTo(101, 0);
    expect(c.derived!.rimToleranceM).toBeCloseTo(0.1 * c.derived!.zoneWidthM, 12); // 10 % rule (common practice, no published source)
    expect(c.derived!.sensorMinSidePx).toBe(1024);
    expect(c.derived!.shadowFits).toBe(c.derived!.shadowDiameterPx <= 1024);
    const noSensor = value(await svc.setup.check({ setup: { ...setup, camera: { distance: '800 mm', pixelPitch: '5.5 um', bitDepth: 12 } } }));
    expect(noSensor.derived!.sensorMinSidePx).toBeNull();
    expect(noSensor.derived!.shadowFits).toBeNull();
    expect(noSensor.derived!.notes.join(' ')).toMatch(/camera\.sensorSize/);
    const bad = value(await svc.setup.check({ setup: { ...setup, disc: { diameter: '3 parsecs' } } }));
    expect(bad.derived).toBeNull();
    expect(bad.problem).toMatchObject({ kind: 'setup-field', file: 'bench setup', field: 'disc.diameter' });
    expect(bad.problem!.message).toContain('"3 parsecs"');
    const blank = value(await svc.setup.example({ which: 'blank' }));
    expect(value(await svc.setup.check({ setup: blank })).problem).toBeNull();
    const demo = value(await svc.setup.example({ which: 'demo' }));
    expect(demo.format).toBe('shadowfront-setup/1');
    expect(value(await svc.setup.check({ setup: demo })).problem).toBeNull();
  });

  it('lists the bundled demo frames with their setups, every label saying synthetic', async () => {
    const sets = value(await svc.frames.demoFiles());
    expect(sets.length).toBeGreaterThanOrEqual(2);
    for (const s of sets) {
      expect(s.label).toMatch(/synthetic/i);
      expect(s.frames.length).toBeGreaterThan(0);
      expect(s.frames[0].data).toBeInstanceOf(Uint8Array);
      expect(value(await svc.setup.check({ setup: s.setup })).problem).toBeNull();
    }
    expect(sets[0].label).toMatch(/before cleaning/);
    expect(sets[1].label).toMatch(/after cleaning/);
  });

  it('previews a frame: region, centre and the saturated pixels in image-plane coordinates', async () => {
    const counts = Uint16Array.from(frame.counts);
    for (const [c, r] of [[10, 12], [11, 12], [10, 13]]) counts[r * N + c] = 4095;
    const png = encodePng16(counts, N, N);
    const p = value(await svc.frames.preview({ frames: [{ name: 'week.png', data: png }], darks: [], setup: SETUP }));
    expect(p.decimation).toBe(1);
    expect(p.image.widthPx).toBe(N);
    expect(p.image.data.length).toBe(N * N);
    expect(p.image.pixelM).toBeCloseTo(5.5e-6, 12);
    expect(p.saturated).toEqual(expect.arrayContaining([[10, 12], [11, 12], [10, 13]]));
    expect(p.saturated.length).toBe(3);
    expect(p.region.radiusPx).toBeGreaterThan(0);
    const over = value(await svc.frames.preview({ frames: [{ name: 'week.png', data: png }], darks: [], setup: SETUP, region: { centerPx: [60, 62], radiusPx: 40 } }));
    expect(over.region).toEqual({ centerPx: [60, 62], radiusPx: 40, wholeShadow: false });
  });

  it('names the file when frame bytes cannot be decoded', async () => {
    const r = await svc.frames.preview({ frames: [{ name: 'broken.png', data: new TextEncoder().encode('not an image') }], darks: [], setup: SETUP });
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.problem.kind).toBe('image-decode');
      expect(r.problem.file).toBe('broken.png');
      expect(r.problem.message).toMatch(/^broken\.png: unsupported format/);
    }
  });

  it('runs a fit in a worker with progress, and returns the outcome images over the analysed region', async () => {
    const start = value(await svc.jobs.startFit({ frames: [{ name: 'spot.png', data: frame.png }], darks: [], setup: SETUP, terms: [3, 4, 5], asset: 'Bench laser B-633 (synthetic)' }));
    const seen: JobStatus[] = [];
    const end = await waitForEnd(svc, start.id, seen);
    expect(end.state, JSON.stringify(end.problem)).toBe('done');
    expect(end.kind).toBe('fit');
    expect(end.fraction).toBe(1);
    expect(seen.some((s) => s.state === 'running' && s.fraction > 0 && s.fraction < 1)).toBe(true);
    const fractions = seen.map((s) => s.fraction);
    for (let i = 1; i < fractions.length; i++) expect(fractions[i]).toBeGreaterThanOrEqual(fractions[i - 1]);
    const o = end.value as FitOutcome;
    fitted = o;
    expect(o.result.zernike.terms.map((t) => t.j)).toEqual([3, 4, 5]);
    for (const plane of [o.measured, o.model, o.residual]) {
      expect(plane.widthPx).toBe(o.measured.widthPx);
      expect(plane.heightPx).toBe(o.measured.heightPx);
      expect(plane.data).toBeInstanceOf(Float32Array);
      expect(plane.data.length).toBe(plane.widthPx * plane.heightPx);
      expect(plane.pixelM).toBe(o.measured.pixelM);
    }
    const k = o.measured.pixelM / 5.5e-6;
    expect(Math.abs(k - Math.round(k))).toBeLessThan(1e-9);
    const radius = o.result.regions[0].radiusPx;
    expect(o.measured.widthPx * k).toBeGreaterThanOrEqual(Math.min(N, 2 * radius) - 2);
    expect(o.measured.widthPx * k).toBeLessThanOrEqual(N);
    // Normalised residuals of the fitted model have unit variance when the model and the noise model
    // are right (definition of χ²; Press et al., Numerical Recipes, §15.1): their RMS must be near 1.
    let s2 = 0;
    let n = 0;
    for (const v of o.residual.data) {
      if (Number.isFinite(v)) {
        s2 += v * v;
        n++;
      }
    }
    expect(n).toBeGreaterThan(1000);
    expect(Math.sqrt(s2 / n)).toBeGreaterThan(0.8);
    expect(Math.sqrt(s2 / n)).toBeLessThan(1.25);
    expect(o.profile.radiusM.length).toBeGreaterThan(10);
    expect(o.profile.measured.length).toBe(o.profile.radiusM.length);
    expect(o.profile.model.length).toBe(o.profile.radiusM.length);
    for (let i = 1; i < o.profile.radiusM.length; i++) expect(o.profile.radiusM[i]).toBeGreaterThan(o.profile.radiusM[i - 1]);
    expect(o.wavefront.widthPx).toBe(128);
    expect(o.wavefront.heightPx).toBe(128);
    expect(o.wavefront.data[0]).toBeNaN(); // a corner lies outside the unit disc
    expect(Number.isFinite(o.wavefront.data[64 * 128 + 64])).toBe(true);
    // The demo asset has limits (0.072 waves RMS, Strehl 0.8): a verdict with reasons.
    expect(o.verdict).not.toBeNull();
    expect(['pass', 'warn', 'fail']).toContain(o.verdict!.level);
    expect(o.verdict!.reasons.join(' ')).toMatch(/Bench laser B-633/);
  }, 240_000);

  it('refuses a second fit while one runs, and reports a cancelled job as cancelled', async () => {
    const first = value(await svc.jobs.startFit({ frames: [{ name: 'spot.png', data: frame.png }], darks: [], setup: SETUP }));
    const second = await svc.jobs.startFit({ frames: [{ name: 'spot.png', data: frame.png }], darks: [], setup: SETUP });
    expect(second.ok).toBe(false);
    if (!second.ok) expect(second.problem.kind).toBe('busy');
    expect(value(await svc.jobs.cancel({ id: first.id }))).toEqual({ cancelled: true });
    const s = value(await svc.jobs.status({ id: first.id }));
    expect(s.state).toBe('cancelled');
    expect(s.problem?.kind).toBe('cancelled');
    expect(value(await svc.jobs.cancel({ id: first.id }))).toEqual({ cancelled: false });
    const unknown = await svc.jobs.status({ id: 'no-such-job' });
    expect(unknown.ok).toBe(false);
    if (!unknown.ok) expect(unknown.problem.kind).toBe('not-found');
  }, 240_000);

  it('runs a small simulation job with the fast model', async () => {
    const start = value(await svc.jobs.startSimulate({ setup: SETUP, aberrationsWaves: { '5': 0.05 }, widthPx: 48, heightPx: 32, model: 'fast' }));
    const end = await waitForEnd(svc, start.id);
    expect(end.state, JSON.stringify(end.problem)).toBe('done');
    const o = end.value as SimulateOutcome;
    expect(o.image.widthPx).toBe(48);
    expect(o.image.heightPx).toBe(32);
    expect(o.image.data.length).toBe(48 * 32);
    expect(o.notes.join(' ')).toMatch(/Synthetic/);
    const bad = await svc.jobs.startSimulate({ setup: SETUP, aberrationsWaves: { '-1': 0.1 } });
    if (bad.ok) {
      const e = await waitForEnd(svc, bad.value.id);
      expect(e.state).toBe('failed');
      expect(e.problem?.message).toMatch(/"-1" is not an ANSI index/);
    }
  }, 240_000);

  it('gives the example bench plan, and runs a plan in a worker, naming a bad field', async () => {
    const example = value(await svc.plan.example());
    expect(example.format).toBe('shadowfront-plan/1');
    const r = await svc.plan.run({ plan: { ...example, laser: { ...(example.laser as object), wavelength: '633 parsecs' } } });
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.problem.kind).toBe('setup-field');
      expect(r.problem.field).toBe('laser.wavelength');
      expect(r.problem.message).toContain('"633 parsecs"');
    }
  }, 240_000);

  it('saves presets per asset, replaces by name, refuses an invalid setup and never overwrites a damaged file', async () => {
    const a = value(await svc.setup.savePreset({ asset: 'Bench A', name: 'short distance', setup: SETUP }));
    value(await svc.setup.savePreset({ asset: 'Bench B', name: 'other', setup: SETUP }));
    const again = value(await svc.setup.savePreset({ asset: 'Bench A', name: 'short distance', setup: { ...SETUP, note: 'second' } }));
    expect(again.id).toBe(a.id);
    const listA = value(await svc.setup.listPresets({ asset: 'Bench A' }));
    expect(listA.length).toBe(1);
    expect(listA[0].setup.note).toBe('second');
    expect(value(await svc.setup.listPresets({})).length).toBe(2);
    const bad = await svc.setup.savePreset({ asset: 'Bench A', name: 'bad', setup: { ...SETUP, wavelength: 632.8 } });
    expect(bad.ok).toBe(false);
    if (!bad.ok) {
      expect(bad.problem.kind).toBe('setup-field');
      expect(bad.problem.field).toBe('wavelength');
    }
    expect(value(await svc.setup.deletePreset({ id: a.id }))).toEqual({ deleted: true });
    expect(value(await svc.setup.deletePreset({ id: a.id }))).toEqual({ deleted: false });
    const file = join(dir, 'data', 'presets.json');
    writeFileSync(file, '{ damaged');
    const refused = await svc.setup.savePreset({ asset: 'Bench A', name: 'x', setup: SETUP });
    expect(refused.ok).toBe(false);
    if (!refused.ok) expect(refused.problem.file).toBe(file);
    expect(readFileSync(file, 'utf8')).toBe('{ damaged');
  });

  it('reads the demo logbook: search, compare, trend, CSV and HTML report', async () => {
    const info = value(await svc.logbook.info());
    expect(info.demo).toBe(true);
    expect(info.measurements).toBeGreaterThan(0);
    const all = value(await svc.logbook.measurements({}));
    expect(all.length).toBe(info.measurements);
    const word = all.find((m) => m.notes.trim())!.notes.trim().split(/\s+/)[0];
    const found = value(await svc.logbook.measurements({ text: word.toUpperCase() }));
    expect(found.length).toBeGreaterThan(0);
    expect(found.every((m) => `${m.notes} ${m.tags.join(' ')} ${m.assetName}`.toLowerCase().includes(word.toLowerCase()))).toBe(true);
    expect(value(await svc.logbook.measurements({ text: 'no-such-word-anywhere' }))).toEqual([]);
    const [a, b] = [all[0].id, all[all.length - 1].id];
    const cmp = value(await svc.logbook.compare({ a, b }));
    expect(cmp.wavefrontA.widthPx).toBe(cmp.wavefrontB.widthPx);
    const asset = value(await svc.logbook.assets())[0].name;
    const trend = value(await svc.logbook.trend({ asset }));
    expect(trend).toBeTruthy();
    const csv = value(await svc.logbook.exportCsv({}));
    expect(csv.mime).toBe('text/csv');
    expect(new TextDecoder().decode(csv.data).split('\r\n').filter(Boolean).length).toBe(all.length + 1);
    const report = value(await svc.logbook.exportReport({ kind: 'comparison', ids: [a, b] }));
    expect(report.mime).toBe('text/html');
    expect(new TextDecoder().decode(report.data)).toMatch(/<html/i);
    const missing = await svc.logbook.measurement({ id: 999999 });
    expect(missing.ok).toBe(false);
    if (!missing.ok) expect(missing.problem.kind).toBe('logbook');
  });

  it('saves a fitted measurement with its frames under a new asset, and leaves the lock free', async () => {
    expect(fitted).not.toBeNull();
    const before = value(await svc.logbook.info()).measurements;
    const saved = value(
      await svc.logbook.save({ asset: 'Test bench (synthetic)', tags: ['after-cleaning'], notes: 'saved by the service test', setup: SETUP, frames: [{ name: 'spot.png', data: frame.png }], darks: [], result: fitted!.result }),
    );
    const record = value(await svc.logbook.measurement({ id: saved.id }));
    expect(record.assetName).toBe('Test bench (synthetic)');
    expect(record.tags).toEqual(['after-cleaning']);
    expect(record.frames.map((f) => f.name)).toEqual(['spot.png']);
    expect(value(await svc.logbook.info()).measurements).toBe(before + 1);
    expect(existsSync(`${logbookPath}.lock`)).toBe(false);
  });
});
