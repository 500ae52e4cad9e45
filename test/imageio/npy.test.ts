/**
 * .npy reading and writing.
 * Sources: NumPy Enhancement Proposal NEP 1 "A Simple File Format for NumPy Arrays" and the
 * numpy.lib.format module documentation (format versions 1.0, 2.0, 3.0; magic "\x93NUMPY";
 * little-endian HEADER_LEN; header padded with spaces and '\n' to a multiple of 64 bytes).
 * Reference bytes marked "NumPy 2.4.6" were produced by `numpy.save` (NumPy 2.4.6) into a BytesIO
 * and copied here as hex.
 */
import { describe, expect, it } from 'vitest';
import { decodeNpy, decodeNpyFrame, encodeNpy, ImageDecodeError } from '../../core/imageio/npy.ts';

function hex(s: string): Uint8Array {
  const out = new Uint8Array(s.length / 2);
  for (let k = 0; k < out.length; k++) out[k] = parseInt(s.slice(2 * k, 2 * k + 2), 16);
  return out;
}
function toHex(b: Uint8Array): string {
  return Array.from(b, (x) => x.toString(16).padStart(2, '0')).join('');
}

/**
 * Build a .npy file from the format description alone (numpy.lib.format docs): magic, version bytes,
 * HEADER_LEN (uint16 LE for 1.0, uint32 LE for 2.0/3.0), header dict padded with spaces and ending
 * in '\n' so that the data start on a multiple of 64, then the raw data bytes.
 */
function buildNpy(dict: string, data: Uint8Array, major = 1): Uint8Array {
  const lenBytes = major === 1 ? 2 : 4;
  const pre = 6 + 2 + lenBytes;
  let total = pre + dict.length + 1;
  total = Math.ceil(total / 64) * 64;
  const headerLen = total - pre;
  const out = new Uint8Array(total + data.length);
  out.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, major, 0]);
  const v = new DataView(out.buffer);
  if (lenBytes === 2) v.setUint16(8, headerLen, true);
  else v.setUint32(8, headerLen, true);
  const header = dict.padEnd(headerLen - 1, ' ') + '\n';
  for (let k = 0; k < header.length; k++) out[pre + k] = header.charCodeAt(k);
  out.set(data, total);
  return out;
}

function bytesOf(n: number, write: (v: DataView) => void): Uint8Array {
  const b = new Uint8Array(n);
  write(new DataView(b.buffer));
  return b;
}

function reasonOf(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    if (e instanceof ImageDecodeError) return e.reason;
    throw e;
  }
  return 'no error';
}

// NumPy 2.4.6: np.save(np.arange(6, dtype='<f8').reshape(2, 3) * 0.5 - 1)
const NP_F8_2x3 =
  '934e554d5059010076007b276465736372273a20273c6638272c2027666f727472616e5f6f72646572273a2046616c73652c20277368617065273a2028322c2033292c207d202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020200a000000000000f0bf000000000000e0bf0000000000000000000000000000e03f000000000000f03f000000000000f83f';
// NumPy 2.4.6: np.save(np.array([[1.5, -2.25], [3.0, 1e-3]], dtype='<f4'))
const NP_F4_2x2 =
  '934e554d5059010076007b276465736372273a20273c6634272c2027666f727472616e5f6f72646572273a2046616c73652c20277368617065273a2028322c2032292c207d202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020200a0000c03f000010c0000040406f12833a';
// NumPy 2.4.6: np.save(np.array([[1, 2, 3], [256, 513, 65535]], dtype='<u2'))
const NP_U2_2x3 =
  '934e554d5059010076007b276465736372273a20273c7532272c2027666f727472616e5f6f72646572273a2046616c73652c20277368617065273a2028322c2033292c207d202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020200a01000200030000010102ffff';
// NumPy 2.4.6: np.save(np.array([0, 128, 255], dtype='|u1'))
const NP_U1_3 =
  '934e554d5059010076007b276465736372273a20277c7531272c2027666f727472616e5f6f72646572273a2046616c73652c20277368617065273a2028332c292c207d2020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020200a0080ff';
// NumPy 2.4.6: np.save(np.array([-7, 0, 2147483647], dtype='<i4'))
const NP_I4_3 =
  '934e554d5059010076007b276465736372273a20273c6934272c2027666f727472616e5f6f72646572273a2046616c73652c20277368617065273a2028332c292c207d2020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020200af9ffffff00000000ffffff7f';
