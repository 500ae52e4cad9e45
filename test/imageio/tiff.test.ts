/**
 * 16-bit grayscale TIFF writer.
 * Source: TIFF Revision 6.0 (Adobe Developers Association, 1992): section 2 (header "II", 42, IFD
 * offset; IFD entries of 12 bytes sorted by ascending tag; word-aligned offsets), section 4 (grayscale
 * fields), section 8 (tag numbers), section 19 (SampleFormat). Decoding uses the utif2 package.
 */
import UTIF from 'utif2';
import { describe, expect, it } from 'vitest';
import { encodeTiff16 } from '../../core/imageio/tiff.ts';

const W = 41;
const H = 17;
function counts(): Uint16Array {
  const c = new Uint16Array(W * H);
  for (let k = 0; k < c.length; k++) c[k] = (k * 24593 + 11) % 65536;
  c[0] = 0;
  c[1] = 65535;
  c[2] = 256;
  return c;
}

function toArrayBuffer(b: Uint8Array): ArrayBuffer {
  return b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength) as ArrayBuffer;
}

describe('encodeTiff16', () => {
  it('is decoded by utif2 to the same 16-bit samples', () => {
    const c = counts();
    const ab = toArrayBuffer(encodeTiff16(c, W, H));
    const ifds = UTIF.decode(ab);
    expect(ifds.length).toBe(1);
    UTIF.decodeImage(ab, ifds[0]);
    const ifd = ifds[0];
    expect(ifd.width).toBe(W);
    expect(ifd.height).toBe(H);
    // utif2 leaves 16-bit samples as raw bytes in the file's byte order (little-endian here).
    const raw = ifd.data;
    expect(raw.length).toBe(2 * W * H);
    const samples = Array.from({ length: W * H }, (_, k) => raw[2 * k] | (raw[2 * k + 1] << 8));
    expect(samples).toEqual(Array.from(c));
    // TIFF 6.0 field values: BitsPerSample 16, Compression 1 (none), PhotometricInterpretation 1
    // (BlackIsZero), SamplesPerPixel 1, RowsPerStrip = ImageLength, StripByteCounts, SampleFormat 1 (uint).
    expect(ifd.t258).toEqual([16]);
    expect(ifd.t259).toEqual([1]);
    expect(ifd.t262).toEqual([1]);
    expect(ifd.t277).toEqual([1]);
    expect(ifd.t278).toEqual([H]);
    expect(ifd.t279).toEqual([2 * W * H]);
    expect(ifd.t339).toEqual([1]);
    expect(ifd.t296).toEqual([1]); // ResolutionUnit 1: no absolute unit
  });

  it('writes the pixel pitch as pixels per centimetre (ResolutionUnit 3)', () => {
    const ab = toArrayBuffer(encodeTiff16(new Uint16Array(4), 2, 2, { pixelPitchM: 5e-6 }));
    const ifd = UTIF.decode(ab)[0];
    expect(ifd.t296).toEqual([3]);
    // 5 µm pitch: 0.01 m / 5e-6 m = 2000 pixels per cm.
    const [num, den] = (ifd.t282 as unknown as number[][])[0];
    expect(num / den).toBeCloseTo(2000, 9);
    const [ny, dy] = (ifd.t283 as unknown as number[][])[0];
    expect(ny / dy).toBeCloseTo(2000, 9);
  });

  it('follows the baseline layout: "II" header, sorted 12-byte IFD entries, even offsets, one strip', () => {
    const bytes = encodeTiff16(counts(), W, H);
    const v = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    expect(String.fromCharCode(bytes[0], bytes[1])).toBe('II'); // little-endian byte order
    expect(v.getUint16(2, true)).toBe(42);
    const ifd = v.getUint32(4, true);
    expect(ifd % 2).toBe(0);
    const n = v.getUint16(ifd, true);
    const tags: number[] = [];
    const value: Record<number, number> = {};
    for (let k = 0; k < n; k++) {
      const e = ifd + 2 + 12 * k;
      const tag = v.getUint16(e, true);
      const type = v.getUint16(e + 2, true);
      tags.push(tag);
      value[tag] = type === 3 ? v.getUint16(e + 8, true) : v.getUint32(e + 8, true);
    }
    expect(v.getUint32(ifd + 2 + 12 * n, true)).toBe(0); // no next IFD
    // Required baseline grayscale fields (TIFF 6.0 section 4) plus SampleFormat, in ascending order.
    expect(tags).toEqual([256, 257, 258, 259, 262, 273, 277, 278, 279, 282, 283, 296, 339]);
    expect(value[256]).toBe(W);
    expect(value[257]).toBe(H);
    for (const t of [273, 282, 283]) expect(value[t] % 2).toBe(0);
    expect(value[273] + value[279]).toBe(bytes.length); // the one strip ends the file
  });

  it('refuses a size that does not match the data', () => {
    expect(() => encodeTiff16(new Uint16Array(5), 2, 2)).toThrow(RangeError);
    expect(() => encodeTiff16(new Uint16Array(0), 0, 0)).toThrow(RangeError);
  });
});
