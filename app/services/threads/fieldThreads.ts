/**
 * A FieldEngine (core/optics/fieldEngine.ts) that shares each model grid between the calling thread and
 * helper threads (./fieldWorker.ts), so that a fit uses every core. The calling thread cuts the grid
 * (rows for the fast model, columns for the reference model), posts the other parts, computes its own,
 * then waits for the others with Atomics.wait and takes them with receiveMessageOnPort: the call stays
 * synchronous, as the fit expects. Every part is computed by the same core functions with the same
 * settings, so the result equals the one-thread result exactly (test/services/field-threads.test.ts).
 *
 * A helper that is not ready yet (it loads its modules for about a second) is not waited for: its part is
 * computed here. A helper that does not answer within max(60 s, 20 × the local part's time) is stopped
 * and its part computed here; the next calls go on without it.
 *
 * The number of helpers is SHADOWFRONT_THREADS − 1 when that is set (1 = everything in the calling
 * thread), else one less than the machine's cores, at most 3.
 */
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { MessageChannel, receiveMessageOnPort, Worker, type MessagePort } from 'node:worker_threads';
import type { BenchSetup, ZernikeTerm } from '../../../core/setup/types.ts';
import { chooseRimSamples, fastField, type FastFieldResult, type FastModelOptions } from '../../../core/optics/fast/rimModel.ts';
import { referenceIntensity, type ReferenceIntensityOptions } from '../../../core/optics/reference/index.ts';
import {
  fastFieldBlockOptions,
  joinColumns,
  joinFastFieldRows,
  localFieldEngine,
  rowWork,
  type PendingIntensity,
  splitByWork,
  type FieldEngine,
  type GridBlock,
} from '../../../core/optics/fieldEngine.ts';

/** A part of a grid for a helper. Functions (progress callbacks) are not sent. */
export type FieldPartRequest =
  | { id: number; kind: 'fast'; args: [BenchSetup, readonly ZernikeTerm[], Float64Array, Float64Array, FastModelOptions] }
  | { id: number; kind: 'reference'; args: [BenchSetup, readonly ZernikeTerm[], Float64Array, Float64Array, ReferenceIntensityOptions] };

type FieldPartReply = { id: number; value: unknown } | { id: number; error: { name: string; message: string } };

/** Grids smaller than this are computed in the calling thread (the hand-over would cost more than it saves). */
export const MIN_SHARED_POINTS = 3000;

/** Defined (true) only in the electron-vite build of the main process and the web mode (electron.vite.config.ts). */
declare const __SHADOWFRONT_BUNDLED__: boolean | undefined;

/** The helper's entry: the built out/main/fieldWorker.js in a build, else fieldWorker.mjs beside this file (tsx). */
export function defaultFieldWorkerEntry(): string {
  if (typeof __SHADOWFRONT_BUNDLED__ !== 'undefined' && __SHADOWFRONT_BUNDLED__) return fileURLToPath(new URL('../../../out/main/fieldWorker.js', import.meta.url));
  return fileURLToPath(new URL('./fieldWorker.mjs', import.meta.url));
}

class Helper {
  readonly worker: Worker;
  readonly port: MessagePort;
  readonly flags: Int32Array;
  broken = false;
  /** A part started with startReferenceIntensity is under way: the helper takes no other part meanwhile. */
  busy = false;
  private nextId = 1;

  constructor(
    entry: string,
    private readonly minWaitMs: number,
  ) {
    const { port1, port2 } = new MessageChannel();
    const signal = new SharedArrayBuffer(8);
    this.flags = new Int32Array(signal);
    this.worker = new Worker(entry, { name: 'shadowfront-fields', workerData: { port: port2, signal }, transferList: [port2] });
    this.worker.unref();
    this.worker.on('error', () => (this.broken = true));
    this.worker.on('exit', () => (this.broken = true));
    this.port = port1;
    this.port.unref();
  }

  get ready(): boolean {
    return !this.broken && !this.busy && Atomics.load(this.flags, 1) === 1;
  }

