/**
 * The simulator screen's sliders, request and job polling.
 * Sources: Maréchal approximation S ≈ exp(−(2πσ)²), and RMS ≤ λ/14 ↔ S ≈ 0.8 (Born & Wolf; physics
 * notes §5); RMS of unit-RMS Zernike terms = √Σc² (orthonormal basis, ANSI Z80.28); the demo scene's
 * values are resources/demo/scene-demo.json.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  ELLIPTICITY_RANGE,
  SIM_TERMS,
  WAVES_RANGE,
  marechalStrehl,
  paramsFromSetup,
  rimDeviationM,
  rmsWaves,
  simulateRequest,
  snap,
  termLabel,
  zeroParams,
} from '../../app/renderer/src/lib/simulatorParams.ts';
import { followJob, progressText } from '../../app/renderer/src/lib/simulatorJob.ts';
import type { ApiReply, JobStatus } from '../../app/shared/contract.ts';
import { MAX_ELLIPTICITY } from '../../core/setup/parseSetup.ts';

const demoScene = JSON.parse(readFileSync(new URL('../../resources/demo/scene-demo.json', import.meta.url), 'utf8')) as Record<string, unknown>;

describe('sliders', () => {
  it('cover ANSI j = 3 … 8 and 12 with their names', () => {
    expect([...SIM_TERMS]).toEqual([3, 4, 5, 6, 7, 8, 12]);
    expect(termLabel(4)).toBe('Defocus (j = 4)');
    expect(termLabel(12)).toBe('Primary spherical (j = 12)');
  });
  it('keep the ellipticity inside what the setup format accepts', () => {
    expect(ELLIPTICITY_RANGE.max).toBeLessThan(MAX_ELLIPTICITY);
    expect(ELLIPTICITY_RANGE.min).toBeGreaterThanOrEqual(0);
  });
  it('snap a value to the nearest slider step and clamp it to the range', () => {
    expect(snap(0.0812, WAVES_RANGE)).toBeCloseTo(0.08, 12);
    expect(snap(-0.1226, WAVES_RANGE)).toBeCloseTo(-0.125, 12);
    expect(snap(0.9, WAVES_RANGE)).toBe(0.3);
  });
});

describe('starting values', () => {
  it('come from the demo scene: its aberrations, zeros elsewhere', () => {
    const p = paramsFromSetup(demoScene);
    expect(p.waves[3]).toBeCloseTo(0.03, 12);
    expect(p.waves[4]).toBeCloseTo(0.08, 12);
    expect(p.waves[5]).toBeCloseTo(0.12, 12);
    expect(p.waves[7]).toBeCloseTo(-0.04, 12);
    expect(p.waves[8]).toBeCloseTo(0.05, 12);
    expect(p.waves[6]).toBe(0);
    expect(p.waves[12]).toBe(0);
    expect(p.ellipticity).toBe(0);
  });
  it('ignore values that are not numbers', () => {
    const p = paramsFromSetup({ aberrations: { 4: '0.1 waves' }, disc: { ellipticity: 'round' } });
    expect(p).toEqual(zeroParams());
  });
});

describe('the simulate request', () => {
  it('carries the non-zero aberrations, the disc in radians and the frame size', () => {
    const p = { ...zeroParams('reference'), waves: { ...zeroParams().waves, 5: 0.12, 7: -0.04 }, ellipticity: 0.01, axisDeg: 90 };
    const req = simulateRequest(demoScene, p, { widthPx: 512, heightPx: 480 });
    expect(req.aberrationsWaves).toEqual({ '5': 0.12, '7': -0.04 });
    expect(req.disc!.ellipticity).toBe(0.01);
    expect(req.disc!.axisRad).toBeCloseTo(Math.PI / 2, 15);
    expect(req.model).toBe('reference');
    expect([req.widthPx, req.heightPx]).toEqual([512, 480]);
    expect(req.setup).toBe(demoScene);
    expect('widthPx' in simulateRequest(demoScene, p)).toBe(false);
  });
});

describe('summary figures', () => {
  it('RMS of orthonormal terms is √Σc²', () => {
    const p = { ...zeroParams(), waves: { ...zeroParams().waves, 5: 0.03, 7: 0.04 } };
    expect(rmsWaves(p)).toBeCloseTo(0.05, 15);
  });
  it('Maréchal: λ/14 RMS gives a Strehl ratio of about 0.8 (Born & Wolf)', () => {
    // exp(−(2π/14)²) = exp(−0.201420) = 0.817569
    expect(marechalStrehl(1 / 14)).toBeCloseTo(0.817569, 5);
    expect(marechalStrehl(1 / 14)).toBeGreaterThan(0.8);
    expect(marechalStrehl(1 / 14)).toBeLessThan(0.82);
    expect(marechalStrehl(0)).toBe(1);
  });
  it('sizes the rim deviation e·a of the demo disc (2.5 mm diameter)', () => {
    expect(rimDeviationM(1.25e-3, 0.01)).toBeCloseTo(12.5e-6, 12);
    expect(rimDeviationM(1.25e-3, -0.02)).toBeCloseTo(25e-6, 12);
  });
});

function status(state: JobStatus['state'], fraction: number, extra: Partial<JobStatus> = {}): ApiReply<JobStatus> {
  return { ok: true, value: { id: 'j1', kind: 'simulate', state, fraction, stage: 'rim sums', elapsedMs: 10, ...extra } };
}

describe('followJob', () => {
  const fakeJobs = (replies: ApiReply<JobStatus>[]) => {
    let k = 0;
    const asked: string[] = [];
    return {
      asked,
      api: {
        status: async (req: { id: string }) => {
          asked.push(req.id);
          return replies[Math.min(k++, replies.length - 1)];
        },
      },
    };
  };
  const noWait = { sleep: async () => {} };

  it('polls until the job is done, passing on every status', async () => {
    const { api, asked } = fakeJobs([status('running', 0.1), status('running', 0.6), status('done', 1)]);
    const seen: number[] = [];
    const end = await followJob(api, 'j1', { ...noWait, onStatus: (s) => seen.push(s.fraction) });
    expect(end.ok && end.status.state).toBe('done');
    expect(seen).toEqual([0.1, 0.6, 1]);
    expect(asked).toEqual(['j1', 'j1', 'j1']);
  });

  it('gives the problem of a failed job, and of a reply that is not ok', async () => {
    const failed = await followJob(fakeJobs([status('failed', 0.3, { problem: { kind: 'setup-field', message: 'disc.diameter "wide" is not a length' } })]).api, 'j1', noWait);
    expect(failed.ok).toBe(false);
    if (!failed.ok) expect(failed.problem.message).toContain('disc.diameter');
    const lost = await followJob(fakeJobs([{ ok: false, problem: { kind: 'connection', message: 'no answer' } }]).api, 'j1', noWait);
    expect(!lost.ok && lost.problem.kind).toBe('connection');
  });

  it('ends as cancelled, or stops following when asked', async () => {
    const c = await followJob(fakeJobs([status('running', 0.2), status('cancelled', 0.2)]).api, 'j1', noWait);
    expect(c.ok && c.status.state).toBe('cancelled');
    let polls = 0;
    const stopped = await followJob(fakeJobs([status('running', 0.2)]).api, 'j1', { sleep: async () => void polls++, stopped: () => polls >= 2 });
    expect(!stopped.ok && stopped.problem.kind).toBe('cancelled');
  });

  it('words the progress', () => {
    expect(progressText({ state: 'running', fraction: 0.456, stage: 'rim sums' })).toBe('rim sums — 46 %');
    expect(progressText({ state: 'cancelled', fraction: 0.4, stage: '' })).toBe('Cancelled.');
  });
});