// NumPy 2.4.6: np.save(np.float64(2.5))  (0-d array, shape ())
const NP_F8_SCALAR =
  '934e554d5059010076007b276465736372273a20273c6638272c2027666f727472616e5f6f72646572273a2046616c73652c20277368617065273a2028292c207d20202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020200a0000000000000440';
// NumPy 2.4.6: np.save(np.asfortranarray(np.array([[1, 2, 3], [256, 513, 65535]], dtype='>u2')))
const NP_U2BE_FORTRAN_2x3 =
  '934e554d5059010076007b276465736372273a20273e7532272c2027666f727472616e5f6f72646572273a20547275652c20277368617065273a2028322c2033292c207d20202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020200a00010100000202010003ffff';
// NumPy 2.4.6: np.save(np.array([[True, False], [False, True]]))
const NP_B1_2x2 =
  '934e554d5059010076007b276465736372273a20277c6231272c2027666f727472616e5f6f72646572273a2046616c73652c20277368617065273a2028322c2032292c207d202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020200a01000001';
// NumPy 2.4.6: np.save(np.array([-5, 2**40], dtype='<i8'))
const NP_I8_2 =
  '934e554d5059010076007b276465736372273a20273c6938272c2027666f727472616e5f6f72646572273a2046616c73652c20277368617065273a2028322c292c207d2020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020202020200afbffffffffffffff0000000000010000';

describe('encodeNpy', () => {
  it('writes the same bytes as numpy.save for each supported type (NumPy 2.4.6 reference)', () => {
    expect(toHex(encodeNpy(Float64Array.from([-1, -0.5, 0, 0.5, 1, 1.5]), [2, 3]))).toBe(NP_F8_2x3);
    expect(toHex(encodeNpy(Float32Array.from([1.5, -2.25, 3.0, 1e-3]), [2, 2]))).toBe(NP_F4_2x2);
    expect(toHex(encodeNpy(Uint16Array.from([1, 2, 3, 256, 513, 65535]), [2, 3]))).toBe(NP_U2_2x3);
    expect(toHex(encodeNpy(Uint8Array.from([0, 128, 255]), [3]))).toBe(NP_U1_3);
    expect(toHex(encodeNpy(Int32Array.from([-7, 0, 2147483647]), [3]))).toBe(NP_I4_3);
    expect(toHex(encodeNpy(Float64Array.from([2.5]), []))).toBe(NP_F8_SCALAR);
  });

  it('lays out the version 1.0 header as the format specifies (numpy.lib.format, "Format Version 1.0")', () => {
    const bytes = encodeNpy(new Float64Array(256 * 256), [256, 256]);
    // Magic string: exactly "\x93NUMPY" in bytes 0–5.
    expect(Array.from(bytes.subarray(0, 6))).toEqual([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59]);
    // Byte 6 major version 1, byte 7 minor version 0.
    expect(bytes[6]).toBe(1);
    expect(bytes[7]).toBe(0);
    // Bytes 8–9: little-endian unsigned short HEADER_LEN.
    const headerLen = bytes[8] | (bytes[9] << 8);
    const dataStart = 10 + headerLen;
    // Total of magic + 2 + len(length) + HEADER_LEN evenly divisible by 64.
    expect(dataStart % 64).toBe(0);
    // NumPy 2.4.6 writes a 128-byte preamble and a 524416-byte file for a 256×256 float64 array.
    expect(dataStart).toBe(128);
    expect(bytes.length).toBe(524416);
    const header = String.fromCharCode(...bytes.subarray(10, dataStart));
    // ASCII dict literal, keys in alphabetical order, terminated by '\n', padded with spaces.
    expect(header.startsWith("{'descr': '<f8', 'fortran_order': False, 'shape': (256, 256), }")).toBe(true);
    expect(header.endsWith('\n')).toBe(true);
    expect(/^\{[^}]*\} *\n$/.test(header)).toBe(true);
    // Data: product(shape)·itemsize bytes after the header.
    expect(bytes.length - dataStart).toBe(256 * 256 * 8);
  });

  it('keeps the NumPy 2.4.6 header for a 1024 × 1280 uint16 frame (data at byte 128)', () => {
    // NumPy 2.4.6: the header of np.save(np.zeros((1024, 1280), dtype='<u2')) ends with '\n' at byte 127.
    const bytes = encodeNpy(new Uint16Array(1024 * 1280), [1024, 1280]);
    expect(bytes[127]).toBe(0x0a);
    const dict = "{'descr': '<u2', 'fortran_order': False, 'shape': (1024, 1280), }";
    expect(String.fromCharCode(...bytes.subarray(10, 10 + dict.length))).toBe(dict);
  });

  it('refuses a shape that does not match the data', () => {
    expect(() => encodeNpy(new Float64Array(6), [2, 2])).toThrow(RangeError);
    expect(() => encodeNpy(new Float64Array(6), [-2, -3])).toThrow(RangeError);
  });
});

