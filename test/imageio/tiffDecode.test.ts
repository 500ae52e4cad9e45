/**
 * Reading TIFF frames. Files are built byte by byte from TIFF Revision 6.0 (Adobe Developers Association,
 * 1992; see tiffBuilder.ts for the sections used) or written by the project's own encoder (tiff.ts) and by
 * utif2's encoder (RGBA); the compressed strips are made here: PackBits and LZW by hand from the
 * specification (utif2 has no compressing encoder), Deflate with Node's zlib (RFC 1950 stream, as the
 * Adobe TIFF technical notes prescribe for Compression 8).
 */
import UTIF from 'utif2';
import { describe, expect, it } from 'vitest';
import { decodeTiffFrame } from '../../core/imageio/tiffDecode.ts';
import { encodeTiff16 } from '../../core/imageio/tiff.ts';
import { ImageDecodeError } from '../../core/imageio/errors.ts';
import { buildTiff, deflate, grayFields, lzw, packBits, predictor2, sampleBytes } from './tiffBuilder.ts';

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
const H = 11;
/** A spread of 16-bit values with both bytes non-trivial, plus runs (so that the compressors have work). */
function samples16(): number[] {
  const s: number[] = [];
  for (let k = 0; k < W * H; k++) s.push(k % 9 < 4 ? 1000 : (k * 40503 + 7) % 65536);
  return s;
}
function samples8(): number[] {
  return samples16().map((v) => v >> 8);
}

describe('decodeTiffFrame: uncompressed', () => {
  it("reads the project's own 16-bit writer exactly", () => {
    const c = Uint16Array.from(samples16());
    const f = decodeTiffFrame(encodeTiff16(c, W, H));
    expect([f.widthPx, f.heightPx, f.bitDepth]).toEqual([W, H, 16]);
    expect(Array.from(f.data)).toEqual(Array.from(c));
    expect(f.warnings).toEqual([]);
  });

  it('reads 12-bit data stored in 16-bit samples as they are (values up to 4095, container depth 16)', () => {
    const c = Uint16Array.from(samples16(), (v) => v % 4096);
    c[3] = 4095;
    const f = decodeTiffFrame(encodeTiff16(c, W, H));
    expect(f.bitDepth).toBe(16);
    expect(Array.from(f.data)).toEqual(Array.from(c));
  });

  it('reads big-endian ("MM") 16-bit files, several strips (TIFF 6.0 section 2: byte order applies to the samples)', () => {
    const s = samples16();
    const rows = 4;
    const strips: Uint8Array[] = [];
    for (let r = 0; r < H; r += rows) strips.push(sampleBytes(s.slice(r * W, Math.min(H, r + rows) * W), 16, false));
    const f = decodeTiffFrame(buildTiff(grayFields(W, H, 16, rows, 1), strips, false));
    expect(Array.from(f.data)).toEqual(s);
  });

  it('reads 8-bit files and turns WhiteIsZero (PhotometricInterpretation 0, TIFF 6.0 section 4) back into counts', () => {
    const s = samples8();
    const f8 = decodeTiffFrame(buildTiff(grayFields(W, H, 8, H, 1), [sampleBytes(s, 8, true)]));
    expect(f8.bitDepth).toBe(8);
    expect(Array.from(f8.data)).toEqual(s);
    const fields = grayFields(W, H, 8, H, 1).map((e) => (e.tag === 262 ? { ...e, values: [0] } : e));
    const inv = decodeTiffFrame(buildTiff(fields, [sampleBytes(s, 8, true)]));
    // WhiteIsZero: 0 is white, 2^8 − 1 black, so the light is 255 − stored.
    expect(Array.from(inv.data)).toEqual(s.map((v) => 255 - v));
    expect(inv.warnings.join()).toMatch(/WhiteIsZero/);
  });
});

