/**
 * Where the model fields are computed. The fit asks a FieldEngine for the fast model's field (with its
 * derivatives) and for the reference intensity. `localFieldEngine` computes them in the calling thread. A
 * shell may supply an engine that shares one grid among several threads (app/services/threads/): it cuts the
 * grid with the helpers below, has each part computed by the same functions, and joins the parts. Every
 * point is computed by the same code with the same settings, so the joined result equals the local one.
 *
 * - fast model: cut into blocks of rows (each row is computed on its own: the saddle-point warm start
 *   restarts at every row); the caller fixes N_φ from the whole grid first.
 * - reference model: cut into blocks of columns, with the quadrature planned for the whole grid
 *   (`planXsM`, `planYsM`), so that every part uses the same nodes; or computed whole on one helper while the
 *   caller goes on (`startReferenceIntensity`).
 */
import type { BenchSetup, ZernikeTerm } from '../setup/types.ts';
import { chooseRimSamples, fastField, type FastFieldResult, type FastModelOptions } from './fast/rimModel.ts';
import { referenceIntensity, type ReferenceIntensityOptions } from './reference/index.ts';

export interface FieldEngine {
  fastField(setup: BenchSetup, aberrations: readonly ZernikeTerm[], xsM: Float64Array, ysM: Float64Array, options?: FastModelOptions): FastFieldResult;
  referenceIntensity(setup: BenchSetup, aberrations: readonly ZernikeTerm[], xsM: Float64Array, ysM: Float64Array, options?: ReferenceIntensityOptions): Float64Array;
  /**
   * Optional: starts the reference intensity where it runs beside the caller's next calls (a helper thread),
   * and returns a function that waits for it (`keepOn`, polled while waiting, returns false to cancel: an
   * Error named 'CancelledError'). The result equals referenceIntensity's. Engines without it compute the
   * reference when it is waited for (startReference below).
   */
  startReferenceIntensity?(
    setup: BenchSetup,
    aberrations: readonly ZernikeTerm[],
    xsM: Float64Array,
    ysM: Float64Array,
    options?: ReferenceIntensityOptions,
  ): PendingIntensity;
}

/** A reference intensity being computed: waiting returns it. */
export type PendingIntensity = (keepOn?: () => boolean) => Float64Array;

/**
 * The reference intensity started on `engine` beside the caller's next calls where the engine can, or else
 * computed (with the progress callback) when it is waited for.
 */
export function startReference(
  engine: FieldEngine,
  setup: BenchSetup,
  aberrations: readonly ZernikeTerm[],
  xsM: Float64Array,
  ysM: Float64Array,
  options: ReferenceIntensityOptions = {},
): PendingIntensity {
  if (engine.startReferenceIntensity) return engine.startReferenceIntensity(setup, aberrations, xsM, ysM, options);
  return () => engine.referenceIntensity(setup, aberrations, xsM, ysM, options);
}

/** The fields computed in the calling thread. */
export const localFieldEngine: FieldEngine = { fastField, referenceIntensity };

/** A block of a grid's rows [from, to) or columns. */
export interface GridBlock {
  from: number;
  to: number;
}

/**
 * Cut `count` rows into `parts` consecutive blocks of about equal work; `work[i]` is row i's work (for
 * instance its number of masked-in points). Blocks may be empty.
 */
export function splitByWork(work: ArrayLike<number>, parts: number): GridBlock[] {
  const n = work.length;
  let total = 0;
  for (let i = 0; i < n; i++) total += work[i];
  const blocks: GridBlock[] = [];
  let from = 0;
  let acc = 0;
  for (let b = 1; b <= parts; b++) {
    let to = from;
    const target = (total * b) / parts;
    if (b === parts) to = n;
    else {
      while (to < n && acc + work[to] / 2 <= target) acc += work[to++];
    }
    blocks.push({ from, to });
    from = to;
  }
  return blocks;
}

/** Work per row of an nx × ny grid: the points a mask selects, or nx. */
export function rowWork(nx: number, ny: number, mask: Uint8Array | null | undefined): Float64Array {
  const w = new Float64Array(ny);
  for (let r = 0; r < ny; r++) {
    if (!mask) w[r] = nx;
    else {
      let s = 0;
      for (let c = 0; c < nx; c++) s += mask[r * nx + c];
      w[r] = s;
    }
  }
  return w;
}

/** The fast-model options for one block of rows of the grid (N_φ fixed from the whole grid). */
export function fastFieldBlockOptions(
  setup: BenchSetup,
  aberrations: readonly ZernikeTerm[],
  xsM: Float64Array,
  ysM: Float64Array,
  options: FastModelOptions,
  block: GridBlock,
  nPhi: number = options.nPhi ?? chooseRimSamples(setup, aberrations, xsM, ysM),
): { ysM: Float64Array; options: FastModelOptions } {
  const nx = xsM.length;
  const mask = options.pointMask ?? null;
  return {
    ysM: ysM.slice(block.from, block.to),
    options: { ...options, nPhi, pointMask: mask ? mask.slice(block.from * nx, block.to * nx) : null },
  };
}

/** Joins fast-model results of consecutive row blocks (in order) into the result for the whole grid. */
export function joinFastFieldRows(parts: FastFieldResult[]): FastFieldResult {
  if (parts.length === 1) return parts[0];
  const nx = parts[0].nx;
  const ny = parts.reduce((s, p) => s + p.ny, 0);
  const np = parts[0].params.length;
  const cat = (pick: (p: FastFieldResult) => Float64Array): Float64Array => {
    const out = new Float64Array(nx * ny);
    let o = 0;
    for (const p of parts) {
      out.set(pick(p), o);
      o += p.nx * p.ny;
    }
    return out;
  };
  const invalid = new Uint8Array(nx * ny);
  let o = 0;
  for (const p of parts) {
    if (p.nx !== nx || p.nPhi !== parts[0].nPhi || p.params.length !== np) throw new RangeError('joinFastFieldRows: the parts do not belong to one grid');
    invalid.set(p.invalid, o);
    o += p.nx * p.ny;
  }
  return {
    nx,
    ny,
    re: cat((p) => p.re),
    im: cat((p) => p.im),
    params: parts[0].params,
    dRe: parts[0].params.map((_, q) => cat((p) => p.dRe[q])),
    dIm: parts[0].params.map((_, q) => cat((p) => p.dIm[q])),
    nPhi: parts[0].nPhi,
    invalid,
    invalidCount: parts.reduce((s, p) => s + p.invalidCount, 0),
  };
}

/** Joins row-major intensities of consecutive column blocks (in order) into the nx × ny grid. */
export function joinColumns(parts: { block: GridBlock; values: Float64Array }[], nx: number, ny: number): Float64Array {
  const out = new Float64Array(nx * ny);
  for (const { block, values } of parts) {
    const w = block.to - block.from;
    if (values.length !== w * ny) throw new RangeError('joinColumns: a part does not match its block');
    for (let r = 0; r < ny; r++) out.set(values.subarray(r * w, (r + 1) * w), r * nx + block.from);
  }
  return out;
}
