/**
 * Netpbm gray and colour maps: PGM (P2 plain, P5 raw) and PPM (P3 plain, P6 raw, converted to gray
 * with a warning).
 *
 * Source: the Netpbm format specifications, "PGM Format Specification" (pgm.html) and "PPM Format
 * Specification" (ppm.html), netpbm.sourceforge.net/doc:
 *   1. a magic number, "P5" (raw PGM), "P6" (raw PPM), "P2" / "P3" (plain);
 *   2. whitespace (blanks, TABs, CRs, LFs), the width in ASCII decimal, whitespace, the height,
 *      whitespace, the maxval (0 < maxval < 65536);
 *   3. before the maxval, text from "#" to the next end of line is a comment;
 *   4. raw formats: a single whitespace character, then the raster, row 0 (top) first, each sample
 *      1 byte when maxval < 256, else 2 bytes, most significant byte first;
 *   5. plain formats: every sample in ASCII decimal, separated by whitespace.
 * Samples are read as they are (counts); the bit depth reported is the number of bits maxval needs.
 *
 * Pure: works on Uint8Array only.
 */
import { ImageDecodeError } from './errors.ts';
import { colourWarning, luma709 } from './gray.ts';

export interface DecodedPnmFrame {
  /** Row-major sample values, row 0 at the top. */
  data: Float64Array;
  widthPx: number;
  heightPx: number;
  /** Bits needed for maxval: ⌈log2(maxval + 1)⌉ (8 for maxval 255, 12 for 4095, 16 for 65535). */
  bitDepth: number;
  maxval: number;
  /** 'P2', 'P3', 'P5' or 'P6'. */
  magic: string;
  warnings: string[];
}

/** True when the bytes start with a Netpbm magic number P1–P7. */
export function isNetpbm(bytes: Uint8Array): boolean {
  return bytes.length >= 2 && bytes[0] === 0x50 && bytes[1] >= 0x31 && bytes[1] <= 0x37;
}

function isSpace(b: number): boolean {
  // Netpbm: blanks, TABs, CRs, LFs (vertical tab and form feed are accepted too, as C's isspace does).
  return b === 0x20 || b === 0x09 || b === 0x0a || b === 0x0d || b === 0x0b || b === 0x0c;
}

function corrupt(detail: string): ImageDecodeError {
  return new ImageDecodeError('truncated or corrupt', detail);
}

/** Reads ASCII decimal fields, skipping whitespace and (where allowed) comments. */
class Cursor {
  pos = 2;
  constructor(private readonly bytes: Uint8Array) {}

  skip(allowComments: boolean): void {
    const b = this.bytes;
    while (this.pos < b.length) {
      if (isSpace(b[this.pos])) this.pos++;
      else if (allowComments && b[this.pos] === 0x23) {
        while (this.pos < b.length && b[this.pos] !== 0x0a && b[this.pos] !== 0x0d) this.pos++;
      } else break;
    }
  }

  /** The next unsigned decimal number, or null at the end of the bytes. */
  number(what: string, allowComments: boolean): number | null {
    this.skip(allowComments);
    const b = this.bytes;
    if (this.pos >= b.length) return null;
    const start = this.pos;
    let v = 0;
    while (this.pos < b.length && b[this.pos] >= 0x30 && b[this.pos] <= 0x39) {
      v = v * 10 + (b[this.pos] - 0x30);
      this.pos++;
    }
    if (this.pos === start) throw corrupt(`expected the ${what} as a decimal number at byte ${start}, found "${String.fromCharCode(b[start])}"`);
    if (this.pos < b.length && !isSpace(b[this.pos]) && b[this.pos] !== 0x23) {
      throw corrupt(`the ${what} at byte ${start} is followed by "${String.fromCharCode(b[this.pos])}"`);
    }
    if (!Number.isSafeInteger(v)) throw corrupt(`the ${what} at byte ${start} is too large`);
    return v;
  }
}

