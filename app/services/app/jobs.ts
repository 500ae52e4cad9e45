/**
 * Long work (fits, simulations, bench plans) as jobs, each kind in its own worker thread (worker.mjs → jobWorker.ts),
 * so the caller's thread never waits on them. One job at a time per kind: a second start while one runs
 * is refused as "busy". The interface polls `status`; `cancel` signals the worker through shared memory
 * (the work stops at its next progress report) and terminates it if it has not stopped within a grace
 * period. Finished jobs are kept for KEEP_FINISHED_MS, then forgotten.
 */
import { randomUUID } from 'node:crypto';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import type { ApiProblem, JobKind, JobStatus } from '../../shared/contract.ts';
import { AppProblem, type InternalLogger, logToStderr } from './problems.ts';

export const KEEP_FINISHED_MS = 10 * 60 * 1000;
/** A cancelled job's worker that has not stopped by then is terminated. */
export const CANCEL_GRACE_MS = 2000;

/** Defined (true) only in the electron-vite build of the main process and the web mode (electron.vite.config.ts). */
declare const __SHADOWFRONT_BUNDLED__: boolean | undefined;

/** The default worker entry: the built out/main/jobWorker.js in a build, else worker.mjs beside this file (tsx). */
export function defaultWorkerEntry(): string {
  if (typeof __SHADOWFRONT_BUNDLED__ !== 'undefined' && __SHADOWFRONT_BUNDLED__) return fileURLToPath(new URL('../../../out/main/jobWorker.js', import.meta.url));
  return fileURLToPath(new URL('./worker.mjs', import.meta.url));
}

/** The kinds of work: the interface's job kinds (a bench plan is also awaited whole by the service's plan.run). */
export type WorkKind = JobKind;

type JobValue = NonNullable<JobStatus['value']>;

interface Job {
  id: string;
  kind: WorkKind;
  state: JobStatus['state'];
  fraction: number;
  stage: string;
  startedAt: number;
  endedAt: number | null;
  value?: JobValue;
  problem?: ApiProblem;
  cancel: Int32Array;
  /** A job awaited whole by the service (`run`): not visible through `status`. */
  hidden?: boolean;
  /** Called once when the job leaves the running state. */
  onEnd?: () => void;
}

interface Slot {
  worker: Worker;
  /** Jobs sent to this worker that have not reported their end yet, with what was sent. */
  pending: Map<string, { job: Job; payload: unknown }>;
  /** The running (not cancelled) job of this worker, if any: another start is refused meanwhile. */
  current: Job | null;
}

type WorkerMessage =
  | { type: 'progress'; jobId: string; fraction: number; stage: string }
  | { type: 'done'; jobId: string; value: JobValue }
  | { type: 'failed'; jobId: string; problem: ApiProblem }
  | { type: 'cancelled'; jobId: string };

const KIND_WORDS: Record<WorkKind, string> = { fit: 'A fit', simulate: 'A simulation', plan: 'A bench plan', disc: 'A disc calibration' };
const KIND_NOUN: Record<WorkKind, string> = { fit: 'fit', simulate: 'simulation', plan: 'bench plan', disc: 'disc calibration' };

export class JobManager {
  private readonly jobs = new Map<string, Job>();
  private readonly slots = new Map<WorkKind, Slot>();
  private closed = false;

  constructor(
    private readonly options: { workerEntry?: string; now?: () => number; log?: InternalLogger; keepMs?: number; cancelGraceMs?: number } = {},
  ) {}

  private now(): number {
    return this.options.now ? this.options.now() : Date.now();
  }

  private prune(): void {
    const keep = this.options.keepMs ?? KEEP_FINISHED_MS;
    const t = this.now();
    for (const [id, job] of this.jobs) if (job.endedAt !== null && t - job.endedAt > keep) this.jobs.delete(id);
  }

  private spawn(kind: WorkKind): Slot {
    const worker = new Worker(this.options.workerEntry ?? defaultWorkerEntry(), { name: `shadowfront-${kind}` });
    worker.unref();
    const slot: Slot = { worker, pending: new Map(), current: null };
    const what = KIND_NOUN[kind];
    worker.on('message', (m: WorkerMessage) => this.onMessage(slot, m));
    worker.on('error', (err) => {
      (this.options.log ?? logToStderr)(err);
      this.failPending(slot, { kind: 'internal', message: `The ${what} stopped unexpectedly (${err.message}). Nothing already saved was changed.` });
    });
    worker.on('exit', () => {
      if (this.slots.get(kind) === slot) this.slots.delete(kind);
      this.failPending(slot, { kind: 'internal', message: `The ${what} worker stopped unexpectedly. Nothing already saved was changed.` });
    });
    this.slots.set(kind, slot);
    return slot;
  }

  /** The worker is gone: every job it still had fails (cancelled ones stay cancelled). */
  private failPending(slot: Slot, problem: ApiProblem): void {
    for (const { job } of slot.pending.values()) {
      if (job.state === 'running') {
        job.state = 'failed';
        job.endedAt = this.now();
        job.problem = problem;
        this.ended(job);
      }
    }
    slot.pending.clear();
    slot.current = null;
  }

  private onMessage(slot: Slot, m: WorkerMessage): void {
    const job = this.jobs.get(m.jobId);
    if (m.type !== 'progress') {
      slot.pending.delete(m.jobId);
      if (slot.current?.id === m.jobId) slot.current = null;
    }
    if (!job || job.state !== 'running') return; // forgotten, or already cancelled by the caller
    if (m.type === 'progress') {
      job.fraction = m.fraction;
      job.stage = m.stage;
      return;
    }
    job.endedAt = this.now();
    if (m.type === 'done') {
      job.state = 'done';
      job.fraction = 1;
      job.stage = 'done';
      job.value = m.value;
    } else if (m.type === 'failed') {
      job.state = 'failed';
      job.problem = m.problem;
    } else {
      job.state = 'cancelled';
      job.problem = { kind: 'cancelled', message: 'Cancelled.' };
    }
    this.ended(job);
  }