describe('decodeTiffFrame: lossless compressions', () => {
  it('PackBits: the worked example of TIFF 6.0 section 9 as an 8-bit image', () => {
    // TIFF 6.0 section 9 (PackBits), example (from memory): packed FE AA 02 80 00 2A FD AA 03 80 00 2A 22 F7 AA
    // unpacks to AA AA AA 80 00 2A AA AA AA AA 80 00 2A 22 followed by ten AA.
    const packed = Uint8Array.from([0xfe, 0xaa, 0x02, 0x80, 0x00, 0x2a, 0xfd, 0xaa, 0x03, 0x80, 0x00, 0x2a, 0x22, 0xf7, 0xaa]);
    const unpacked = [0xaa, 0xaa, 0xaa, 0x80, 0x00, 0x2a, 0xaa, 0xaa, 0xaa, 0xaa, 0x80, 0x00, 0x2a, 0x22, ...new Array(10).fill(0xaa)];
    const f = decodeTiffFrame(buildTiff(grayFields(24, 1, 8, 1, 32773), [packed]));
    expect(Array.from(f.data)).toEqual(unpacked);
    // The hand-written packer reproduces the specification's bytes for the same data.
    expect(Array.from(packBits(Uint8Array.from(unpacked)))).toEqual(Array.from(packed));
  });

  it('PackBits, LZW and Deflate strips of 16-bit data, little- and big-endian, decode exactly', () => {
    const s = samples16();
    for (const le of [true, false]) {
      const raw = sampleBytes(s, 16, le);
      for (const [code, compress] of [
        [32773, packBits],
        [5, lzw],
        [8, deflate],
        [32946, deflate],
      ] as const) {
        const f = decodeTiffFrame(buildTiff(grayFields(W, H, 16, H, code), [compress(raw)], le));
        expect(Array.from(f.data), `compression ${code}, ${le ? 'II' : 'MM'}`).toEqual(s);
      }
    }
  });

  it('LZW with codes growing past 9, 10 and 11 bits and a table reset (long, varied data)', () => {
    // 80 × 64 16-bit samples of a slowly varying pattern with noise-like low bytes: several thousand codes.
    const w = 80;
    const h = 64;
    const s: number[] = [];
    for (let k = 0; k < w * h; k++) s.push((Math.round(2000 + 1500 * Math.sin(k / 37)) + ((k * 7919) % 97)) & 0xffff);
    const packed = lzw(sampleBytes(s, 16, true));
    expect(packed.length).toBeGreaterThan(4000); // enough codes for 12-bit widths and a ClearCode mid-strip
    const f = decodeTiffFrame(buildTiff(grayFields(w, h, 16, h, 5), [packed]));
    expect(Array.from(f.data)).toEqual(s);
  });

  it('LZW and Deflate with horizontal differencing (Predictor 2, TIFF 6.0 section 14), 8- and 16-bit', () => {
    const s16 = samples16();
    const s8 = samples8();
    const pred = { tag: 317, type: 3 as const, values: [2] };
    const a = decodeTiffFrame(buildTiff(grayFields(W, H, 16, H, 5, [pred]), [lzw(sampleBytes(predictor2(s16, W, 16), 16, true))]));
    expect(Array.from(a.data)).toEqual(s16);
    const b = decodeTiffFrame(buildTiff(grayFields(W, H, 8, H, 8, [pred]), [deflate(sampleBytes(predictor2(s8, W, 8), 8, true))]));
    expect(Array.from(b.data)).toEqual(s8);
  });
});