/**
 * Decode a PGM or PPM file (first image only). Throws ImageDecodeError: 'unsupported format' (not
 * Netpbm, or P1/P4 bitmaps and P7 PAM), 'truncated or corrupt' (bad header, maxval outside 1..65535,
 * a sample above maxval, too few samples), 'empty frame' (zero width or height).
 */
export function decodePnmFrame(bytes: Uint8Array): DecodedPnmFrame {
  if (!isNetpbm(bytes)) throw new ImageDecodeError('unsupported format', 'not a Netpbm file (magic number P2, P3, P5 or P6 missing)');
  const magic = `P${String.fromCharCode(bytes[1])}`;
  if (!['P2', 'P3', 'P5', 'P6'].includes(magic)) {
    throw new ImageDecodeError('unsupported format', `Netpbm ${magic} files (${magic === 'P7' ? 'PAM' : 'bitmaps'}) are not supported; save the frame as PGM (P5 or P2)`);
  }
  const cur = new Cursor(bytes);
  if (bytes.length > 2 && !isSpace(bytes[2]) && bytes[2] !== 0x23) throw corrupt(`the magic number ${magic} is not followed by whitespace`);
  const widthPx = cur.number('width', true);
  const heightPx = cur.number('height', true);
  const maxval = cur.number('maxval', true);
  if (widthPx === null || heightPx === null || maxval === null) throw corrupt('the file ends inside the Netpbm header');
  if (maxval < 1 || maxval > 65535) throw corrupt(`maxval ${maxval} is outside 1..65535 (Netpbm specification)`);
  if (widthPx === 0 || heightPx === 0) throw new ImageDecodeError('empty frame', `Netpbm image is ${widthPx} × ${heightPx} px`);
  if (widthPx * heightPx > 2 ** 28) throw corrupt(`Netpbm image size ${widthPx} × ${heightPx} px is implausible`);

  const channels = magic === 'P3' || magic === 'P6' ? 3 : 1;
  const n = widthPx * heightPx;
  const samples = new Float64Array(n * channels);
  const warnings: string[] = [];
  const bitDepth = Math.ceil(Math.log2(maxval + 1));

  if (magic === 'P5' || magic === 'P6') {
    // Exactly one whitespace character after maxval, then the raster.
    if (cur.pos >= bytes.length || !isSpace(bytes[cur.pos])) throw corrupt('the file ends after maxval, before the raster');
    const start = cur.pos + 1;
    const bytesPer = maxval < 256 ? 1 : 2;
    const need = n * channels * bytesPer;
    if (bytes.length - start < need) throw corrupt(`the raster holds ${bytes.length - start} bytes, ${widthPx} × ${heightPx} px need ${need}`);
    for (let k = 0; k < samples.length; k++) {
      const v = bytesPer === 1 ? bytes[start + k] : (bytes[start + 2 * k] << 8) | bytes[start + 2 * k + 1];
      if (v > maxval) throw corrupt(`sample ${k} is ${v}, above maxval ${maxval}`);
      samples[k] = v;
    }
    if (bytes.length > start + need) warnings.push(`${bytes.length - start - need} bytes follow the first image: only the first image was read`);
  } else {
    for (let k = 0; k < samples.length; k++) {
      const v = cur.number('sample', true);
      if (v === null) throw corrupt(`the file holds ${k} samples, ${widthPx} × ${heightPx} px need ${samples.length}`);
      if (v > maxval) throw corrupt(`sample ${k} is ${v}, above maxval ${maxval}`);
      samples[k] = v;
    }
  }

  let data = samples;
  if (channels === 3) {
    data = new Float64Array(n);
    for (let k = 0; k < n; k++) data[k] = luma709(samples[3 * k], samples[3 * k + 1], samples[3 * k + 2]);
    warnings.push(colourWarning(`this ${magic} (PPM) file`));
  }
  return { data, widthPx, heightPx, bitDepth, maxval, magic, warnings };
}
