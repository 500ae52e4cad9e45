/**
 * TIFF frames: read 8- and 16-bit grayscale TIFF files (and colour ones, converted to gray with a
 * warning) through the `utif2` decoder, with the checks a measurement needs around it.
 *
 * Source: TIFF Revision 6.0, Adobe Developers Association, 3 June 1992:
 *   section 2  header ("II" little-endian or "MM" big-endian, then 42), IFDs, field types;
 *   section 3  bilevel images, Compression 32773 = PackBits (section 9 describes it);
 *   section 4  grayscale: PhotometricInterpretation 0 = WhiteIsZero, 1 = BlackIsZero; BitsPerSample;
 *   section 5  palette colour (3, ColorMap of 16-bit values); section 6  RGB (2, SamplesPerPixel ≥ 3);
 *   section 8  tag numbers; section 13  LZW (Compression 5); section 14  Predictor (2 = horizontal
 *   differencing); section 15  tiled images; section 18  ExtraSamples; section 19  SampleFormat.
 * Deflate (Compression 8, and the older code 32946): "Adobe Photoshop TIFF Technical Notes"
 * (March 2002), a zlib stream (RFC 1950/1951) per strip.
 *
 * Accepted: uncompressed, LZW, Deflate or PackBits, stored in strips, chunky (PlanarConfiguration 1),
 * unsigned 8- or 16-bit samples, Predictor 1 or 2. The first image of a multi-page file is read.
 * 12-bit data stored in 16-bit samples read as they are (the caller checks them against the camera's
 * bit depth). Anything else is refused with 'unsupported format' naming what was found.
 *
 * Pure: works on Uint8Array only.
 */
import { ImageDecodeError } from './errors.ts';
import { colourWarning, luma709 } from './gray.ts';
import { tagNumbers, utif, type UtifIfd } from './utif2.ts';

export interface DecodedTiffFrame {
  /** Row-major sample values (counts), row 0 at the top (TIFF 6.0: Orientation 1 is the default). */
  data: Float64Array;
  widthPx: number;
  heightPx: number;
  /** BitsPerSample: 8 or 16. */
  bitDepth: number;
  warnings: string[];
}

const TAG = {
  ImageWidth: 256,
  ImageLength: 257,
  BitsPerSample: 258,
  Compression: 259,
  PhotometricInterpretation: 262,
  FillOrder: 266,
  StripOffsets: 273,
  Orientation: 274,
  SamplesPerPixel: 277,
  RowsPerStrip: 278,
  StripByteCounts: 279,
  PlanarConfiguration: 284,
  Predictor: 317,
  ColorMap: 320,
  TileWidth: 322,
  SampleFormat: 339,
} as const;

const COMPRESSION_NAMES: Record<number, string> = {
  1: 'none',
  5: 'LZW',
  8: 'Deflate',
  32946: 'Deflate (old code)',
  32773: 'PackBits',
};

function unsupported(detail: string): ImageDecodeError {
  return new ImageDecodeError('unsupported format', `${detail}; save the frame as an 8- or 16-bit grayscale TIFF (uncompressed, LZW, Deflate or PackBits)`);
}

function corrupt(detail: string): ImageDecodeError {
  return new ImageDecodeError('truncated or corrupt', detail);
}

/** True when the bytes start with a TIFF header (TIFF 6.0 section 2: "II" 42 or "MM" 42). */
export function isTiff(bytes: Uint8Array): boolean {
  if (bytes.length < 4) return false;
  return (
    (bytes[0] === 0x49 && bytes[1] === 0x49 && bytes[2] === 42 && bytes[3] === 0) ||
    (bytes[0] === 0x4d && bytes[1] === 0x4d && bytes[2] === 0 && bytes[3] === 42)
  );
}

function one(ifd: UtifIfd, tag: number, fallback: number): number {
  const v = tagNumbers(ifd, tag);
  return v ? v[0] : fallback;
}

/**
 * Decode the first image of a TIFF file into gray counts.
 * Throws ImageDecodeError: 'unsupported format' (not a TIFF, or a kind of TIFF not listed above),
 * 'truncated or corrupt' (the file ends before its strips do, or cannot be parsed), 'empty frame'
 * (zero width or height).
 */