  /** Posts a part; returns a function that waits for it (or computes it here when the helper fails). */
  post(request: Omit<FieldPartRequest, 'id'>, computeHere: () => unknown): (localMs: number, keepOn?: () => boolean) => unknown {
    const id = this.nextId++;
    this.port.postMessage({ ...request, id });
    return (localMs, keepOn) => this.wait(id, Math.max(this.minWaitMs, 20 * localMs), computeHere, keepOn);
  }

  private wait(id: number, timeoutMs: number, computeHere: () => unknown, keepOn?: () => boolean): unknown {
    const deadline = Date.now() + timeoutMs;
    for (;;) {
      if (keepOn && !keepOn()) {
        // Abandoned: its reply, when it comes, is skipped by its id.
        const err = new Error('cancelled');
        err.name = 'CancelledError';
        throw err;
      }
      const seen = Atomics.load(this.flags, 0);
      const got = receiveMessageOnPort(this.port);
      if (got) {
        const reply = got.message as FieldPartReply;
        if (reply.id !== id) continue; // a reply to a call that was abandoned (cancelled)
        if ('error' in reply) {
          const err = new Error(reply.error.message);
          err.name = reply.error.name;
          throw err;
        }
        return reply.value;
      }
      if (this.broken || Date.now() > deadline) {
        this.broken = true;
        void this.worker.terminate();
        return computeHere();
      }
      Atomics.wait(this.flags, 0, seen, 100);
    }
  }
}

export interface FieldThreadsOptions {
  /** Helper threads (default: from SHADOWFRONT_THREADS, else cores − 1, at most 3). */
  helpers?: number;
  /** The helper's entry module (default: defaultFieldWorkerEntry()). */
  workerEntry?: string;
  /** The least time to wait for a helper's part before computing it here, ms (default 60 000). */
  minWaitMs?: number;
}

/** Helper threads from SHADOWFRONT_THREADS (total threads, ≥ 1) or the machine's cores. */
export function helperCount(env: Record<string, string | undefined> = process.env): number {
  const text = env.SHADOWFRONT_THREADS;
  if (text !== undefined && text.trim() !== '') {
    const n = Number(text);
    if (!Number.isInteger(n) || n < 1) throw new RangeError(`SHADOWFRONT_THREADS must be a whole number of threads ≥ 1; got "${text}"`);
    return n - 1;
  }
  return Math.max(0, Math.min(3, availableParallelism() - 1));
}

function withoutFunctions<T extends object>(options: T): T {
  return Object.fromEntries(Object.entries(options).filter(([, v]) => typeof v !== 'function')) as T;
}

/** A FieldEngine whose grids are shared with helper threads. */
export class FieldThreads implements FieldEngine {
  private readonly helpers: Helper[];

  constructor(options: FieldThreadsOptions = {}) {
    const n = options.helpers ?? helperCount();
    const entry = options.workerEntry ?? defaultFieldWorkerEntry();
    this.helpers = Array.from({ length: n }, () => new Helper(entry, options.minWaitMs ?? 60_000));
  }

  /** Helpers still working (not stopped, not failed). */
  get workingHelpers(): number {
    return this.helpers.filter((h) => !h.broken).length;
  }

  /** Helpers ready to take a part now. */
  private readyHelpers(): Helper[] {
    return this.helpers.filter((h) => h.ready);
  }

  /** Resolves once every helper is ready (or has failed), or after timeoutMs. */
  async whenReady(timeoutMs = 30_000): Promise<boolean> {
    const end = Date.now() + timeoutMs;
    while (Date.now() < end) {
      if (this.helpers.every((h) => h.ready || h.broken)) return this.helpers.some((h) => h.ready);
      await new Promise((r) => setTimeout(r, 20));
    }
    return false;
  }

