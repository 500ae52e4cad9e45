/** Progress reporting and cancellation for the reference model. */

/** The error thrown when the caller's onProgress returns false. Its `name` is 'CancelledError'. */
export function cancelledError(): Error {
  const e = new Error('reference diffraction computation cancelled');
  e.name = 'CancelledError';
  return e;
}

export class ProgressMeter {
  private done = 0;
  private lastReported = -1;

  constructor(
    private readonly total: number,
    private readonly onProgress?: (fraction: number) => boolean | void,
  ) {}

  /** Records `units` of work; calls onProgress when the fraction has moved by ≥ 0.5 %. */
  advance(units: number): void {
    if (!this.onProgress) return;
    this.done += units;
    const f = this.total > 0 ? Math.min(1, this.done / this.total) : 1;
    if (f - this.lastReported >= 0.005) this.report(f);
  }

  /** Reports a fraction explicitly (used for 0 at the start and 1 at the end). */
  report(fraction: number): void {
    if (!this.onProgress) return;
    this.lastReported = fraction;
    if (this.onProgress(fraction) === false) throw cancelledError();
  }
}