  private ended(job: Job): void {
    const f = job.onEnd;
    job.onEnd = undefined;
    f?.();
  }

  private send(slot: Slot, job: Job, payload: unknown): void {
    slot.pending.set(job.id, { job, payload });
    slot.worker.postMessage({ type: 'run', jobId: job.id, kind: job.kind, payload, cancel: job.cancel.buffer });
  }

  /**
   * Start a job of a kind; refused with kind "busy" while another of the same kind runs. A job cancelled
   * a moment ago may still be stopping in the worker: the new one waits behind it there.
   */
  start(kind: WorkKind, payload: unknown, options: { hidden?: boolean } = {}): string {
    if (this.closed) throw new AppProblem('internal', 'Shadowfront is shutting down; the job was not started.');
    this.prune();
    const slot = this.slots.get(kind) ?? this.spawn(kind);
    if (slot.current) throw new AppProblem('busy', `${KIND_WORDS[kind]} is already running. Wait for it to finish or cancel it, then start again.`);
    const job: Job = {
      id: randomUUID(),
      kind,
      state: 'running',
      fraction: 0,
      stage: 'starting',
      startedAt: this.now(),
      endedAt: null,
      cancel: new Int32Array(new SharedArrayBuffer(4)),
      ...(options.hidden ? { hidden: true } : {}),
    };
    this.jobs.set(job.id, job);
    slot.current = job;
    this.send(slot, job, payload);
    return job.id;
  }

  /** Run a job to its end: its value, or its problem thrown as an AppProblem. */
  run(kind: WorkKind, payload: unknown): Promise<unknown> {
    const id = this.start(kind, payload, { hidden: true });
    const job = this.jobs.get(id)!;
    return new Promise((resolve, reject) => {
      const settle = () => {
        this.jobs.delete(id);
        if (job.state === 'done') resolve(job.value);
        else reject(new AppProblem(job.problem?.kind ?? 'internal', job.problem?.message ?? `The ${KIND_NOUN[kind]} did not finish.`, job.problem?.file, job.problem?.field));
      };
      if (job.state !== 'running') settle();
      else job.onEnd = settle;
    });
  }

  /** Start a kind's worker ahead of its first job, so that its start-up (loading the code) is not waited for. */
  prewarm(kind: WorkKind): void {
    if (!this.closed && !this.slots.has(kind)) this.spawn(kind);
  }

  private require(id: string): Job {
    this.prune();
    const job = this.jobs.get(id);
    if (!job) throw new AppProblem('not-found', `There is no job "${id}" (finished jobs are kept for ${Math.round((this.options.keepMs ?? KEEP_FINISHED_MS) / 60000)} minutes).`, undefined, 'id');
    return job;
  }

  status(id: string): JobStatus {
    const job = this.require(id);
    if (job.hidden) throw new AppProblem('not-found', `There is no job "${id}".`, undefined, 'id');
    const s: JobStatus = {
      id: job.id,
      kind: job.kind,
      state: job.state,
      fraction: job.fraction,
      stage: job.stage,
      elapsedMs: (job.endedAt ?? this.now()) - job.startedAt,
    };
    if (job.value !== undefined) s.value = job.value;
    if (job.problem !== undefined) s.problem = job.problem;
    return s;
  }

  /**
   * Cancel a running job: it reports state "cancelled" at once and the slot is free for the next job. The
   * worker stops the work at its next progress report; a worker that has not stopped within the grace
   * period is terminated and the jobs queued behind it move to a new one.
   */
  cancel(id: string): { cancelled: boolean } {
    const job = this.require(id);
    if (job.state !== 'running') return { cancelled: false };
    Atomics.store(job.cancel, 0, 1);
    job.state = 'cancelled';
    job.stage = 'cancelled';
    job.endedAt = this.now();
    job.problem = { kind: 'cancelled', message: 'Cancelled.' };
    this.ended(job);
    const slot = this.slots.get(job.kind);
    if (slot && slot.pending.has(job.id)) {
      if (slot.current === job) slot.current = null;
      const timer = setTimeout(() => {
        if (slot.pending.has(job.id) && this.slots.get(job.kind) === slot) this.replaceWorker(job.kind, slot);
      }, this.options.cancelGraceMs ?? CANCEL_GRACE_MS);
      timer.unref();
    }
    return { cancelled: true };
  }

  /** Terminate a stuck worker; its jobs that still run go to a new worker. */
  private replaceWorker(kind: WorkKind, old: Slot): void {
    const waiting = [...old.pending.values()].filter((p) => p.job.state === 'running');
    old.pending.clear();
    old.current = null;
    this.slots.delete(kind);
    void old.worker.terminate();
    if (this.closed) return;
    const slot = this.spawn(kind);
    for (const p of waiting) {
      slot.current = p.job;
      this.send(slot, p.job, p.payload);
    }
  }

  async close(): Promise<void> {
    this.closed = true;
    const slots = [...this.slots.values()];
    this.slots.clear();
    for (const slot of slots) {
      for (const { job } of slot.pending.values()) {
        if (job.state === 'running') {
          Atomics.store(job.cancel, 0, 1);
          job.state = 'cancelled';
          job.endedAt = this.now();
          job.problem = { kind: 'cancelled', message: 'Cancelled: Shadowfront stopped.' };
          this.ended(job);
        }
      }
      slot.pending.clear();
    }
    await Promise.all(slots.map((s) => s.worker.terminate()));
  }
}
