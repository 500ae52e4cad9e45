/**
 * Problems with camera frames that decode correctly but cannot be used for a measurement as they are.
 * The message names the file(s), says what is wrong and what to do:
 * `"<file>: <reason>: <detail>"`.
 */
export type FrameProblemReason =
  | 'no frames'
  | 'wrong dimensions'
  | 'wrong bit depth'
  | 'mostly saturated'
  | 'mostly dark'
  | 'no disc shadow'
  | 'no beam';

export class FrameError extends Error {
  readonly reason: FrameProblemReason;
  readonly file: string;
  readonly detail: string;

  constructor(reason: FrameProblemReason, file: string, detail: string) {
    super(`${file}: ${reason}: ${detail}`);
    this.name = 'FrameError';
    this.reason = reason;
    this.file = file;
    this.detail = detail;
  }
}
