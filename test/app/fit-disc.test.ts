/**
 * The app's fit with a calibrated disc of the library (jobs.startFit with `disc` and `discAngleDeg`): the
 * validator refuses a malformed disc or angle; the service reads the disc's profile from its own logbook and
 * hands it to the fit in the worker; the result records which calibration was used and no longer warns that
 * astigmatism may include the disc's shape; an unknown disc, or one without a calibrated shape, gives a plain
 * problem naming it before any job starts.
 *
 * Frames: test/fixtures/make-disc-fixtures.ts (synthetic, our reference model with a known disc ellipticity).
 * The stored profile is that disc's simulated shape, declared as known (a reference-beam style profile, no
 * uncertainty), so the fit's recovery of the beam is a self-consistency check of the reference model and the
 * fit, each coefficient within 3σ of the value simulated.
 */
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ApiReply, FitOutcome, JobStatus } from '../../app/shared/contract.ts';
import { checkArgument } from '../../app/main/validate.ts';
import { createAppService, type AppService } from '../../app/services/appService.ts';
import { setupPart } from '../../app/services/app/demo.ts';
import { openLogbook } from '../../app/services/logbook/logbook.ts';
import { DISC_PROFILE_FORMAT } from '../../core/fit/disc/profile.ts';

const FIXTURES = join('test', 'fixtures', 'disc');
const fixtures = JSON.parse(readFileSync(join(FIXTURES, 'disc-fixtures.json'), 'utf8')) as {
  disc: { radiusM: number; ellipticity: number; axisRad: number };
  beam: { j: number; waves: number }[];
  entries: { file: string; scene: Record<string, unknown>; discRotationDeg: number }[];
};
const FRAME = 'disc-s2-a90.png';
const frameEntry = fixtures.entries.find((e) => e.file === FRAME)!;

/** The bench setup a technician writes for the fixtures: the scene's setup part with a round disc. */
function fixtureSetup(): Record<string, unknown> {
  const s = setupPart(frameEntry.scene) as Record<string, unknown>;
  return { ...s, disc: { ...(s.disc as object), ellipticity: 0, ellipseAngle: '0 deg' } };
}

/** The fixtures' disc as simulated (its own frame, disc rotation 0), stored as a known profile. */
function knownProfile(): Record<string, unknown> {
  const { radiusM, ellipticity, axisRad } = fixtures.disc;
  return {
    format: DISC_PROFILE_FORMAT,
    radiusM,
    ellipticity,
    sigmaEllipticity: null,
    axisRad,
    sigmaAxisRad: null,
    harmonics: [],
    coefficients: [{ order: 2, cos: ellipticity * Math.cos(2 * axisRad), sin: ellipticity * Math.sin(2 * axisRad), sigmaCos: null, sigmaSin: null, correlation: null }],
    calibratedAt: '2026-03-01T09:00:00.000Z',
    method: 'reference-beam',
    beam: 'known',
    beamTerms: [],
    anglesRad: [0],
    frames: ['the simulated disc of test/fixtures/disc (synthetic)'],
    separation: [],
    degenerate: false,
    trusted: true,
    chi2PerDof: 1,
    warnings: [],
    software: 'shadowfront test',
  };
}

const frame = () => ({ name: FRAME, data: new Uint8Array(readFileSync(join(FIXTURES, FRAME))) });
const DISC_WARNING = /disc shape is not calibrated: astigmatism may include disc ellipticity/;

