/**
 * PNG frames through the `fast-png` package (PNG specification, W3C / ISO/IEC 15948:
 * colour type 0 = greyscale, bit depth 8 or 16, samples stored big-endian). Colour PNGs are read
 * and converted to gray with a warning.
 *
 * Pure: works on Uint8Array only.
 */
import { convertIndexedToRgb, decode, encode } from 'fast-png';
import { ImageDecodeError } from './errors.ts';
import { colourWarning, luma709 } from './gray.ts';

export interface PngEncodeOptions {
  /** tEXt chunks (Latin-1 keyword → text), e.g. { Software: 'Shadowfront' }. */
  text?: Record<string, string>;
}

function checkSize(length: number, widthPx: number, heightPx: number, fn: string): void {
  if (!Number.isInteger(widthPx) || !Number.isInteger(heightPx) || widthPx < 1 || heightPx < 1) {
    throw new RangeError(`${fn}: invalid size ${widthPx} × ${heightPx}`);
  }
  if (length !== widthPx * heightPx) {
    throw new RangeError(`${fn}: ${length} samples for a ${widthPx} × ${heightPx} frame`);
  }
}

/** 16-bit grayscale PNG of a row-major frame of counts (row 0 at the top). */
export function encodePng16(counts: Uint16Array, widthPx: number, heightPx: number, options: PngEncodeOptions = {}): Uint8Array {
  checkSize(counts.length, widthPx, heightPx, 'encodePng16');
  return encode({ width: widthPx, height: heightPx, data: counts, depth: 16, channels: 1, text: options.text });
}

/** 8-bit grayscale PNG, for previews. */
export function encodePng8(values: Uint8Array, widthPx: number, heightPx: number, options: PngEncodeOptions = {}): Uint8Array {
  checkSize(values.length, widthPx, heightPx, 'encodePng8');
  return encode({ width: widthPx, height: heightPx, data: values, depth: 8, channels: 1, text: options.text });
}

export interface DecodedPngFrame {
  /** Row-major sample values (counts), row 0 at the top. */
  data: Float64Array;
  widthPx: number;
  heightPx: number;
  /** 1, 2, 4, 8 or 16 (bits per sample of the stored image; 8 for a palette image). */
  bitDepth: number;
  /** Conversions made on the way (colour → gray, alpha ignored). */
  warnings: string[];
}

/**
 * Read a PNG frame (PNG specification, W3C / ISO/IEC 15948, section 11.2.2 IHDR):
 * - colour type 0 (greyscale), any bit depth: the samples as they are;
 * - colour type 4 (greyscale + alpha): the grey samples, alpha ignored (with a warning);
 * - colour types 2 and 6 (truecolour, with or without alpha) and 3 (palette): converted to gray with
 *   the ITU-R BT.709 luma weights (see gray.ts), with a warning.
 * Chunk CRCs are checked. A file that fails to parse gives 'truncated or corrupt'; bytes without the
 * PNG signature give 'unsupported format'.
 */
export function decodePngFrame(bytes: Uint8Array): DecodedPngFrame {
  const sig = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];
  if (bytes.length < 8 || sig.some((b, k) => bytes[k] !== b)) {
    throw new ImageDecodeError('unsupported format', 'not a PNG file (signature missing)');
  }
  let png;
  try {
    png = decode(bytes, { checkCrc: true });
  } catch (e) {
    throw new ImageDecodeError('truncated or corrupt', `PNG could not be read (${(e as Error).message})`);
  }
  const { width, height, channels, depth } = png;
  if (!(width > 0 && height > 0)) throw new ImageDecodeError('empty frame', 'PNG has no pixels');
  const warnings: string[] = [];
  const data = new Float64Array(width * height);
  const src = png.data;
  const expected = depth >= 8 ? width * height * channels : Math.ceil((width * depth * channels) / 8) * height;
  if (src.length < expected) {
    throw new ImageDecodeError('truncated or corrupt', `PNG holds ${src.length} samples, ${width} × ${height} px need ${expected}`);
  }
  if (png.palette) {
    let rgb: Uint8Array;
    try {
      rgb = convertIndexedToRgb(png);
    } catch (e) {
      throw new ImageDecodeError('truncated or corrupt', `PNG palette image could not be read (${(e as Error).message})`);
    }
    const n = png.palette[0]?.length ?? 3;
    for (let k = 0; k < data.length; k++) data[k] = luma709(rgb[k * n], rgb[k * n + 1], rgb[k * n + 2]);
    warnings.push(colourWarning('this PNG (palette)'));
    return { data, widthPx: width, heightPx: height, bitDepth: 8, warnings };
  }
  if (channels === 3 || channels === 4) {
    for (let k = 0; k < data.length; k++) {
      const o = k * channels;
      data[k] = luma709(src[o], src[o + 1], src[o + 2]);
    }
    warnings.push(colourWarning(`this PNG (${channels === 4 ? 'RGBA' : 'RGB'}, ${depth}-bit)`));
    return { data, widthPx: width, heightPx: height, bitDepth: depth, warnings };
  }
  if (channels !== 1 && channels !== 2) {
    throw new ImageDecodeError('unsupported format', `PNG has ${channels} channels; a grayscale frame is needed`);
  }
  if (channels === 2) warnings.push('this PNG has an alpha channel: it was ignored');
  if (depth >= 8) {
    for (let k = 0; k < data.length; k++) data[k] = src[k * channels];
  } else {
    // Sub-byte depths: each row starts on a byte boundary, pixels packed most significant bits first.
    const rowBytes = Math.ceil((width * depth * channels) / 8);
    const mask = (1 << depth) - 1;
    for (let r = 0; r < height; r++) {
      for (let c = 0; c < width; c++) {
        const bit = c * depth * channels;
        const byte = src[r * rowBytes + (bit >> 3)];
        data[r * width + c] = (byte >> (8 - depth - (bit & 7))) & mask;
      }
    }
  }
  return { data, widthPx: width, heightPx: height, bitDepth: depth, warnings };
}
