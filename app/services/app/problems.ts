/**
 * Errors → ApiProblem: what the interface shows, in plain words, naming the file and the field where
 * there is one. Never a stack: an unexpected error becomes kind "internal" and its stack goes to stderr.
 *
 * Errors are recognised by their class where it is cheap to import, else by name (setup and unit errors:
 * their classes would load the unit library, which the job worker does without).
 */
import type { ApiProblem, ApiReply } from '../../shared/contract.ts';
import { ImageDecodeError } from '../../../core/imageio/errors.ts';
import { FrameError } from '../../../core/frames/errors.ts';
import { FitInputError } from '../../../core/fit/fitShadow.ts';
import { LogbookDataError } from '../../../core/logbook/errors.ts';
import { FileProblem } from '../files.ts';
import { LogbookProblem } from '../logbook/problem.ts';

/** A problem raised on purpose by the app service, with its kind (e.g. "invalid-request", "busy", "not-found"). */
export class AppProblem extends Error {
  constructor(
    readonly kind: string,
    message: string,
    readonly file?: string,
    readonly field?: string,
  ) {
    super(message);
    this.name = 'AppProblem';
  }
}

/** A request whose argument does not have the shape the channel expects (from a validator). */
export function invalidRequest(channel: string, detail: string): AppProblem {
  return new AppProblem('invalid-request', `The request "${channel}" was refused: ${detail}.`, undefined, undefined);
}

function withOptional(p: ApiProblem, file?: string | null, field?: string | null): ApiProblem {
  if (file) p.file = file;
  if (field) p.field = field;
  return p;
}

/** Logs the stack of an unexpected error to stderr (never to the interface). */
export type InternalLogger = (err: unknown) => void;

export const logToStderr: InternalLogger = (err) => {
  const e = err as Error;
  process.stderr.write(`shadowfront: internal error: ${e?.stack ?? String(err)}\n`);
};

/** The ApiProblem for an error. */
export function toProblem(err: unknown, log: InternalLogger = logToStderr): ApiProblem {
  if (err instanceof AppProblem) return withOptional({ kind: err.kind, message: err.message }, err.file, err.field);
  if (err instanceof ImageDecodeError) return withOptional({ kind: 'image-decode', message: err.message }, err.file);
  if (err instanceof FrameError) return withOptional({ kind: 'frame', message: err.message }, err.file);
  if (err instanceof FitInputError) return { kind: 'fit-input', message: err.message };
  if (err instanceof LogbookProblem) return withOptional({ kind: 'logbook', message: err.message }, err.file);
  if (err instanceof LogbookDataError) return { kind: 'logbook', message: err.message };
  if (err instanceof FileProblem) return withOptional({ kind: 'file', message: err.message }, err.file);
  const e = err as Error | undefined;
  const name = e?.name;
  if (name === 'CancelledError') return { kind: 'cancelled', message: 'Cancelled.' };
  if (name === 'QuantityError') return { kind: 'setup-field', message: e!.message };
  if (name === 'RangeError' && typeof e?.message === 'string') return { kind: 'invalid-input', message: capitalise(e.message) };
  if (name === 'SetupFieldError') {
    const f = e as unknown as { file?: string; path?: string };
    return withOptional({ kind: 'setup-field', message: e!.message }, f.file, f.path || undefined);
  }
  if (name === 'ImageDecodeError' || name === 'FrameError' || name === 'FileProblem' || name === 'LogbookDataError') {
    // The same classes loaded twice (another module instance): the message is still written for the user.
    const any = e as unknown as { file?: string; path?: string };
    return withOptional({ kind: kindByName(name), message: e!.message }, any.file, any.path);
  }
  log(err);
  return {
    kind: 'internal',
    message: `Something went wrong inside Shadowfront${e?.message ? ` (${firstLine(e.message)})` : ''}. Nothing already saved was changed. Please report this.`,
  };
}

function kindByName(name: string): string {
  switch (name) {
    case 'SetupFieldError':
      return 'setup-field';
    case 'ImageDecodeError':
      return 'image-decode';
    case 'FrameError':
      return 'frame';
    case 'LogbookDataError':
      return 'logbook';
    default:
      return 'file';
  }
}

function firstLine(s: string): string {
  const line = s.split('\n')[0];
  return line.length > 200 ? `${line.slice(0, 200)}…` : line;
}

function capitalise(s: string): string {
  return s.length ? s[0].toUpperCase() + s.slice(1) : s;
}

/** Run `fn` and wrap what it returns (or throws) as an ApiReply. */
export async function reply<T>(fn: () => T | Promise<T>, log: InternalLogger = logToStderr): Promise<ApiReply<T>> {
  try {
    return { ok: true, value: await fn() };
  } catch (err) {
    return { ok: false, problem: toProblem(err, log) };
  }
}
