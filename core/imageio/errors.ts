/**
 * Errors raised while reading an image or array file.
 *
 * `reason` is a short machine-readable category that the caller can map to a message for the user;
 * `message` carries the detail (which field, which value).
 */
export type ImageDecodeReason = 'unsupported format' | 'truncated or corrupt' | 'wrong dimensions' | 'empty frame';

export class ImageDecodeError extends Error {
  readonly reason: ImageDecodeReason;

  constructor(reason: ImageDecodeReason, detail: string) {
    super(`${reason}: ${detail}`);
    this.name = 'ImageDecodeError';
    this.reason = reason;
  }
}