  fastField(setup: BenchSetup, aberrations: readonly ZernikeTerm[], xsM: Float64Array, ysM: Float64Array, options: FastModelOptions = {}): FastFieldResult {
    const ready = this.readyHelpers();
    const nx = xsM.length;
    const ny = ysM.length;
    if (ready.length === 0 || ny < 2 || nx * ny < MIN_SHARED_POINTS) return fastField(setup, aberrations, xsM, ysM, options);
    const nPhi = options.nPhi ?? chooseRimSamples(setup, aberrations, xsM, ysM);
    const blocks = splitByWork(rowWork(nx, ny, options.pointMask), ready.length + 1);
    const partOf = (b: GridBlock) => fastFieldBlockOptions(setup, aberrations, xsM, ysM, options, b, nPhi);
    const waits = blocks.slice(1).map((b, i) => {
      const part = partOf(b);
      const here = () => fastField(setup, aberrations, xsM, part.ysM, part.options);
      if (b.to === b.from) return () => here();
      return ready[i].post({ kind: 'fast', args: [setup, aberrations, xsM, part.ysM, withoutFunctions(part.options)] }, here);
    });
    const t0 = performance.now();
    const own = partOf(blocks[0]);
    const mine = fastField(setup, aberrations, xsM, own.ysM, own.options);
    const localMs = performance.now() - t0;
    return joinFastFieldRows([mine, ...waits.map((w) => w(localMs) as FastFieldResult)]);
  }

  referenceIntensity(
    setup: BenchSetup,
    aberrations: readonly ZernikeTerm[],
    xsM: Float64Array,
    ysM: Float64Array,
    options: ReferenceIntensityOptions = {},
  ): Float64Array {
    const ready = this.readyHelpers();
    const nx = xsM.length;
    const ny = ysM.length;
    if (ready.length === 0 || nx < 2 || nx * ny < MIN_SHARED_POINTS) return referenceIntensity(setup, aberrations, xsM, ysM, options);
    // Columns, each as much work as the next; the quadrature is planned for the whole grid.
    const blocks = splitByWork(new Float64Array(nx).fill(1), ready.length + 1);
    const planned: ReferenceIntensityOptions = { ...options, planXsM: options.planXsM ?? xsM, planYsM: options.planYsM ?? ysM };
    const partXs = (b: GridBlock) => xsM.slice(b.from, b.to);
    const waits = blocks.slice(1).map((b, i) => {
      const xs = partXs(b);
      const here = () => referenceIntensity(setup, aberrations, xs, ysM, withoutFunctions(planned));
      return ready[i].post({ kind: 'reference', args: [setup, aberrations, xs, ysM, withoutFunctions(planned)] }, here);
    });
    const t0 = performance.now();
    const mine = referenceIntensity(setup, aberrations, partXs(blocks[0]), ysM, planned);
    const localMs = performance.now() - t0;
    const parts = [{ block: blocks[0], values: mine }, ...waits.map((w, i) => ({ block: blocks[i + 1], values: w(localMs) as Float64Array }))];
    return joinColumns(parts, nx, ny);
  }

  /**
   * The whole reference grid on one ready helper, while the calling thread goes on (its fast-model calls
   * meanwhile leave that helper out); waiting returns it. Without a ready helper, the reference is computed,
   * shared as referenceIntensity does, when it is waited for. Either way the result equals the one-thread one.
   */
  startReferenceIntensity(
    setup: BenchSetup,
    aberrations: readonly ZernikeTerm[],
    xsM: Float64Array,
    ysM: Float64Array,
    options: ReferenceIntensityOptions = {},
  ): PendingIntensity {
    const helper = this.readyHelpers()[0];
    if (!helper || xsM.length * ysM.length < MIN_SHARED_POINTS) return () => this.referenceIntensity(setup, aberrations, xsM, ysM, options);
    const here = () => referenceIntensity(setup, aberrations, xsM, ysM, options);
    helper.busy = true;
    const wait = helper.post({ kind: 'reference', args: [setup, aberrations, xsM, ysM, withoutFunctions(options)] }, here);
    let value: Float64Array | null = null;
    return (keepOn) => {
      if (!value) {
        try {
          value = wait(0, keepOn) as Float64Array;
        } finally {
          helper.busy = false;
        }
      }
      return value;
    };
  }

  /** Stops the helpers; later calls compute everything in the calling thread. */
  async close(): Promise<void> {
    await Promise.all(
      this.helpers.map((h) => {
        h.broken = true;
        return h.worker.terminate();
      }),
    );
  }
}

let shared: FieldEngine | null = null;

/**
 * This thread's engine for fits: helper threads when the machine has cores to spare (started on the first
 * call, kept for later fits), else the local engine.
 */
export function sharedFieldEngine(): FieldEngine {
  if (!shared) shared = helperCount() > 0 ? new FieldThreads() : localFieldEngine;
  return shared;
}
