/**
 * Grayscale PNG frames through the `fast-png` package (PNG specification, W3C / ISO/IEC 15948:
 * colour type 0 = greyscale, bit depth 8 or 16, samples stored big-endian).
 *
 * Pure: works on Uint8Array only.
 */
import { decode, encode } from 'fast-png';
import { ImageDecodeError } from './errors.ts';

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
  /** 1, 2, 4, 8 or 16. */
  bitDepth: number;
}

/**
 * Read a grayscale PNG (colour type 0; or grey + alpha, whose alpha is ignored). Colour and palette
 * images are refused with 'unsupported format'; a file that fails to parse gives 'truncated or corrupt'.
 */
export function decodePngFrame(bytes: Uint8Array): DecodedPngFrame {
  const sig = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];
  if (bytes.length < 8 || sig.some((b, k) => bytes[k] !== b)) {
    throw new ImageDecodeError('unsupported format', 'not a PNG file (signature missing)');
  }
  let png;
  try {
    png = decode(bytes);
  } catch (e) {
    throw new ImageDecodeError('truncated or corrupt', `PNG could not be read (${(e as Error).message})`);
  }
  if (png.palette || (png.channels !== 1 && png.channels !== 2)) {
    throw new ImageDecodeError('unsupported format', `PNG has ${png.channels} channels${png.palette ? ' (palette)' : ''}; a grayscale frame is needed`);
  }
  const { width, height, channels, depth } = png;
  if (width * height === 0) throw new ImageDecodeError('empty frame', 'PNG has no pixels');
  const data = new Float64Array(width * height);
  const src = png.data;
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
  return { data, widthPx: width, heightPx: height, bitDepth: depth };
}
