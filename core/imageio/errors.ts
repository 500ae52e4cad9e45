/**
 * Errors raised while reading an image or array file.
 *
 * `reason` is a short machine-readable category that the caller can map to a message for the user;
 * `message` carries the detail (which field, which value) and, when known, the file:
 * `"<file>: <reason>: <detail>"`.
 */
export type ImageDecodeReason = 'unsupported format' | 'truncated or corrupt' | 'wrong dimensions' | 'empty frame';

export class ImageDecodeError extends Error {
  readonly reason: ImageDecodeReason;
  /** What exactly is wrong, in plain words. */
  readonly detail: string;
  /** The file the bytes came from, when the caller said so. */
  readonly file: string | null;

  constructor(reason: ImageDecodeReason, detail: string, file: string | null = null) {
    super(file ? `${file}: ${reason}: ${detail}` : `${reason}: ${detail}`);
    this.name = 'ImageDecodeError';
    this.reason = reason;
    this.detail = detail;
    this.file = file;
  }

  /** The same error, naming `file` (unchanged when it already names one). */
  withFile(file: string): ImageDecodeError {
    return this.file ? this : new ImageDecodeError(this.reason, this.detail, file);
  }
}
