/**
 * The job worker: runs fits and simulations off the calling thread and posts progress back.
 *
 * Messages in:  { type: 'run', jobId, kind: 'fit' | 'simulate' | 'plan' | 'disc', payload, cancel: SharedArrayBuffer(4) }
 * Messages out: { type: 'progress', jobId, fraction, stage } | { type: 'done', jobId, value }
 *               | { type: 'failed', jobId, problem } | { type: 'cancelled', jobId }
 * Cancelling: the caller sets cancel[0] = 1; the next progress call returns false and the work stops.
 */
import { parentPort } from 'node:worker_threads';
import { runFitJob, runSimulateJob, type FitJobPayload, type SimulateJobPayload } from './jobRunners.ts';
import { toProblem } from './problems.ts';

export interface RunMessage {
  type: 'run';
  jobId: string;
  kind: 'fit' | 'simulate' | 'plan' | 'disc';
  payload: unknown;
  cancel: SharedArrayBuffer;
}

/** Typed-array buffers inside a value, to transfer rather than copy. */
function buffersOf(value: unknown, out: ArrayBuffer[] = [], seen = new Set<unknown>()): ArrayBuffer[] {
  if (!value || typeof value !== 'object' || seen.has(value)) return out;
  seen.add(value);
  if (ArrayBuffer.isView(value)) {
    const b = value.buffer;
    if (b instanceof ArrayBuffer && !out.includes(b) && value.byteLength === b.byteLength) out.push(b);
    return out;
  }
  for (const v of Object.values(value)) buffersOf(v, out, seen);
  return out;
}

const port = parentPort;
if (!port) throw new Error('jobWorker.ts must run in a worker thread');

/** A bench plan (app/services/planService.ts), loaded on first use. */
async function runPlan(payload: { plan: unknown }, progress: (fraction: number, stage: string) => boolean): Promise<unknown> {
  const { runPlanJson } = await import('../planService.ts');
  return runPlanJson(payload.plan, 'bench plan', (f) => progress(f, 'planning'));
}

/** A disc calibration (./disc.ts), loaded on first use. */
async function runDisc(payload: unknown, progress: (fraction: number, stage: string) => boolean): Promise<unknown> {
  const { runDiscJob } = await import('./disc.ts');
  return runDiscJob(payload as import('./disc.ts').DiscJobPayload, progress);
}

port.on('message', async (msg: RunMessage) => {
  if (msg?.type !== 'run') return;
  const flag = new Int32Array(msg.cancel);
  let last = 0;
  let lastFraction = -1;
  const progress = (fraction: number, stage: string): boolean => {
    if (Atomics.load(flag, 0) === 1) return false;
    const now = Date.now();
    if (now - last >= 100 || fraction - lastFraction >= 0.05 || fraction >= 1) {
      last = now;
      lastFraction = fraction;
      port.postMessage({ type: 'progress', jobId: msg.jobId, fraction: Math.max(0, Math.min(1, fraction)), stage });
    }
    return true;
  };
  try {
    const value =
      msg.kind === 'fit'
        ? runFitJob(msg.payload as FitJobPayload, progress)
        : msg.kind === 'simulate'
          ? runSimulateJob(msg.payload as SimulateJobPayload, progress)
          : msg.kind === 'disc'
            ? await runDisc(msg.payload, progress)
            : await runPlan(msg.payload as { plan: unknown }, progress);
    port.postMessage({ type: 'done', jobId: msg.jobId, value }, buffersOf(value));
  } catch (err) {
    if ((err as Error)?.name === 'CancelledError' || Atomics.load(flag, 0) === 1) port.postMessage({ type: 'cancelled', jobId: msg.jobId });
    else port.postMessage({ type: 'failed', jobId: msg.jobId, problem: toProblem(err) });
  }
});