describe('decodeTiffFrame: colour and refusals', () => {
  it('converts an RGBA TIFF written by utif2 to gray with the BT.709 weights and warns', () => {
    // Pure red, green, blue and white pixels; ITU-R BT.709-6 item 3.2: Y = 0.2126 R + 0.7152 G + 0.0722 B.
    const rgba = Uint8Array.from([200, 0, 0, 255, 0, 200, 0, 255, 0, 0, 200, 255, 100, 100, 100, 255]);
    const bytes = new Uint8Array(UTIF.encodeImage(rgba, 4, 1));
    const f = decodeTiffFrame(bytes);
    expect(f.data[0]).toBeCloseTo(0.2126 * 200, 10);
    expect(f.data[1]).toBeCloseTo(0.7152 * 200, 10);
    expect(f.data[2]).toBeCloseTo(0.0722 * 200, 10);
    expect(f.data[3]).toBeCloseTo(100, 10);
    expect(f.warnings.join()).toMatch(/colour image: converted to gray with the ITU-R BT\.709 luma weights/);
  });

  it('converts a palette TIFF through its 16-bit ColorMap (TIFF 6.0 section 5)', () => {
    // ColorMap: 3 · 2^BitsPerSample SHORTs, all reds, then all greens, then all blues.
    // Index 0 → black, index 1 → pure red (65535, 0, 0), index 2 → pure blue (0, 0, 65535).
    const cmap = new Array(3 * 256).fill(0);
    cmap[1] = 65535;
    cmap[2 * 256 + 2] = 65535;
    const fields = grayFields(3, 1, 8, 1, 1, [{ tag: 320, type: 3, values: cmap }]).map((e) => (e.tag === 262 ? { ...e, values: [3] } : e));
    const f = decodeTiffFrame(buildTiff(fields, [Uint8Array.from([0, 1, 2])]));
    expect(f.data[0]).toBe(0);
    expect(f.data[1]).toBeCloseTo(0.2126 * 65535, 6); // ITU-R BT.709-6 item 3.2
    expect(f.data[2]).toBeCloseTo(0.0722 * 65535, 6);
    expect(f.warnings.join()).toMatch(/palette/);
  });

  it('refuses what it cannot read, with the reason', () => {
    const s = sampleBytes(samples16(), 16, true);
    // JPEG compression (7), tiles (TileWidth 322), floating-point samples (SampleFormat 3), 32-bit samples.
    expect(reasonOf(() => decodeTiffFrame(buildTiff(grayFields(W, H, 16, H, 7), [s])))).toBe('unsupported format');
    expect(() => decodeTiffFrame(buildTiff(grayFields(W, H, 16, H, 7), [s]))).toThrow(/compression 7/);
    expect(() => decodeTiffFrame(buildTiff(grayFields(W, H, 16, H, 1, [{ tag: 322, type: 3, values: [16] }, { tag: 323, type: 3, values: [16] }]), [s]))).toThrow(/tiled/);
    expect(() => decodeTiffFrame(buildTiff(grayFields(W, H, 16, H, 1, [{ tag: 339, type: 3, values: [3] }]), [s]))).toThrow(/floating-point/);
    expect(() => decodeTiffFrame(buildTiff(grayFields(W, H, 32, H, 1), [new Uint8Array(4 * W * H)]))).toThrow(/32-bit/);
    expect(reasonOf(() => decodeTiffFrame(Uint8Array.from([1, 2, 3, 4, 5, 6, 7, 8])))).toBe('unsupported format');
  });

  it('refuses a corrupt LZW stream instead of decoding it (codes beyond the string table)', () => {
    const s: number[] = [];
    for (let k = 0; k < 64 * 32; k++) s.push((k * 7919) % 65536);
    const packed = lzw(sampleBytes(s, 16, true));
    // All-ones bytes in the middle of the stream read as codes far above the next free code.
    packed.fill(0xff, 600, 640);
    const bytes = buildTiff(grayFields(64, 32, 16, 32, 5), [packed]);
    expect(reasonOf(() => decodeTiffFrame(bytes))).toBe('truncated or corrupt');
    expect(() => decodeTiffFrame(bytes)).toThrow(/not a valid LZW stream/);
  });

  it('refuses truncated files and empty images', () => {
    const good = encodeTiff16(Uint16Array.from(samples16()), W, H);
    expect(reasonOf(() => decodeTiffFrame(good.subarray(0, good.length - 10)))).toBe('truncated or corrupt');
    expect(() => decodeTiffFrame(good.subarray(0, good.length - 10))).toThrow(/strip 0 ends at byte/);
    expect(reasonOf(() => decodeTiffFrame(good.subarray(0, 20)))).toBe('truncated or corrupt');
    expect(reasonOf(() => decodeTiffFrame(good.subarray(0, 6)))).toBe('truncated or corrupt');
    const lz = buildTiff(grayFields(W, H, 16, H, 5), [lzw(sampleBytes(samples16(), 16, true))]);
    expect(reasonOf(() => decodeTiffFrame(lz.subarray(0, lz.length - 40)))).toBe('truncated or corrupt');
    expect(reasonOf(() => decodeTiffFrame(buildTiff(grayFields(0, H, 16, H, 1), [new Uint8Array(0)])))).toBe('empty frame');
  });
});
