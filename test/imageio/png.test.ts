/**
 * Grayscale PNG frames.
 * Sources: PNG specification (W3C Recommendation, 3rd ed. / ISO/IEC 15948): signature bytes,
 * IHDR layout (width, height as 4-byte big-endian; then bit depth, colour type), colour type 0 =
 * greyscale with bit depths 1, 2, 4, 8, 16. Decoding for the round trips uses the fast-png package.
 */
import { decode, encode } from 'fast-png';
import { describe, expect, it } from 'vitest';
import { ImageDecodeError } from '../../core/imageio/errors.ts';
import { decodePngFrame, encodePng16, encodePng8 } from '../../core/imageio/png.ts';

function reasonOf(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    if (e instanceof ImageDecodeError) return e.reason;
    throw e;
  }
  return 'no error';
}

const W = 37;
const H = 23;
function counts16(): Uint16Array {
  // Every extreme and a spread of values in between, including both bytes of each sample.
  const c = new Uint16Array(W * H);
  for (let k = 0; k < c.length; k++) c[k] = (k * 40503) % 65536;
  c[0] = 0;
  c[1] = 65535;
  c[2] = 256;
  c[3] = 255;
  c[4] = 1;
  return c;
}

describe('encodePng16', () => {
  it('writes a 16-bit greyscale IHDR (PNG spec: IHDR fields)', () => {
    const png = encodePng16(counts16(), W, H);
    // Signature 89 50 4E 47 0D 0A 1A 0A.
    expect(Array.from(png.subarray(0, 8))).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    // First chunk: length 13, type "IHDR".
    const v = new DataView(png.buffer, png.byteOffset);
    expect(v.getUint32(8)).toBe(13);
    expect(String.fromCharCode(...png.subarray(12, 16))).toBe('IHDR');
    expect(v.getUint32(16)).toBe(W); // width, big-endian
    expect(v.getUint32(20)).toBe(H); // height
    expect(png[24]).toBe(16); // bit depth
    expect(png[25]).toBe(0); // colour type 0: greyscale
  });

  it('round-trips through the fast-png decoder with every 16-bit value exact', () => {
    const c = counts16();
    const d = decode(encodePng16(c, W, H));
    expect(d.width).toBe(W);
    expect(d.height).toBe(H);
    expect(d.depth).toBe(16);
    expect(d.channels).toBe(1);
    expect(Array.from(d.data)).toEqual(Array.from(c));
  });

  it('stores text chunks and refuses a size that does not match the data', () => {
    const d = decode(encodePng16(new Uint16Array(4), 2, 2, { text: { Software: 'Shadowfront' } }));
    expect(d.text.Software).toBe('Shadowfront');
    expect(() => encodePng16(new Uint16Array(5), 2, 2)).toThrow(RangeError);
  });
});

describe('encodePng8 and decodePngFrame', () => {
  it('round-trips 8-bit previews and 16-bit frames', () => {
    const v8 = Uint8Array.from({ length: W * H }, (_, k) => (k * 7) % 256);
    const d8 = decode(encodePng8(v8, W, H));
    expect(d8.depth).toBe(8);
    expect(Array.from(d8.data)).toEqual(Array.from(v8));
    const f8 = decodePngFrame(encodePng8(v8, W, H));
    expect([f8.widthPx, f8.heightPx, f8.bitDepth]).toEqual([W, H, 8]);
    expect(Array.from(f8.data)).toEqual(Array.from(v8));
    const c = counts16();
    const f16 = decodePngFrame(encodePng16(c, W, H));
    expect(f16.bitDepth).toBe(16);
    expect(Array.from(f16.data)).toEqual(Array.from(c));
  });

  it('unpacks sub-byte greyscale depths (PNG spec: samples packed from the most significant bit, rows byte-aligned)', () => {
    // 5 × 2 image, depth 2: row bytes are ceil(5·2/8) = 2.
    const vals = [0, 1, 2, 3, 3, 2, 1, 0, 1, 2];
    const packed = new Uint8Array(4);
    for (let r = 0; r < 2; r++)
      for (let c = 0; c < 5; c++) packed[r * 2 + ((2 * c) >> 3)] |= vals[r * 5 + c] << (6 - ((2 * c) & 7));
    const png = encode({ width: 5, height: 2, data: packed, depth: 2, channels: 1 });
    const f = decodePngFrame(png);
    expect(f.bitDepth).toBe(2);
    expect(Array.from(f.data)).toEqual(vals);
  });

  it('converts colour images to gray with the ITU-R BT.709 luma weights and warns', () => {
    // ITU-R BT.709-6 (06/2015), Part 1, item 3.2: E'Y = 0.2126 E'R + 0.7152 E'G + 0.0722 E'B.
    const rgb = encode({ width: 4, height: 1, data: Uint8Array.from([200, 0, 0, 0, 200, 0, 0, 0, 200, 50, 50, 50]), depth: 8, channels: 3 });
    const f = decodePngFrame(rgb);
    expect(f.data[0]).toBeCloseTo(0.2126 * 200, 10);
    expect(f.data[1]).toBeCloseTo(0.7152 * 200, 10);
    expect(f.data[2]).toBeCloseTo(0.0722 * 200, 10);
    expect(f.data[3]).toBeCloseTo(50, 10);
    expect(f.bitDepth).toBe(8);
    expect(f.warnings.join()).toMatch(/colour image: converted to gray with the ITU-R BT\.709 luma weights/);
    // 16-bit RGBA: alpha ignored, the weights applied to the 16-bit samples.
    const rgba16 = encode({ width: 1, height: 1, data: Uint16Array.from([60000, 30000, 1000, 7]), depth: 16, channels: 4 });
    const g = decodePngFrame(rgba16);
    expect(g.data[0]).toBeCloseTo(0.2126 * 60000 + 0.7152 * 30000 + 0.0722 * 1000, 8);
    expect(g.bitDepth).toBe(16);
    // Palette (colour type 3): the palette colours are converted.
    const pal = encode({ width: 2, height: 1, data: Uint8Array.from([0, 1]), depth: 8, channels: 1, palette: [[0, 0, 0], [0, 0, 255]] });
    const h = decodePngFrame(pal);
    expect(h.data[1]).toBeCloseTo(0.0722 * 255, 10);
    expect(h.warnings.join()).toMatch(/palette/);
    // Grey + alpha: the grey samples, with a warning that alpha was ignored.
    const ga = decodePngFrame(encode({ width: 2, height: 1, data: Uint8Array.from([9, 255, 17, 0]), depth: 8, channels: 2 }));
    expect(Array.from(ga.data)).toEqual([9, 17]);
    expect(ga.warnings.join()).toMatch(/alpha/);
  });

  it('refuses non-PNG bytes, truncated files and corrupted chunks (PNG spec: CRC-32 of each chunk)', () => {
    expect(reasonOf(() => decodePngFrame(new Uint8Array([1, 2, 3, 4, 5, 6, 7, 8, 9])))).toBe('unsupported format');
    const good = encodePng16(counts16(), W, H);
    expect(reasonOf(() => decodePngFrame(good.subarray(0, 40)))).toBe('truncated or corrupt');
    const bad = good.slice();
    bad[20] ^= 0x01; // a bit of the IHDR width: the chunk's CRC no longer matches
    expect(reasonOf(() => decodePngFrame(bad))).toBe('truncated or corrupt');
  });
});