export function decodeTiffFrame(bytes: Uint8Array): DecodedTiffFrame {
  if (!isTiff(bytes)) throw new ImageDecodeError('unsupported format', 'not a TIFF file (header "II*\\0" or "MM\\0*" missing)');
  if (bytes.length < 8) throw corrupt('TIFF file ends inside its header');
  // utif2 works on an ArrayBuffer whose first byte is the file's first byte.
  const buffer = bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer;
  const view = new DataView(buffer);
  const le = bytes[0] === 0x49;
  const ifdOffset = view.getUint32(4, le);
  if (ifdOffset < 8 || ifdOffset + 2 > bytes.length) throw corrupt(`TIFF first IFD offset ${ifdOffset} lies outside the file (${bytes.length} bytes)`);
  const entries = view.getUint16(ifdOffset, le);
  if (ifdOffset + 2 + 12 * entries > bytes.length) throw corrupt(`TIFF file ends inside its first IFD (${entries} entries at offset ${ifdOffset})`);

  let ifds: UtifIfd[];
  try {
    ifds = utif.decode(buffer);
  } catch (e) {
    throw corrupt(`TIFF directory could not be read (${(e as Error).message})`);
  }
  const ifd = ifds[0];
  if (!ifd) throw corrupt('TIFF file holds no image directory');
  const warnings: string[] = [];
  if (ifds.length > 1) warnings.push(`this TIFF holds ${ifds.length} images: only the first was read`);

  const widthPx = one(ifd, TAG.ImageWidth, -1);
  const heightPx = one(ifd, TAG.ImageLength, -1);
  if (widthPx < 0 || heightPx < 0) throw corrupt('TIFF image lacks ImageWidth or ImageLength');
  if (widthPx === 0 || heightPx === 0) throw new ImageDecodeError('empty frame', `TIFF image is ${widthPx} × ${heightPx} px`);
  if (widthPx * heightPx > 2 ** 28) throw corrupt(`TIFF image size ${widthPx} × ${heightPx} px is implausible`);

  const spp = one(ifd, TAG.SamplesPerPixel, 1);
  const bpsAll = tagNumbers(ifd, TAG.BitsPerSample) ?? [1];
  const bps = bpsAll[0];
  if (bpsAll.some((b) => b !== bps)) throw unsupported(`TIFF samples have different bit depths (${bpsAll.join(', ')})`);
  if (bps !== 8 && bps !== 16) throw unsupported(`TIFF has ${bps}-bit samples`);
  const sampleFormat = one(ifd, TAG.SampleFormat, 1);
  if (sampleFormat !== 1) {
    const kind = sampleFormat === 2 ? 'signed integer' : sampleFormat === 3 ? 'floating-point' : `SampleFormat ${sampleFormat}`;
    throw unsupported(`TIFF samples are ${kind}`);
  }
  const compression = one(ifd, TAG.Compression, 1);
  if (!(compression in COMPRESSION_NAMES)) throw unsupported(`TIFF compression ${compression} is not supported`);
  if (tagNumbers(ifd, TAG.TileWidth)) throw unsupported('tiled TIFF files are not supported (only strips)');
  if (spp > 1 && one(ifd, TAG.PlanarConfiguration, 1) !== 1) throw unsupported('TIFF colour planes stored separately (PlanarConfiguration 2)');
  const predictor = one(ifd, TAG.Predictor, 1);
  if (predictor !== 1 && predictor !== 2) throw unsupported(`TIFF Predictor ${predictor}`);
  if (one(ifd, TAG.FillOrder, 1) !== 1) throw unsupported('TIFF FillOrder 2 (reversed bits)');
  const photometric = one(ifd, TAG.PhotometricInterpretation, spp >= 3 ? 2 : 1);
  if (!((photometric <= 1 && spp >= 1) || (photometric === 2 && spp >= 3) || (photometric === 3 && spp === 1))) {
    throw unsupported(`TIFF PhotometricInterpretation ${photometric} with ${spp} samples per pixel`);
  }
  const orientation = one(ifd, TAG.Orientation, 1);
  if (orientation !== 1) warnings.push(`this TIFF says Orientation ${orientation}; it was read as stored (row 0 on top, column 0 on the left): set camera.orientation in the setup if needed`);

  // Every strip must lie inside the file: a file cut short is refused, never padded with zeros.
  const offsets = tagNumbers(ifd, TAG.StripOffsets);
  if (!offsets) throw corrupt('TIFF image lacks StripOffsets');
  const bytesPerRow = Math.ceil((widthPx * spp * bps) / 8);
  const rowsPerStrip = Math.min(one(ifd, TAG.RowsPerStrip, heightPx), heightPx);
  const stripsNeeded = Math.ceil(heightPx / Math.max(1, rowsPerStrip));
  if (offsets.length < stripsNeeded) throw corrupt(`TIFF has ${offsets.length} strips, ${heightPx} rows of ${rowsPerStrip} per strip need ${stripsNeeded}`);
  let counts = tagNumbers(ifd, TAG.StripByteCounts);
  if (!counts) {
    if (compression !== 1 || offsets.length !== 1) throw corrupt('TIFF image lacks StripByteCounts');
    counts = [bytesPerRow * heightPx];
  }
  if (compression === 1 && offsets.length === 1) counts = [bytesPerRow * heightPx]; // what utif2 reads in this case
  for (let s = 0; s < offsets.length; s++) {
    const end = offsets[s] + (counts[s] ?? Infinity);
    if (!(end <= bytes.length)) throw corrupt(`TIFF strip ${s} ends at byte ${end}, the file has ${bytes.length} bytes`);
  }
  if (compression === 1) {
    let total = 0;
    for (let s = 0; s < stripsNeeded; s++) total += counts[s] ?? 0;
    if (total < bytesPerRow * heightPx) throw corrupt(`TIFF strips hold ${total} bytes, ${widthPx} × ${heightPx} px need ${bytesPerRow * heightPx}`);
  }

  if (compression === 5) {
    for (let k = 0; k < stripsNeeded; k++) checkLzwStrip(bytes, offsets[k], counts[k], k);
  }
  try {
    utif.decodeImage(buffer, ifd);
  } catch (e) {
    throw corrupt(`TIFF pixel data could not be decompressed (${COMPRESSION_NAMES[compression]}: ${(e as Error).message})`);
  }
  const raw = ifd.data;
  const need = bytesPerRow * heightPx;
  if (!(raw instanceof Uint8Array) || raw.length < need) {
    throw corrupt(`TIFF pixel data hold ${raw instanceof Uint8Array ? raw.length : 0} bytes, ${widthPx} × ${heightPx} px need ${need}`);
  }

  // Samples per pixel: utif2 leaves 16-bit samples little-endian whatever the file's byte order.
  const n = widthPx * heightPx;
  const sample = bps === 8 ? (k: number) => raw[k] : (k: number) => raw[2 * k] | (raw[2 * k + 1] << 8);
  const data = new Float64Array(n);
  const maxValue = 2 ** bps - 1;
  if (photometric <= 1) {
    for (let r = 0; r < heightPx; r++) {
      for (let c = 0; c < widthPx; c++) data[r * widthPx + c] = sample((r * widthPx + c) * spp);
    }
    if (spp > 1) warnings.push(`this TIFF has ${spp} samples per pixel: only the first (gray) was read`);
    if (photometric === 0) {
      // TIFF 6.0 section 4: WhiteIsZero, 0 is imaged as white and 2^BitsPerSample − 1 as black.
      for (let k = 0; k < n; k++) data[k] = maxValue - data[k];
      warnings.push('this TIFF stores gray as WhiteIsZero (inverted): values were turned back so that more light gives more counts');
    }
  } else if (photometric === 2) {
    for (let k = 0; k < n; k++) data[k] = luma709(sample(k * spp), sample(k * spp + 1), sample(k * spp + 2));
    warnings.push(colourWarning(`this TIFF (RGB, ${bps}-bit)`));
  } else {
    // Palette (TIFF 6.0 section 5): ColorMap holds 3·2^BitsPerSample 16-bit values, all reds, then greens, then blues.
    const map = tagNumbers(ifd, TAG.ColorMap);
    const size = 2 ** bps;
    if (!map || map.length < 3 * size) throw corrupt('TIFF palette image lacks a complete ColorMap');
    for (let k = 0; k < n; k++) {
      const i = sample(k);
      data[k] = luma709(map[i], map[size + i], map[2 * size + i]);
    }
    warnings.push(colourWarning('this TIFF (palette, 16-bit colour map values)'));
    return { data, widthPx, heightPx, bitDepth: 16, warnings };
  }
  return { data, widthPx, heightPx, bitDepth: bps, warnings };
}

