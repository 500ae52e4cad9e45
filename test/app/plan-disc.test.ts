/**
 * The app's bench-planner and disc-calibration channels (jobs.startPlan, jobs.startDiscCalibration,
 * logbook.saveDiscProfile): their validators refuse malformed arguments before the service sees them, the
 * service names a bad field at once, and a disc calibration runs as a job in the worker and is stored in
 * the disc library, never overwriting an earlier calibration unless that is confirmed.
 *
 * The one physics check is a self-consistency check: frames of our own reference model
 * (test/fixtures/make-disc-fixtures.ts) with a known disc ellipticity, recovered within 3σ of that input.
 */
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ApiReply, DiscCalibrationOutcome, JobStatus } from '../../app/shared/contract.ts';
import type { PlanReport } from '../../core/plan/types.ts';
import { callChannel } from '../../app/main/dispatch.ts';
import { checkArgument } from '../../app/main/validate.ts';
import { createAppService, type AppService } from '../../app/services/appService.ts';
import { setupPart } from '../../app/services/app/demo.ts';

const FIXTURES = join('test', 'fixtures', 'disc');
const fixtures = JSON.parse(readFileSync(join(FIXTURES, 'disc-fixtures.json'), 'utf8')) as {
  disc: { radiusM: number; ellipticity: number; axisRad: number };
  entries: { file: string; scene: Record<string, unknown>; discRotationDeg: number }[];
};

/** The setup a technician would write for the fixtures' bench: the scene's setup part with a round disc (its shape is what is measured). */
function fixtureSetup(): Record<string, unknown> {
  const s = setupPart(fixtures.entries[0]!.scene) as Record<string, unknown>;
  return { ...s, disc: { ...(s.disc as object), ellipticity: 0, ellipseAngle: '0 deg' } };
}

const blob = (file: string) => ({ name: file, data: new Uint8Array(readFileSync(join(FIXTURES, file))) });

function value<T>(r: ApiReply<T>): T {
  if (!r.ok) throw new Error(`unexpected problem: ${JSON.stringify(r.problem)}`);
  return r.value;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function waitForEnd(svc: AppService, id: string): Promise<JobStatus> {
  for (;;) {
    const s = value(await svc.jobs.status({ id }));
    if (s.state !== 'running') return s;
    await sleep(100);
  }
}

describe('validators of the planner and disc channels', () => {
  const good = {
    setup: { format: 'shadowfront-setup/1' },
    sets: [
      { angle: '0', frames: [{ name: 'a.png', data: new Uint8Array(4) }] },
      { angle: '90', frames: [{ name: 'b.png', data: new Uint8Array(4) }], darks: [] },
    ],
    beam: 'fit',
  };

  it('accept well-formed arguments', () => {
    expect(checkArgument('jobs.startPlan', { plan: { format: 'shadowfront-plan/1' } })).toBeNull();
    expect(checkArgument('jobs.startDiscCalibration', good)).toBeNull();
    expect(checkArgument('jobs.startDiscCalibration', { ...good, beam: 'ideal', harmonics: true, terms: [3, 5] })).toBeNull();
    expect(checkArgument('logbook.saveDiscProfile', { name: 'disc A', profile: {}, replace: true, notes: 'x' })).toBeNull();
  });

  it('refuse malformed arguments, naming the field', () => {
    const cases: [Parameters<typeof checkArgument>[0], unknown, RegExp][] = [
      ['jobs.startPlan', { plan: 'plan.json' }, /plan is the text "plan.json"; expected an object/],
      ['jobs.startPlan', undefined, /expected an object/],
      ['jobs.startDiscCalibration', { ...good, sets: 'both' }, /sets is the text "both"; expected a list/],
      ['jobs.startDiscCalibration', { ...good, sets: [{ angle: 90, frames: [] }] }, /sets\[0\]\.angle is number 90; expected text/],
      ['jobs.startDiscCalibration', { ...good, sets: [{ angle: '0', frames: [{ name: 'a.png', data: 'AAAA' }] }] }, /sets\[0\]\.frames\[0\]\.data is the text "AAAA"; expected the bytes of a file/],
      ['jobs.startDiscCalibration', { ...good, beam: 'known' }, /beam is the text "known"; expected "fit" or "ideal"/],
      ['jobs.startDiscCalibration', { ...good, harmonics: 'yes' }, /harmonics is the text "yes"; expected true or false/],
      ['jobs.startDiscCalibration', { ...good, sets: Array.from({ length: 37 }, () => good.sets[0]) }, /sets holds 37 items; at most 36 are accepted/],
      ['logbook.saveDiscProfile', { profile: {} }, /name is missing; expected text/],
      ['logbook.saveDiscProfile', { name: 'd', profile: [] }, /profile is a list; expected an object/],
      ['logbook.saveDiscProfile', { name: 'd', profile: {}, replace: 1 }, /replace is number 1; expected true or false/],
    ];
    for (const [channel, arg, message] of cases) expect(checkArgument(channel, arg), `${channel} ${JSON.stringify(arg)}`).toMatch(message);
  });

  it('are applied by the dispatcher before the service is called', async () => {
    let called = 0;
    const service = new Proxy({}, { get: () => new Proxy({}, { get: () => async () => ((called += 1), { ok: true, value: null }) }) });
    const r = await callChannel(service as never, 'jobs.startDiscCalibration', { ...good, beam: 'known' });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problem.kind).toBe('invalid-request');
    expect(called).toBe(0);
  });
});

