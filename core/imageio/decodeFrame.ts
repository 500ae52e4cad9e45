/**
 * One entry point for every camera-frame file Shadowfront reads: PNG, TIFF, PGM/PPM and NumPy .npy.
 * The format is recognised from the first bytes of the file (its magic number), never from the name:
 *
 *   PNG   89 50 4E 47 0D 0A 1A 0A            (PNG specification, section 5.2 "PNG signature")
 *   TIFF  "II" 2A 00  or  "MM" 00 2A         (TIFF 6.0, section 2 "Image File Header")
 *   PNM   "P1" … "P7"                          (Netpbm format specifications; P2, P3, P5, P6 are read)
 *   NPY   93 "NUMPY"                           (NEP 1 / numpy.lib.format)
 *
 * Pure: works on Uint8Array only. Every error is an ImageDecodeError whose message names the file.
 */
import { ImageDecodeError } from './errors.ts';
import { decodeNpyFrame } from './npy.ts';
import { decodePngFrame } from './png.ts';
import { decodePnmFrame, isNetpbm } from './pgm.ts';
import { decodeTiffFrame, isTiff } from './tiffDecode.ts';

export type FrameFormat = 'png' | 'tiff' | 'pgm' | 'npy';

export interface DecodedFrame {
  /** Row-major sample values (counts as stored), row 0 = the first row of the file. */
  data: Float64Array;
  widthPx: number;
  heightPx: number;
  /**
   * Bits per sample of the stored image (PNG, TIFF: the container, e.g. 16 for 12-bit data in 16-bit
   * samples; PGM: the bits maxval needs; NPY: 8 for u1/i1, 16 for u2/i2, null for other dtypes).
   */
  bitDepth: number | null;
  /** Conversions made while reading (colour → gray, extra images ignored, …), in plain words. */
  warnings: string[];
  format: FrameFormat;
}

const PNG_SIGNATURE = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];
const NPY_MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59];

/** The format the first bytes announce, or null. */
export function sniffFormat(bytes: Uint8Array): FrameFormat | null {
  const starts = (m: number[]) => bytes.length >= m.length && m.every((b, k) => bytes[k] === b);
  if (starts(PNG_SIGNATURE)) return 'png';
  if (isTiff(bytes)) return 'tiff';
  if (starts(NPY_MAGIC)) return 'npy';
  if (isNetpbm(bytes)) return 'pgm';
  return null;
}

function npyBitDepth(dtype: string): number | null {
  const code = dtype.replace(/^[<>|=]/, '');
  if (code === 'u1' || code === 'i1') return 8;
  if (code === 'u2' || code === 'i2') return 16;
  return null;
}

/**
 * Decode a camera frame. `fileName` names the file in error messages and warnings (each warning
 * starts with "<fileName>: ").
 * Throws ImageDecodeError with reason 'unsupported format' | 'truncated or corrupt' |
 * 'wrong dimensions' | 'empty frame' and a message "<fileName>: <reason>: <detail>".
 */
export function decodeFrame(bytes: Uint8Array, fileName: string): DecodedFrame {
  const frame = decodeByFormat(bytes, fileName);
  frame.warnings = frame.warnings.map((w) => `${fileName}: ${w}`);
  return frame;
}

function decodeByFormat(bytes: Uint8Array, fileName: string): DecodedFrame {
  if (bytes.length === 0) throw new ImageDecodeError('empty frame', 'the file is empty (0 bytes)', fileName);
  const format = sniffFormat(bytes);
  try {
    switch (format) {
      case 'png': {
        const f = decodePngFrame(bytes);
        return { data: f.data, widthPx: f.widthPx, heightPx: f.heightPx, bitDepth: f.bitDepth, warnings: f.warnings, format };
      }
      case 'tiff': {
        const f = decodeTiffFrame(bytes);
        return { data: f.data, widthPx: f.widthPx, heightPx: f.heightPx, bitDepth: f.bitDepth, warnings: f.warnings, format };
      }
      case 'pgm': {
        const f = decodePnmFrame(bytes);
        return { data: f.data, widthPx: f.widthPx, heightPx: f.heightPx, bitDepth: f.bitDepth, warnings: f.warnings, format };
      }
      case 'npy': {
        const f = decodeNpyFrame(bytes);
        return { data: f.data, widthPx: f.widthPx, heightPx: f.heightPx, bitDepth: npyBitDepth(f.dtype), warnings: [], format };
      }
      default: {
        const head = Array.from(bytes.subarray(0, 8), (b) => b.toString(16).padStart(2, '0')).join(' ');
        throw new ImageDecodeError(
          'unsupported format',
          `the first bytes (${head}) are not those of a PNG, TIFF, PGM/PPM or NumPy .npy file (the format is recognised from the content, not the name)`,
        );
      }
    }
  } catch (e) {
    if (e instanceof ImageDecodeError) throw e.withFile(fileName);
    // A decoder library failing in an unforeseen way still means the bytes could not be read.
    throw new ImageDecodeError('truncated or corrupt', `could not be read (${(e as Error)?.message ?? String(e)})`, fileName);
  }
}