describe('decodeNpy', () => {
  it('round-trips every type it writes', () => {
    const shape = [3, 4];
    const f64 = Float64Array.from({ length: 12 }, (_, k) => (k - 5.5) * 1.234e-3 + (k === 7 ? 1e300 : 0));
    const f32 = Float32Array.from({ length: 12 }, (_, k) => (k - 5.5) * 0.1);
    const u16 = Uint16Array.from({ length: 12 }, (_, k) => k * 5957);
    const u8 = Uint8Array.from({ length: 12 }, (_, k) => k * 23);
    const i32 = Int32Array.from({ length: 12 }, (_, k) => (k - 6) * 178956970);
    const cases: [ArrayLike<number> & { length: number }, string][] = [
      [f64, '<f8'],
      [f32, '<f4'],
      [u16, '<u2'],
      [u8, '|u1'],
      [i32, '<i4'],
    ];
    for (const [arr, dtype] of cases) {
      const d = decodeNpy(encodeNpy(arr as Float64Array, shape));
      expect(d.dtype).toBe(dtype);
      expect(d.shape).toEqual(shape);
      expect(Array.from(d.data)).toEqual(Array.from(arr));
    }
  });

  it('reads numpy.save output: <f8, <f4, |u1, |b1, <i8, 0-d (NumPy 2.4.6 reference)', () => {
    expect(Array.from(decodeNpy(hex(NP_F8_2x3)).data)).toEqual([-1, -0.5, 0, 0.5, 1, 1.5]);
    const f4 = decodeNpy(hex(NP_F4_2x2));
    // float32(1e-3) = 0.0010000000474974513 (NumPy 2.4.6 .tolist()).
    expect(Array.from(f4.data)).toEqual([1.5, -2.25, 3.0, 0.0010000000474974513]);
    expect(f4.shape).toEqual([2, 2]);
    expect(Array.from(decodeNpy(hex(NP_U1_3)).data)).toEqual([0, 128, 255]);
    const b1 = decodeNpy(hex(NP_B1_2x2));
    expect(b1.dtype).toBe('|b1');
    expect(Array.from(b1.data)).toEqual([1, 0, 0, 1]);
    expect(Array.from(decodeNpy(hex(NP_I8_2)).data)).toEqual([-5, 2 ** 40]);
    const s = decodeNpy(hex(NP_F8_SCALAR));
    expect(s.shape).toEqual([]);
    expect(Array.from(s.data)).toEqual([2.5]);
  });

  it('reads a big-endian, Fortran-ordered numpy.save file into row-major order (NumPy 2.4.6 reference)', () => {
    const d = decodeNpy(hex(NP_U2BE_FORTRAN_2x3));
    expect(d.dtype).toBe('>u2');
    expect(d.shape).toEqual([2, 3]);
    expect(Array.from(d.data)).toEqual([1, 2, 3, 256, 513, 65535]);
  });

  it("reads a hand-built '<f4' file (format per numpy.lib.format)", () => {
    const vals = [0.5, -1.25, 3.5, 1024.0, -0.0078125, 6.0];
    const data = bytesOf(24, (v) => vals.forEach((x, k) => v.setFloat32(4 * k, x, true)));
    const bytes = buildNpy("{'descr': '<f4', 'fortran_order': False, 'shape': (2, 3), }", data);
    const d = decodeNpy(bytes);
    expect(d.shape).toEqual([2, 3]);
    expect(Array.from(d.data)).toEqual(vals); // all exactly representable in binary32 (IEEE 754)
  });

  it("reads a hand-built '>u2' file (big-endian: most significant byte first)", () => {
    const data = Uint8Array.from([0x00, 0x01, 0x01, 0x00, 0xff, 0xfe, 0x12, 0x34]);
    const d = decodeNpy(buildNpy("{'descr': '>u2', 'fortran_order': False, 'shape': (4,), }", data));
    expect(Array.from(d.data)).toEqual([1, 256, 65534, 0x1234]);
  });

  it('transposes hand-built fortran_order True data (column-major, first index fastest)', () => {
    // The 2 × 3 array [[1, 2, 3], [4, 5, 6]] stored column by column: 1 4 2 5 3 6.
    const colMajor = [1, 4, 2, 5, 3, 6];
    const data = bytesOf(48, (v) => colMajor.forEach((x, k) => v.setFloat64(8 * k, x, true)));
    const d = decodeNpy(buildNpy("{'descr': '<f8', 'fortran_order': True, 'shape': (2, 3), }", data));
    expect(d.shape).toEqual([2, 3]);
    expect(Array.from(d.data)).toEqual([1, 2, 3, 4, 5, 6]);
    // 3-D: shape (2, 2, 2), element (i, j, k) = 100i + 10j + k, stored with i fastest, then j, then k.
    const f3: number[] = [];
    for (let k = 0; k < 2; k++) for (let j = 0; j < 2; j++) for (let i = 0; i < 2; i++) f3.push(100 * i + 10 * j + k);
    const d3 = decodeNpy(
      buildNpy("{'descr': '|u1', 'fortran_order': True, 'shape': (2, 2, 2), }", Uint8Array.from(f3)),
    );
    expect(Array.from(d3.data)).toEqual([0, 1, 10, 11, 100, 101, 110, 111]);
  });

  it('reads the other integer and float dtypes, in either byte order', () => {
    const cases: { descr: string; size: number; write: (v: DataView, o: number, x: number) => void; vals: number[] }[] = [
      { descr: '<i2', size: 2, write: (v, o, x) => v.setInt16(o, x, true), vals: [-32768, -1, 0, 32767] },
      { descr: '<u4', size: 4, write: (v, o, x) => v.setUint32(o, x, true), vals: [0, 1, 65536, 4294967295] },
      { descr: '<i4', size: 4, write: (v, o, x) => v.setInt32(o, x, true), vals: [-2147483648, -1, 0, 2147483647] },
      { descr: '>f8', size: 8, write: (v, o, x) => v.setFloat64(o, x, false), vals: [Math.PI, -0.1, 1e-300, 6.02214076e23] },
      { descr: '>f4', size: 4, write: (v, o, x) => v.setFloat32(o, x, false), vals: [0.25, -3, 65504, 1.5] },
      { descr: '<u2', size: 2, write: (v, o, x) => v.setUint16(o, x, true), vals: [0, 4095, 4096, 65535] },
      { descr: '<f8', size: 8, write: (v, o, x) => v.setFloat64(o, x, true), vals: [1, 2, 3, 4] },
    ];
    for (const c of cases) {
      const data = bytesOf(4 * c.size, (v) => c.vals.forEach((x, k) => c.write(v, k * c.size, x)));
      const d = decodeNpy(buildNpy(`{'descr': '${c.descr}', 'fortran_order': False, 'shape': (2, 2), }`, data));
      expect(d.dtype).toBe(c.descr);
      expect(Array.from(d.data)).toEqual(c.vals);
    }
    // 64-bit integers through BigInt (values below 2^53 are exact).
    const i8 = bytesOf(16, (v) => {
      v.setBigInt64(0, -123456789012n, true);
      v.setBigInt64(8, 9007199254740991n, true);
    });
    expect(Array.from(decodeNpy(buildNpy("{'descr': '<i8', 'fortran_order': False, 'shape': (2,), }", i8)).data)).toEqual([
      -123456789012, 9007199254740991,
    ]);
    const u8 = bytesOf(8, (v) => v.setBigUint64(0, 2n ** 52n + 1n, true));
    expect(Array.from(decodeNpy(buildNpy("{'descr': '<u8', 'fortran_order': False, 'shape': (1,), }", u8)).data)).toEqual([
      2 ** 52 + 1,
    ]);
  });

  it('accepts format versions 2.0 and 3.0 (uint32 HEADER_LEN), keys in any order, double quotes, Python 2 long suffix', () => {
    const data = bytesOf(8, (v) => [7, 8, 9, 10].forEach((x, k) => v.setUint16(2 * k, x, true)));
    const dict = "{'shape': (2, 2), 'fortran_order': False, 'descr': '<u2'}";
    for (const major of [2, 3]) {
      const d = decodeNpy(buildNpy(dict, data, major));
      expect(Array.from(d.data)).toEqual([7, 8, 9, 10]);
    }
    // numpy.lib.format reads headers written by Python 2 with integers like 2L (its _filter_header).
    const d2 = decodeNpy(buildNpy('{"descr": "<u2", "fortran_order": False, "shape": (2L, 2L)}', data));
    expect(d2.shape).toEqual([2, 2]);
  });

  it('reports a bad magic string, an unknown version, unsupported and object dtypes as unsupported format', () => {
    const good = hex(NP_F8_2x3);
    const badMagic = good.slice();
    badMagic[0] = 0x92;
    expect(reasonOf(() => decodeNpy(badMagic))).toBe('unsupported format');
    expect(reasonOf(() => decodeNpy(new Uint8Array([0x89, 0x50, 0x4e, 0x47])))).toBe('unsupported format');
    const v4 = good.slice();
    v4[6] = 4;
    expect(reasonOf(() => decodeNpy(v4))).toBe('unsupported format');
    const empty16 = new Uint8Array(16);
    for (const descr of ['<c16', '<U5', '|S3', '<M8[ns]', '<f2']) {
      const b = buildNpy(`{'descr': '${descr}', 'fortran_order': False, 'shape': (1,), }`, empty16);
      expect(reasonOf(() => decodeNpy(b))).toBe('unsupported format');
    }
    // Object arrays: descr '|O', data is a pickle (numpy.lib.format "Format Version 1.0").
    const obj = buildNpy("{'descr': '|O', 'fortran_order': False, 'shape': (2,), }", new Uint8Array([0x80, 0x04]));
    expect(reasonOf(() => decodeNpy(obj))).toBe('unsupported format');
    // Structured dtype: descr is a list of (name, format) pairs.
    const rec = buildNpy("{'descr': [('x', '<f8'), ('y', '<f8')], 'fortran_order': False, 'shape': (1,), }", empty16);
    expect(reasonOf(() => decodeNpy(rec))).toBe('unsupported format');
  });

  it('reports truncated data or header and a broken header as truncated or corrupt', () => {
    const good = hex(NP_F8_2x3);
    expect(reasonOf(() => decodeNpy(good.subarray(0, good.length - 1)))).toBe('truncated or corrupt');
    expect(reasonOf(() => decodeNpy(good.subarray(0, 60)))).toBe('truncated or corrupt');
    expect(reasonOf(() => decodeNpy(good.subarray(0, 9)))).toBe('unsupported format');
    const noShape = buildNpy("{'descr': '<f8', 'fortran_order': False, }", new Uint8Array(8));
    expect(reasonOf(() => decodeNpy(noShape))).toBe('truncated or corrupt');
    const garbled = buildNpy("{'descr': '<f8', 'fortran_order': Maybe, 'shape': (1,), }", new Uint8Array(8));
    expect(reasonOf(() => decodeNpy(garbled))).toBe('truncated or corrupt');
  });

  it('reports a shape with no elements as an empty frame', () => {
    const b = buildNpy("{'descr': '<f8', 'fortran_order': False, 'shape': (0, 5), }", new Uint8Array(0));
    expect(reasonOf(() => decodeNpy(b))).toBe('empty frame');
  });
});

describe('decodeNpyFrame', () => {
  it('takes (rows, columns) and single-channel 3-D shapes, refuses others as wrong dimensions', () => {
    const f = decodeNpyFrame(hex(NP_U2_2x3));
    expect([f.widthPx, f.heightPx]).toEqual([3, 2]);
    expect(Array.from(f.data)).toEqual([1, 2, 3, 256, 513, 65535]);
    const hwc = decodeNpyFrame(encodeNpy(new Uint8Array(6), [2, 3, 1]));
    expect([hwc.widthPx, hwc.heightPx]).toEqual([3, 2]);
    expect(reasonOf(() => decodeNpyFrame(encodeNpy(new Uint8Array(24), [2, 3, 4])))).toBe('wrong dimensions');
    expect(reasonOf(() => decodeNpyFrame(hex(NP_U1_3)))).toBe('wrong dimensions');
    expect(reasonOf(() => decodeNpyFrame(hex(NP_U2_2x3), { widthPx: 2, heightPx: 3 }))).toBe('wrong dimensions');
  });
});
