/**
 * Netpbm PGM and PPM frames, from bytes written here by hand after the Netpbm format specifications
 * ("PGM Format Specification", "PPM Format Specification", netpbm.sourceforge.net/doc/pgm.html and
 * ppm.html): magic, whitespace-separated ASCII width, height and maxval (comments from "#" to the end of
 * the line before maxval), then one whitespace character and the raster; raw samples are 1 byte when
 * maxval < 256, else 2 bytes, most significant byte first; plain (P2/P3) samples are ASCII decimal.
 */
import { describe, expect, it } from 'vitest';
import { decodePnmFrame } from '../../core/imageio/pgm.ts';
import { ImageDecodeError } from '../../core/imageio/errors.ts';

const ascii = (s: string) => Uint8Array.from(s, (c) => c.charCodeAt(0));
const concat = (...parts: Uint8Array[]) => {
  const out = new Uint8Array(parts.reduce((n, p) => n + p.length, 0));
  let k = 0;
  for (const p of parts) {
    out.set(p, k);
    k += p.length;
  }
  return out;
};
function reasonOf(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    if (e instanceof ImageDecodeError) return e.reason;
    throw e;
  }
  return 'no error';
}

describe('decodePnmFrame: PGM', () => {
  it('reads a plain P2 file with comments in the header', () => {
    const f = decodePnmFrame(ascii('P2\n# a comment\n3 2 # width and height\n# maxval next\n15\n0 1 2\n13  14\t15\n'));
    expect([f.widthPx, f.heightPx, f.maxval, f.bitDepth, f.magic]).toEqual([3, 2, 15, 4, 'P2']);
    expect(Array.from(f.data)).toEqual([0, 1, 2, 13, 14, 15]);
    expect(f.warnings).toEqual([]);
  });

  it('reads a raw 8-bit P5 file: one whitespace byte after maxval, then the raster', () => {
    // The raster starts with 0x0A and 0x20, which must be read as samples, not as whitespace.
    const f = decodePnmFrame(concat(ascii('P5 4 1 255\n'), Uint8Array.from([0x0a, 0x20, 0, 255])));
    expect(Array.from(f.data)).toEqual([10, 32, 0, 255]);
    expect(f.bitDepth).toBe(8);
  });

  it('reads a raw 16-bit P5 file most significant byte first (maxval 65535)', () => {
    const f = decodePnmFrame(concat(ascii('P5\n2 2\n65535\n'), Uint8Array.from([0x01, 0x02, 0xff, 0xff, 0x00, 0x00, 0x80, 0x00])));
    expect(Array.from(f.data)).toEqual([0x0102, 0xffff, 0, 0x8000]);
    expect(f.bitDepth).toBe(16);
  });

  it('reads 12-bit data (maxval 4095, two bytes per sample) and reports 12 bits', () => {
    const f = decodePnmFrame(concat(ascii('P5 3 1 4095\n'), Uint8Array.from([0x0f, 0xff, 0x00, 0x01, 0x08, 0x00])));
    expect(Array.from(f.data)).toEqual([4095, 1, 2048]);
    expect(f.bitDepth).toBe(12);
  });

  it('warns about extra bytes after the first image', () => {
    const f = decodePnmFrame(concat(ascii('P5 2 1 255\n'), Uint8Array.from([1, 2]), ascii('P5 2 1 255\n'), Uint8Array.from([3, 4])));
    expect(Array.from(f.data)).toEqual([1, 2]);
    expect(f.warnings.join()).toMatch(/only the first image/);
  });
});

describe('decodePnmFrame: PPM colour', () => {
  it('converts P6 and P3 to gray with the BT.709 weights and warns', () => {
    // ITU-R BT.709-6 item 3.2: Y = 0.2126 R + 0.7152 G + 0.0722 B.
    const raw = decodePnmFrame(concat(ascii('P6 3 1 255\n'), Uint8Array.from([100, 0, 0, 0, 100, 0, 0, 0, 100])));
    expect(raw.data[0]).toBeCloseTo(21.26, 10);
    expect(raw.data[1]).toBeCloseTo(71.52, 10);
    expect(raw.data[2]).toBeCloseTo(7.22, 10);
    expect(raw.warnings.join()).toMatch(/colour image/);
    const plain = decodePnmFrame(ascii('P3\n1 1\n1000\n1000 1000 1000\n'));
    expect(plain.data[0]).toBeCloseTo(1000, 9);
    expect(plain.bitDepth).toBe(10);
  });
});

describe('decodePnmFrame: errors', () => {
  it('refuses bitmaps and PAM, truncated rasters, samples above maxval, bad maxval and empty images', () => {
    expect(reasonOf(() => decodePnmFrame(ascii('P1 2 1 0 1')))).toBe('unsupported format');
    expect(reasonOf(() => decodePnmFrame(ascii('P4 8 1\n\x00')))).toBe('unsupported format');
    expect(reasonOf(() => decodePnmFrame(ascii('P7\nWIDTH 1\n')))).toBe('unsupported format');
    expect(reasonOf(() => decodePnmFrame(concat(ascii('P5 4 4 255\n'), new Uint8Array(10))))).toBe('truncated or corrupt');
    expect(() => decodePnmFrame(concat(ascii('P5 4 4 255\n'), new Uint8Array(10)))).toThrow(/raster holds 10 bytes/);
    expect(reasonOf(() => decodePnmFrame(ascii('P2 2 1 255 3')))).toBe('truncated or corrupt');
    expect(reasonOf(() => decodePnmFrame(ascii('P2 2 1 100 3 101')))).toBe('truncated or corrupt');
    expect(reasonOf(() => decodePnmFrame(concat(ascii('P5 1 1 1000\n'), Uint8Array.from([0x03, 0xe9]))))).toBe('truncated or corrupt'); // 1001 > maxval
    expect(reasonOf(() => decodePnmFrame(ascii('P5 1 1 0\n\x00')))).toBe('truncated or corrupt');
    expect(reasonOf(() => decodePnmFrame(ascii('P5 1 1 65536\n\x00\x00')))).toBe('truncated or corrupt');
    expect(reasonOf(() => decodePnmFrame(ascii('P5 4 ')))).toBe('truncated or corrupt');
    expect(reasonOf(() => decodePnmFrame(ascii('P2 0 3 255\n')))).toBe('empty frame');
    expect(reasonOf(() => decodePnmFrame(ascii('P2 x 3 255\n')))).toBe('truncated or corrupt');
  });
});
