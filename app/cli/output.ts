/** Error reporting shared by the CLI commands: plain words, never a raw stack. */

/**
 * Errors that carry a message written for the user (file, field, value, what was expected).
 * Matched by name so that printing help does not load the libraries that define them.
 */
const USER_ERRORS = new Set(['SetupFieldError', 'QuantityError', 'ImageDecodeError', 'FrameError', 'FileProblem', 'RangeError', 'CancelledError', 'LogbookDataError', 'LogbookError', 'LogbookLockedError', 'LogbookCorruptError']);

/** A mistake in how the command was called: printed with the command's usage. */
export class UsageError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'UsageError';
  }
}

/** Print an error for the user and return the exit code. */
export function reportError(err: unknown, usage?: string): number {
  const e = err as Error;
  if (err instanceof UsageError) {
    process.stderr.write(`shadowfront: ${e.message}\n`);
    if (usage) process.stderr.write(`\n${usage}\n`);
    return 2;
  }
  const known = !!e && USER_ERRORS.has(e.name);
  if (known) {
    process.stderr.write(`shadowfront: error: ${e.message}\n`);
    return 1;
  }
  process.stderr.write(`shadowfront: internal error: ${e?.message ?? String(err)}\n`);
  if (process.env.SHADOWFRONT_DEBUG) process.stderr.write(`${e?.stack ?? ''}\n`);
  else process.stderr.write('(set SHADOWFRONT_DEBUG=1 to see the details, and please report it)\n');
  return 70;
}

/** A one-line progress bar on stderr when it is a terminal. */
export function progressPrinter(label: string): (fraction: number) => void {
  if (!process.stderr.isTTY) return () => {};
  return (f: number) => {
    const width = 30;
    const done = Math.round(f * width);
    process.stderr.write(`\r${label} [${'#'.repeat(done)}${' '.repeat(width - done)}] ${(f * 100).toFixed(0)}%`);
    if (f >= 1) process.stderr.write('\n');
  };
}