function value<T>(r: ApiReply<T>): T {
  if (!r.ok) throw new Error(`unexpected problem: ${JSON.stringify(r.problem)}`);
  return r.value;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function fitToEnd(svc: AppService, id: string): Promise<FitOutcome> {
  for (;;) {
    const s: JobStatus = value(await svc.jobs.status({ id }));
    if (s.state === 'running') {
      await sleep(100);
      continue;
    }
    expect(s.state, JSON.stringify(s.problem)).toBe('done');
    return s.value as FitOutcome;
  }
}

describe('validator of jobs.startFit: disc and disc angle', () => {
  const good = { frames: [{ name: 'a.png', data: new Uint8Array(4) }], darks: [], setup: {} };
  it('accepts a disc id or name and a finite angle', () => {
    expect(checkArgument('jobs.startFit', { ...good, disc: 3 })).toBeNull();
    expect(checkArgument('jobs.startFit', { ...good, disc: 'ball 3 mm', discAngleDeg: 90 })).toBeNull();
  });
  it('refuses anything else, naming the field', () => {
    expect(checkArgument('jobs.startFit', { ...good, disc: 2.5 })).toMatch(/disc is number 2\.5; expected a whole number/);
    expect(checkArgument('jobs.startFit', { ...good, disc: { id: 3 } })).toMatch(/disc is an object; expected text or a whole number/);
    expect(checkArgument('jobs.startFit', { ...good, disc: 3, discAngleDeg: '90 deg' })).toMatch(/discAngleDeg is the text "90 deg"; expected a finite number/);
  });
});

describe('the app fit with a calibrated disc', { timeout: 300_000 }, () => {
  const dir = mkdtempSync(join(tmpdir(), 'shadowfront-fit-disc-'));
  const logbookPath = join(dir, 'logbook', 'shadowfront-logbook.sqlite');
  let svc: AppService;
  let discId = 0;

  beforeAll(async () => {
    svc = createAppService({ dataDir: join(dir, 'data'), logbookPath, demo: false, shell: 'web' });
    const saved = value(await svc.logbook.saveDiscProfile({ name: 'ball 3 mm (synthetic)', profile: knownProfile() }));
    discId = saved.disc.id;
    // A disc in the library without a calibrated shape (e.g. entered with its nominal size only).
    const lb = await openLogbook(logbookPath, { write: true, command: 'test' });
    try {
      lb.addDisc({ name: 'plain disc', nominalDiameterM: 0.003 });
    } finally {
      lb.close();
    }
  });

  afterAll(async () => {
    await svc?.close();
  });

  it('applies the stored profile: the result names the calibration and drops the disc-shape warning', async () => {
    const base = { frames: [frame()], darks: [], setup: fixtureSetup(), terms: [3, 4, 5] };
    const plain = await fitToEnd(svc, value(await svc.jobs.startFit(base)).id);
    expect(plain.result.disc).toBeNull();
    expect(plain.result.warnings.some((w) => DISC_WARNING.test(w))).toBe(true);

    const withDisc = await fitToEnd(svc, value(await svc.jobs.startFit({ ...base, disc: discId, discAngleDeg: frameEntry.discRotationDeg })).id);
    const r = withDisc.result;
    expect(r.disc).toEqual({ id: discId, name: 'ball 3 mm (synthetic)', calibratedAt: '2026-03-01T09:00:00.000Z' });
    expect(r.warnings.some((w) => DISC_WARNING.test(w))).toBe(false);
    expect(r.trusted).toBe(true);
    // Self-consistency (our reference model in, our fit out): with the disc's shape known, each beam term is
    // recovered within 3σ of the value simulated.
    for (const t of fixtures.beam) {
      const fitted = r.zernike.terms.find((x) => x.j === t.j)!;
      expect(fitted.sigmaWaves).toBeGreaterThan(0);
      expect(Math.abs(fitted.waves - t.waves), `j=${t.j}: fitted ${fitted.waves} ± ${fitted.sigmaWaves}, simulated ${t.waves}`).toBeLessThan(3 * fitted.sigmaWaves);
    }
  });

  it('names an unknown disc, and a disc without a calibrated shape, before any job starts', async () => {
    const base = { frames: [frame()], darks: [], setup: fixtureSetup() };
    const unknown = await svc.jobs.startFit({ ...base, disc: 'no such disc' });
    expect(unknown.ok).toBe(false);
    if (!unknown.ok) {
      expect(unknown.problem.kind).toBe('not-found');
      expect(unknown.problem.field).toBe('disc');
      expect(unknown.problem.message).toContain('"no such disc"');
      expect(unknown.problem.message).toContain(`#${discId} "ball 3 mm (synthetic)"`);
    }
    const missingId = await svc.jobs.startFit({ ...base, disc: 9999 });
    expect(missingId.ok).toBe(false);
    if (!missingId.ok) expect(missingId.problem.message).toContain('#9999');

    const plain = await svc.jobs.startFit({ ...base, disc: 'plain disc' });
    expect(plain.ok).toBe(false);
    if (!plain.ok) {
      expect(plain.problem.kind).toBe('not-calibrated');
      expect(plain.problem.field).toBe('disc');
      expect(plain.problem.message).toMatch(/"plain disc" has no calibrated shape/);
    }

    const angleAlone = await svc.jobs.startFit({ ...base, discAngleDeg: 90 });
    expect(angleAlone.ok).toBe(false);
    if (!angleAlone.ok) expect(angleAlone.problem.field).toBe('discAngleDeg');
  });
});