describe('planner and disc calibration in the app service', () => {
  const dir = mkdtempSync(join(tmpdir(), 'shadowfront-plan-disc-'));
  let svc: AppService;

  beforeAll(() => {
    svc = createAppService({ dataDir: join(dir, 'data'), logbookPath: join(dir, 'logbook', 'shadowfront-logbook.sqlite'), demo: false, shell: 'web' });
  });

  afterAll(async () => {
    await svc?.close();
  });

  it('jobs.startPlan names a bad field at once, without starting a job', async () => {
    const example = value(await svc.plan.example());
    const r = await svc.jobs.startPlan({ plan: { ...example, camera: { ...(example.camera as object), pixelPitch: '5.3 parsecs' } } });
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.problem.kind).toBe('setup-field');
      expect(r.problem.field).toBe('camera.pixelPitch');
      expect(r.problem.message).toContain('"5.3 parsecs"');
    }
  });

  it('jobs.startDiscCalibration names a bad angle and an angle without frames', async () => {
    const bad = await svc.jobs.startDiscCalibration({ setup: fixtureSetup(), sets: [{ angle: '0', frames: [blob('disc-s1-a0.png')] }, { angle: 'ninety', frames: [blob('disc-s1-a90.png')] }], beam: 'fit' });
    expect(bad.ok).toBe(false);
    if (!bad.ok) {
      expect(bad.problem.field).toBe('disc angle 2');
      expect(bad.problem.message).toContain('"ninety"');
    }
    const empty = await svc.jobs.startDiscCalibration({ setup: fixtureSetup(), sets: [{ angle: '0', frames: [blob('disc-s1-a0.png')] }, { angle: '90', frames: [] }], beam: 'fit' });
    expect(empty.ok).toBe(false);
    if (!empty.ok) expect(empty.problem.field).toBe('sets[1].frames');
  });

  it('calibrates a disc from frames at 0° and 90° in the worker, stores it, and refuses to overwrite it unless confirmed', async () => {
    const started = value(
      await svc.jobs.startDiscCalibration({
        setup: fixtureSetup(),
        sets: [
          { angle: '0', frames: [blob('disc-s1-a0.png')] },
          { angle: '90 deg', frames: [blob('disc-s1-a90.png')] },
        ],
        beam: 'fit',
      }),
    );
    const end = await waitForEnd(svc, started.id);
    expect(end.state, JSON.stringify(end.problem)).toBe('done');
    expect(end.kind).toBe('disc');
    const c = end.value as DiscCalibrationOutcome;
    // Self-consistency: the ellipticity given to our reference model is recovered within the reported 3σ.
    expect(c.profile.sigmaEllipticity).toBeGreaterThan(0);
    expect(Math.abs(c.profile.ellipticity - fixtures.disc.ellipticity)).toBeLessThan(3 * c.profile.sigmaEllipticity);
    expect(c.profile.anglesRad[1]).toBeCloseTo(Math.PI / 2, 12);
    expect(c.trusted).toBe(true);
    expect(c.degenerate).toBe(false);

    const profile = c.profile as unknown as Record<string, unknown>;
    const first = value(await svc.logbook.saveDiscProfile({ name: 'steel disc 3 mm (test)', profile }));
    expect(first.created).toBe(true);
    const again = await svc.logbook.saveDiscProfile({ name: 'steel disc 3 mm (test)', profile });
    expect(again.ok).toBe(false);
    if (!again.ok) {
      expect(again.problem.kind).toBe('exists');
      expect(again.problem.message).toContain(`#${first.disc.id}`);
    }
    const replaced = value(await svc.logbook.saveDiscProfile({ name: 'steel disc 3 mm (test)', profile, replace: true }));
    expect(replaced).toMatchObject({ created: false, replaced: true });
    const discs = value(await svc.logbook.discs());
    expect(discs.filter((d) => d.name === 'steel disc 3 mm (test)').length).toBe(1);

    // An untrusted calibration is never stored.
    const untrusted = await svc.logbook.saveDiscProfile({ name: 'other disc', profile: { ...profile, trusted: false, degenerate: true } });
    expect(untrusted.ok).toBe(false);
    if (!untrusted.ok) expect(untrusted.problem.kind).toBe('untrusted');
  }, 120_000);

  it('runs a bench plan as a job whose value is the report', async () => {
    const example = value(await svc.plan.example());
    // two discs at two distances keep it short
    const plan = { ...example, candidates: { discDiameters: ['2 mm', '3 mm'], cameraDistances: ['0.5 m', '1 m'] } };
    const started = value(await svc.jobs.startPlan({ plan }));
    const end = await waitForEnd(svc, started.id);
    expect(end.state, JSON.stringify(end.problem)).toBe('done');
    expect(end.kind).toBe('plan');
    const report = end.value as PlanReport;
    expect(report.format).toBe('shadowfront-plan-report/1');
    expect(report.candidates.length).toBe(4);
  }, 120_000);
});
