/**
 * 16-bit grayscale TIFF writer (baseline TIFF, uncompressed, one strip), hand-written.
 *
 * Source: TIFF Revision 6.0, Adobe Developers Association, 3 June 1992 — section 2 (image file
 * header, IFD layout, field types), section 4 (grayscale images: required fields) and section 19
 * (SampleFormat).
 *
 * File layout written here (all values little-endian, byte order "II"):
 *   0   header: "II", 42, offset of the first IFD (= 8)
 *   8   IFD: entry count (uint16), 12-byte entries sorted by tag, next-IFD offset 0 (uint32)
 *   …   XResolution and YResolution RATIONALs (two uint32 each)
 *   …   pixel data, row 0 first, 2 bytes per pixel
 * Every offset is even ("word boundary", TIFF 6.0 section 2).
 *
 * Pure: works on Uint8Array only.
 */

export interface TiffEncodeOptions {
  /**
   * Pixel pitch, written as XResolution = YResolution = pixels per centimetre with ResolutionUnit 3
   * (centimetre). Without it the resolution is 1/1 with ResolutionUnit 1 (no absolute unit).
   */
  pixelPitchM?: number;
}

/** TIFF 6.0 field types (section 2). */
const SHORT = 3;
const LONG = 4;
const RATIONAL = 5;

/** Tag numbers (TIFF 6.0 sections 8 and 19). */
export const TIFF_TAG = {
  ImageWidth: 256,
  ImageLength: 257,
  BitsPerSample: 258,
  Compression: 259,
  PhotometricInterpretation: 262,
  StripOffsets: 273,
  SamplesPerPixel: 277,
  RowsPerStrip: 278,
  StripByteCounts: 279,
  XResolution: 282,
  YResolution: 283,
  ResolutionUnit: 296,
  SampleFormat: 339,
} as const;

/** A positive number as a TIFF RATIONAL (uint32 numerator / uint32 denominator). */
function toRational(x: number): [number, number] {
  if (!(x > 0) || !Number.isFinite(x)) throw new RangeError(`encodeTiff16: resolution ${x} is not positive`);
  let den = 10000;
  while (den > 1 && Math.round(x * den) > 0xffffffff) den = Math.floor(den / 10);
  const num = Math.round(x * den);
  if (num < 1 || num > 0xffffffff) throw new RangeError(`encodeTiff16: resolution ${x} is out of range`);
  return [num, den];
}

/** Baseline uncompressed 16-bit grayscale TIFF (BlackIsZero) of a row-major frame of counts. */
export function encodeTiff16(counts: Uint16Array, widthPx: number, heightPx: number, options: TiffEncodeOptions = {}): Uint8Array {
  if (!Number.isInteger(widthPx) || !Number.isInteger(heightPx) || widthPx < 1 || heightPx < 1) {
    throw new RangeError(`encodeTiff16: invalid size ${widthPx} × ${heightPx}`);
  }
  if (counts.length !== widthPx * heightPx) {
    throw new RangeError(`encodeTiff16: ${counts.length} samples for a ${widthPx} × ${heightPx} frame`);
  }
  const stripBytes = widthPx * heightPx * 2;
  if (stripBytes > 0xffffffff - 4096) throw new RangeError('encodeTiff16: frame too large for a TIFF file');

  let resolution: [number, number] = [1, 1];
  let resolutionUnit = 1; // no absolute unit of measurement
  if (options.pixelPitchM !== undefined) {
    const pitchM = options.pixelPitchM;
    if (!(pitchM > 0) || !Number.isFinite(pitchM)) throw new RangeError(`encodeTiff16: invalid pixel pitch ${pitchM} m`);
    resolution = toRational(0.01 / pitchM); // pixels per centimetre
    resolutionUnit = 3; // centimetre
  }

  const nEntries = 13;
  const ifdOffset = 8;
  const ifdBytes = 2 + 12 * nEntries + 4;
  const xResOffset = ifdOffset + ifdBytes;
  const yResOffset = xResOffset + 8;
  const dataOffset = yResOffset + 8;

  const out = new Uint8Array(dataOffset + stripBytes);
  const v = new DataView(out.buffer);
  // Image file header (TIFF 6.0 section 2): "II", 42, first IFD offset.
  out[0] = 0x49;
  out[1] = 0x49;
  v.setUint16(2, 42, true);
  v.setUint32(4, ifdOffset, true);

  v.setUint16(ifdOffset, nEntries, true);
  let p = ifdOffset + 2;
  const entry = (tag: number, type: number, count: number, value: number) => {
    v.setUint16(p, tag, true);
    v.setUint16(p + 2, type, true);
    v.setUint32(p + 4, count, true);
    // A value that fits in 4 bytes is stored in the entry, left-justified (TIFF 6.0 section 2).
    if (type === SHORT) v.setUint16(p + 8, value, true);
    else v.setUint32(p + 8, value, true);
    p += 12;
  };
  // Entries in ascending tag order (TIFF 6.0 section 2: "The entries in an IFD must be sorted in ascending order by Tag").
  entry(TIFF_TAG.ImageWidth, LONG, 1, widthPx);
  entry(TIFF_TAG.ImageLength, LONG, 1, heightPx);
  entry(TIFF_TAG.BitsPerSample, SHORT, 1, 16);
  entry(TIFF_TAG.Compression, SHORT, 1, 1); // no compression
  entry(TIFF_TAG.PhotometricInterpretation, SHORT, 1, 1); // BlackIsZero
  entry(TIFF_TAG.StripOffsets, LONG, 1, dataOffset);
  entry(TIFF_TAG.SamplesPerPixel, SHORT, 1, 1);
  entry(TIFF_TAG.RowsPerStrip, LONG, 1, heightPx);
  entry(TIFF_TAG.StripByteCounts, LONG, 1, stripBytes);
  entry(TIFF_TAG.XResolution, RATIONAL, 1, xResOffset);
  entry(TIFF_TAG.YResolution, RATIONAL, 1, yResOffset);
  entry(TIFF_TAG.ResolutionUnit, SHORT, 1, resolutionUnit);
  entry(TIFF_TAG.SampleFormat, SHORT, 1, 1); // unsigned integer
  v.setUint32(p, 0, true); // no further IFD

  v.setUint32(xResOffset, resolution[0], true);
  v.setUint32(xResOffset + 4, resolution[1], true);
  v.setUint32(yResOffset, resolution[0], true);
  v.setUint32(yResOffset + 4, resolution[1], true);

  for (let k = 0; k < counts.length; k++) v.setUint16(dataOffset + 2 * k, counts[k], true);
  return out;
}
