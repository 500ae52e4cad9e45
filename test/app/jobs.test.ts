/**
 * The job manager (app/services/app/jobs.ts) with a stand-in worker: busy refusal, progress, failure,
 * cancel, a worker deaf to the cancel flag replaced after the grace period, and finished jobs forgotten
 * after the keeping time. Contract checks.
 */
import { fileURLToPath } from 'node:url';
import { afterEach, describe, expect, it } from 'vitest';
import { JobManager } from '../../app/services/app/jobs.ts';
import type { JobStatus } from '../../app/shared/contract.ts';

const entry = fileURLToPath(new URL('./fixtures/stand-in-worker.mjs', import.meta.url));
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function until(m: JobManager, id: string, pred: (s: JobStatus) => boolean, ms = 20_000): Promise<JobStatus> {
  const t0 = Date.now();
  for (;;) {
    const s = m.status(id);
    if (pred(s)) return s;
    if (Date.now() - t0 > ms) throw new Error(`job ${id} stayed ${s.state} at ${s.fraction}`);
    await sleep(20);
  }
}

describe('JobManager', () => {
  let m: JobManager;
  afterEach(async () => {
    await m?.close();
  });

  it('runs a job with progress to done, refuses a second of the same kind meanwhile, and accepts another kind', async () => {
    m = new JobManager({ workerEntry: entry });
    const id = m.start('fit', { steps: 40, stepMs: 10, echo: 7 });
    expect(() => m.start('fit', { steps: 1 })).toThrow(/already running/);
    const other = m.start('simulate', { steps: 1 });
    const mid = await until(m, id, (s) => s.fraction > 0 || s.state !== 'running');
    expect(mid.state === 'running' ? mid.fraction : 1).toBeGreaterThan(0);
    const end = await until(m, id, (s) => s.state !== 'running');
    expect(end).toMatchObject({ state: 'done', fraction: 1, value: { echo: 7 } });
    expect((await until(m, other, (s) => s.state !== 'running')).state).toBe('done');
    // the slot is free again
    const next = m.start('fit', { steps: 1 });
    expect((await until(m, next, (s) => s.state !== 'running')).state).toBe('done');
  });

  it('passes a failure on as the job problem', async () => {
    m = new JobManager({ workerEntry: entry });
    const id = m.start('fit', { fail: true });
    const end = await until(m, id, (s) => s.state !== 'running');
    expect(end.state).toBe('failed');
    expect(end.problem).toEqual({ kind: 'frame', message: 'a.png: mostly dark' });
  });

  it('cancels a job that reports progress; the next one runs in the same worker', async () => {
    m = new JobManager({ workerEntry: entry });
    const id = m.start('fit', { steps: 1000, stepMs: 5 });
    await until(m, id, (s) => s.fraction > 0);
    expect(m.cancel(id)).toEqual({ cancelled: true });
    expect(m.status(id).state).toBe('cancelled');
    expect(m.cancel(id)).toEqual({ cancelled: false });
    const next = m.start('fit', { steps: 2, echo: 'after' });
    const end = await until(m, next, (s) => s.state !== 'running');
    expect(end).toMatchObject({ state: 'done', value: { echo: 'after' } });
    expect(m.status(id).state).toBe('cancelled');
  });

  it('replaces a worker that does not stop after a cancel, and moves the waiting job to the new one', async () => {
    m = new JobManager({ workerEntry: entry, cancelGraceMs: 300 });
    const stuck = m.start('fit', { spinMs: 60_000 });
    await sleep(200);
    m.cancel(stuck);
    const next = m.start('fit', { steps: 1, echo: 'moved' });
    const end = await until(m, next, (s) => s.state !== 'running');
    expect(end).toMatchObject({ state: 'done', value: { echo: 'moved' } });
    expect(m.status(stuck).state).toBe('cancelled');
  });

  it('forgets finished jobs after the keeping time, with a plain not-found problem', async () => {
    let t = 1_000_000;
    m = new JobManager({ workerEntry: entry, now: () => t, keepMs: 10 * 60 * 1000 });
    const id = m.start('fit', { steps: 1 });
    await until(m, id, (s) => s.state !== 'running');
    t += 9 * 60 * 1000;
    expect(m.status(id).state).toBe('done');
    t += 2 * 60 * 1000;
    expect(() => m.status(id)).toThrow(/no job .* kept for 10 minutes/);
  });
});