/**
 * Walk an LZW strip (TIFF 6.0 section 13) without decoding it, and refuse it when it is not a valid
 * stream: utif2's decoder trusts its input, and a corrupt stream can make its string table overflow and
 * its decoding loop run forever. The code-width rule is utif2's (and libtiff's): the width grows when the
 * next free code + 1 reaches 2^width, up to 12 bits; ClearCode 256 resets the table, EndOfInformation
 * 257 ends the strip. A code may not exceed the next free code (the code equal to it is the "KwKwK" case
 * of the algorithm), the first code after a ClearCode must be a literal (0–255), and the table may not
 * grow beyond 4095 entries.
 */
function checkLzwStrip(bytes: Uint8Array, offset: number, length: number, strip: number): void {
  const end = (offset + length) * 8;
  let pos = offset * 8;
  let width = 9;
  let next = 258;
  let first = true;
  const bad = (what: string) => corrupt(`TIFF strip ${strip} is not a valid LZW stream (${what} at bit ${pos - offset * 8})`);
  while (pos + width <= end) {
    let code = 0;
    for (let b = 0; b < width; b++, pos++) code = (code << 1) | ((bytes[pos >> 3] >> (7 - (pos & 7))) & 1);
    if (code === 257) return;
    if (code === 256) {
      width = 9;
      next = 258;
      first = true;
      continue;
    }
    if (first) {
      if (code > 255) throw bad(`code ${code} right after a ClearCode`);
      first = false;
      continue;
    }
    if (code > next) throw bad(`code ${code} before code ${next} was defined`);
    next++;
    if (next > 4095) throw bad('string table overflow without a ClearCode');
    if (next + 1 === 1 << width && width !== 12) width++;
  }
}
