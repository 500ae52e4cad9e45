/**
 * A field worker: computes parts of model grids for a thread that shares its work (./fieldThreads.ts).
 *
 * workerData: { port: MessagePort, signal: SharedArrayBuffer (Int32Array of 2) }
 *   signal[0] is raised by one after every reply (the asking thread waits on it with Atomics.wait);
 *   signal[1] is set to 1 once this worker is ready to take parts.
 * Messages in:  { id, kind: 'fast', args: [setup, aberrations, xsM, ysM, options] }
 *               { id, kind: 'reference', args: [setup, aberrations, xsM, ysM, options] }
 * Messages out: { id, value } | { id, error: { name, message } }
 */
import { workerData, type MessagePort } from 'node:worker_threads';
import { fastField } from '../../../core/optics/fast/rimModel.ts';
import { referenceIntensity } from '../../../core/optics/reference/index.ts';
import type { FieldPartRequest } from './fieldThreads.ts';

const { port, signal } = workerData as { port: MessagePort; signal: SharedArrayBuffer };
const flags = new Int32Array(signal);

/** The typed arrays' buffers of a value, to transfer them rather than copy. */
function buffers(value: unknown): ArrayBuffer[] {
  const out: ArrayBuffer[] = [];
  const visit = (v: unknown) => {
    if (ArrayBuffer.isView(v)) {
      if (v.buffer instanceof ArrayBuffer && !out.includes(v.buffer)) out.push(v.buffer);
    } else if (Array.isArray(v)) v.forEach(visit);
    else if (v && typeof v === 'object') Object.values(v).forEach(visit);
  };
  visit(value);
  return out;
}

port.on('message', (req: FieldPartRequest) => {
  try {
    const value = req.kind === 'fast' ? fastField(...req.args) : referenceIntensity(...req.args);
    port.postMessage({ id: req.id, value }, buffers(value));
  } catch (err) {
    const e = err instanceof Error ? err : new Error(String(err));
    port.postMessage({ id: req.id, error: { name: e.name, message: e.message } });
  }
  Atomics.add(flags, 0, 1);
  Atomics.notify(flags, 0);
});
Atomics.store(flags, 1, 1);
