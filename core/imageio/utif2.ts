/**
 * A thin, typed view of the parts of the `utif2` TIFF decoder that Shadowfront uses.
 *
 * The package ships type declarations written for Node (they mention `Buffer`), which `core/` does not
 * have (`types: []`). This wrapper describes only the two calls used here, on ArrayBuffers, so that the
 * rest of core never sees the package's own declarations.
 *
 * utif2 behaviour relied on (read from its source, version 4.1.0):
 * - `decode(buffer)` parses the header and the chain of IFDs; each IFD is an object whose keys are
 *   "t" + tag number (e.g. `t256` = ImageWidth) and whose values are arrays of the field's values.
 * - `decodeImage(buffer, ifd)` decompresses the strips (Compression 1, 5 LZW, 8/32946 Deflate, 32773
 *   PackBits among others), undoes Predictor 2 for 8- and 16-bit samples, and stores the raster in
 *   `ifd.data` (bytes, rows padded to whole bytes). 16-bit samples of big-endian ("MM") files are
 *   swapped to little-endian, so `data` always holds 16-bit samples little-endian.
 */
import UTIF from 'utif2';

/** One image file directory as utif2 returns it. */
export interface UtifIfd {
  /** Tag fields: "t" + tag number → values. */
  [field: string]: unknown;
  width?: number;
  height?: number;
  data?: Uint8Array;
}

export interface UtifDecoder {
  decode(buffer: ArrayBuffer): UtifIfd[];
  decodeImage(buffer: ArrayBuffer, ifd: UtifIfd): void;
}

export const utif: UtifDecoder = UTIF as unknown as UtifDecoder;

/** Numeric values of a tag field, or null when the field is absent or not numeric. */
export function tagNumbers(ifd: UtifIfd, tag: number): number[] | null {
  const v = ifd[`t${tag}`];
  if (!Array.isArray(v) || v.length === 0) return null;
  const out: number[] = [];
  for (const x of v) {
    if (typeof x !== 'number' || !Number.isFinite(x)) return null;
    out.push(x);
  }
  return out;
}
