/**
 * decodeFrame: one entry point for PNG, TIFF, PGM and .npy, recognised by the magic bytes of each format:
 *   PNG  89 50 4E 47 0D 0A 1A 0A (PNG specification, section 5.2)
 *   TIFF "II" 2A 00 / "MM" 00 2A (TIFF 6.0, section 2)
 *   PGM  "P5" / "P2" (Netpbm PGM specification)
 *   NPY  93 "NUMPY" (NEP 1 / numpy.lib.format)
 * Round trips use the project's encoders; every error names the file.
 */
import { describe, expect, it } from 'vitest';
import { decodeFrame, sniffFormat } from '../../core/imageio/decodeFrame.ts';
import { ImageDecodeError } from '../../core/imageio/errors.ts';
import { encodePng16, encodePng8 } from '../../core/imageio/png.ts';
import { encodeTiff16 } from '../../core/imageio/tiff.ts';
import { encodeNpy } from '../../core/imageio/npy.ts';

const W = 19;
const H = 7;
const counts = Uint16Array.from({ length: W * H }, (_, k) => (k * 2654435761) % 4096);

function errorOf(f: () => unknown): ImageDecodeError {
  try {
    f();
  } catch (e) {
    if (e instanceof ImageDecodeError) return e;
    throw e;
  }
  throw new Error('no error');
}

describe('decodeFrame', () => {
  it('round-trips the project encoders, whatever the file is called', () => {
    const cases: [Uint8Array, string, string, number | null][] = [
      [encodePng16(counts, W, H), 'frame.tif', 'png', 16],
      [encodeTiff16(counts, W, H), 'frame.png', 'tiff', 16],
      [encodeNpy(counts, [H, W]), 'frame.dat', 'npy', 16],
      [encodeNpy(Float64Array.from(counts), [H, W]), 'frame.npy', 'npy', null],
    ];
    for (const [bytes, name, format, bits] of cases) {
      const f = decodeFrame(bytes, name);
      expect(f.format).toBe(format);
      expect([f.widthPx, f.heightPx, f.bitDepth]).toEqual([W, H, bits]);
      expect(Array.from(f.data)).toEqual(Array.from(counts));
      expect(f.warnings).toEqual([]);
    }
    const v8 = Uint8Array.from(counts, (c) => c >> 4);
    const p8 = decodeFrame(encodePng8(v8, W, H), 'preview.png');
    expect(p8.bitDepth).toBe(8);
    expect(Array.from(p8.data)).toEqual(Array.from(v8));
    const pgm = decodeFrame(Uint8Array.from('P2 2 1 4095 7 4095', (c) => c.charCodeAt(0)), 'f.pgm');
    expect([pgm.format, pgm.bitDepth, ...pgm.data]).toEqual(['pgm', 12, 7, 4095]);
  });

  it('sniffs by content', () => {
    expect(sniffFormat(encodePng16(counts, W, H))).toBe('png');
    expect(sniffFormat(Uint8Array.from([0x4d, 0x4d, 0, 42]))).toBe('tiff');
    expect(sniffFormat(Uint8Array.from([0x49, 0x49, 42, 0]))).toBe('tiff');
    expect(sniffFormat(Uint8Array.from([0x49, 0x49, 43, 0]))).toBe(null); // BigTIFF (43) is not read
    expect(sniffFormat(Uint8Array.from('P5', (c) => c.charCodeAt(0)))).toBe('pgm');
    expect(sniffFormat(encodeNpy(new Uint8Array(1), [1]))).toBe('npy');
    expect(sniffFormat(Uint8Array.from([0xff, 0xd8, 0xff, 0xe0]))).toBe(null); // JPEG
  });

  it('prefixes warnings with the file name', () => {
    const rgb = decodeFrame(
      Uint8Array.from([...'P6 1 1 255\n'].map((c) => c.charCodeAt(0)).concat([10, 20, 30])),
      'colour.ppm',
    );
    expect(rgb.warnings[0]).toMatch(/^colour\.ppm: /);
  });

  it('names the file and the reason in every error', () => {
    const cases: [Uint8Array, string, string][] = [
      [Uint8Array.from([0xff, 0xd8, 0xff, 0xe0, 0, 0, 0, 0]), 'photo.jpg', 'unsupported format'],
      [new Uint8Array(0), 'nothing.png', 'empty frame'],
      [encodePng16(counts, W, H).subarray(0, 50), 'cut.png', 'truncated or corrupt'],
      [encodeTiff16(counts, W, H).subarray(0, 100), 'cut.tif', 'truncated or corrupt'],
      [encodeNpy(new Uint16Array(24), [2, 3, 4]), 'cube.npy', 'wrong dimensions'],
      [encodeNpy(new Uint16Array(0), [0, 5]), 'none.npy', 'empty frame'],
      [Uint8Array.from('P5 2 2 255\n\x01', (c) => c.charCodeAt(0)), 'short.pgm', 'truncated or corrupt'],
    ];
    for (const [bytes, name, reason] of cases) {
      const e = errorOf(() => decodeFrame(bytes, name));
      expect(e.reason, name).toBe(reason);
      expect(e.file).toBe(name);
      expect(e.message.startsWith(`${name}: ${reason}: `), e.message).toBe(true);
    }
  });

  it('refuses NaN and ±Infinity in a .npy frame, saying how many (NumPy format: IEEE 754 float64 samples)', () => {
    const data = Float64Array.from({ length: 12 }, (_, k) => k);
    data[5] = NaN;
    data[7] = Infinity;
    data[8] = -Infinity;
    const e = errorOf(() => decodeFrame(encodeNpy(data, [3, 4]), 'bad.npy'));
    expect(e.reason).toBe('truncated or corrupt');
    expect(e.message).toMatch(/^bad\.npy: truncated or corrupt: the frame holds 3 non-finite values \(NaN or ±Infinity\), the first at row 1, column 1/);
    const one = new Float32Array(4);
    one[0] = NaN;
    expect(errorOf(() => decodeFrame(encodeNpy(one, [2, 2]), 'one.npy')).message).toMatch(/holds 1 non-finite value /);
  });
});
