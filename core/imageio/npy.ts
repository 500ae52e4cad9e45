/**
 * NumPy `.npy` array files: write version 1.0, read versions 1.0, 2.0 and 3.0.
 *
 * Format source: NumPy Enhancement Proposal NEP 1 ("A Simple File Format for NumPy Arrays") and the
 * `numpy.lib.format` module documentation, which is the current statement of the format:
 *
 *   bytes 0–5   magic string "\x93NUMPY"
 *   byte  6     major version (1, 2 or 3), byte 7 minor version (0)
 *   then        HEADER_LEN: little-endian uint16 (v1.0) or uint32 (v2.0, v3.0)
 *   then        HEADER_LEN bytes: a Python dict literal with keys 'descr', 'fortran_order', 'shape',
 *               terminated by '\n' and padded with spaces so that 6 + 2 + len(HEADER_LEN) + HEADER_LEN
 *               is a multiple of 64 (ARRAY_ALIGN). ASCII/latin-1 in v1.0 and v2.0, UTF-8 in v3.0.
 *   then        the array data: product(shape) · itemsize bytes (shape () holds one element), in C
 *               (row-major) order, or Fortran (column-major) order when fortran_order is True.
 *
 * The writer lays the header out exactly as NumPy's `np.save` does: keys sorted, `repr` of each value,
 * a run of spare spaces after the dict (room for the first axis to grow in place), then the padding.
 *
 * Pure: no Node built-ins; works on Uint8Array only.
 */
import { ImageDecodeError } from './errors.ts';

export { ImageDecodeError } from './errors.ts';
export type { ImageDecodeReason } from './errors.ts';

export type NpyEncodable = Float64Array | Float32Array | Uint16Array | Uint8Array | Int32Array;

export interface DecodedNpy {
  /** Values converted to float64, row-major (C order) whatever the file's order. */
  data: Float64Array;
  /** Array shape, e.g. [rows, columns] for a frame. [] for a 0-d array (one element). */
  shape: number[];
  /** The file's dtype descriptor, e.g. '<f8', '>u2', '|u1'. */
  dtype: string;
}

const MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59]; // "\x93NUMPY"
/** Data offset alignment (numpy.lib.format ARRAY_ALIGN). */
export const NPY_ARRAY_ALIGN = 64;
/** Spare spaces NumPy leaves after the dict for in-place growth (numpy.lib.format GROWTH_AXIS_MAX_DIGITS). */
const GROWTH_AXIS_MAX_DIGITS = 21;

function descrOf(data: NpyEncodable): string {
  if (data instanceof Float64Array) return '<f8';
  if (data instanceof Float32Array) return '<f4';
  if (data instanceof Uint16Array) return '<u2';
  if (data instanceof Uint8Array) return '|u1';
  if (data instanceof Int32Array) return '<i4';
  throw new TypeError('encodeNpy: unsupported array type');
}

/** Python `repr` of a tuple of ints: (), (5,), (256, 256). */
function shapeRepr(shape: number[]): string {
  if (shape.length === 0) return '()';
  if (shape.length === 1) return `(${shape[0]},)`;
  return `(${shape.join(', ')})`;
}

/**
 * Encode an array as a `.npy` file (format version 1.0; 2.0 only if the header would not fit in
 * 65535 bytes, as NumPy does). Data are written row-major (fortran_order False), little-endian.
 */
export function encodeNpy(data: NpyEncodable, shape: number[]): Uint8Array {
  const descr = descrOf(data);
  for (const n of shape) {
    if (!Number.isSafeInteger(n) || n < 0) throw new RangeError(`encodeNpy: invalid shape entry ${n}`);
  }
  const count = shape.reduce((p, n) => p * n, 1);
  if (count !== data.length) {
    throw new RangeError(`encodeNpy: shape (${shape.join(', ')}) holds ${count} elements, data has ${data.length}`);
  }

  let dict = `{'descr': '${descr}', 'fortran_order': False, 'shape': ${shapeRepr(shape)}, }`;
  if (shape.length > 0) dict += ' '.repeat(Math.max(0, GROWTH_AXIS_MAX_DIGITS - String(shape[0]).length));

  // Same rule as numpy.lib.format._wrap_header: hlen counts the final '\n'; padlen is in 1..64.
  let major = 1;
  let lenBytes = 2;
  const hlen = dict.length + 1;
  let padlen = NPY_ARRAY_ALIGN - ((MAGIC.length + 2 + lenBytes + hlen) % NPY_ARRAY_ALIGN);
  if (hlen + padlen > 0xffff) {
    major = 2;
    lenBytes = 4;
    padlen = NPY_ARRAY_ALIGN - ((MAGIC.length + 2 + lenBytes + hlen) % NPY_ARRAY_ALIGN);
  }
  const headerLen = hlen + padlen;
  const dataOffset = MAGIC.length + 2 + lenBytes + headerLen;
  const itemsize = data.BYTES_PER_ELEMENT;
  const out = new Uint8Array(dataOffset + count * itemsize);
  const view = new DataView(out.buffer);

  out.set(MAGIC, 0);
  out[6] = major;
  out[7] = 0;
  if (lenBytes === 2) view.setUint16(8, headerLen, true);
  else view.setUint32(8, headerLen, true);
  let p = MAGIC.length + 2 + lenBytes;
  for (let i = 0; i < dict.length; i++) out[p++] = dict.charCodeAt(i);
  for (let i = 0; i < padlen; i++) out[p++] = 0x20;
  out[p++] = 0x0a;

  if (data instanceof Float64Array) for (let i = 0; i < count; i++) view.setFloat64(p + 8 * i, data[i], true);
  else if (data instanceof Float32Array) for (let i = 0; i < count; i++) view.setFloat32(p + 4 * i, data[i], true);
  else if (data instanceof Uint16Array) for (let i = 0; i < count; i++) view.setUint16(p + 2 * i, data[i], true);
  else if (data instanceof Int32Array) for (let i = 0; i < count; i++) view.setInt32(p + 4 * i, data[i], true);
  else out.set(data, p);
  return out;
}

// ---------------------------------------------------------------------------------------------
// Header parsing: a small reader for the Python literal subset NumPy writes.

class PyTuple {
  constructor(readonly items: PyValue[]) {}
}
type PyValue = string | number | boolean | null | PyValue[] | PyTuple | Map<string, PyValue>;

function corrupt(detail: string): ImageDecodeError {
  return new ImageDecodeError('truncated or corrupt', detail);
}

function parsePyLiteral(src: string): PyValue {
  let i = 0;
  const ws = () => {
    while (i < src.length && (src[i] === ' ' || src[i] === '\t' || src[i] === '\n' || src[i] === '\r')) i++;
  };
  const value = (depth: number): PyValue => {
    if (depth > 32) throw corrupt('.npy header nests too deeply');
    ws();
    const c = src[i];
    if (c === undefined) throw corrupt('.npy header ends early');
    if (c === '{') {
      i++;
      const map = new Map<string, PyValue>();
      for (;;) {
        ws();
        if (src[i] === '}') {
          i++;
          return map;
        }
        const key = value(depth + 1);
        if (typeof key !== 'string') throw corrupt('.npy header has a non-string key');
        ws();
        if (src[i] !== ':') throw corrupt(`.npy header: expected ':' at ${i}`);
        i++;
        map.set(key, value(depth + 1));
        ws();
        if (src[i] === ',') i++;
        else if (src[i] !== '}') throw corrupt(`.npy header: expected ',' or '}' at ${i}`);
      }
    }
    if (c === '(' || c === '[') {
      const close = c === '(' ? ')' : ']';
      i++;
      const items: PyValue[] = [];
      let sawComma = false;
      for (;;) {
        ws();
        if (src[i] === close) {
          i++;
          // Python: (x) is just x, (x,) is a one-element tuple.
          if (c === '(' && items.length === 1 && !sawComma) return items[0];
          return c === '(' ? new PyTuple(items) : items;
        }
        items.push(value(depth + 1));
        ws();
        if (src[i] === ',') {
          i++;
          sawComma = true;
        } else if (src[i] !== close) throw corrupt(`.npy header: expected ',' or '${close}' at ${i}`);
      }
    }
    if (c === "'" || c === '"') {
      i++;
      let s = '';
      while (i < src.length && src[i] !== c) {
        if (src[i] === '\\' && i + 1 < src.length) i++;
        s += src[i++];
      }
      if (src[i] !== c) throw corrupt('.npy header: unterminated string');
      i++;
      return s;
    }
    const m = /^[+-]?\d+L?/.exec(src.slice(i, i + 40));
    if (m) {
      i += m[0].length;
      return Number(m[0].replace('L', '')); // trailing L: Python 2 long, as in old files
    }
    const w = /^[A-Za-z_]\w*/.exec(src.slice(i, i + 40));
    if (w) {
      i += w[0].length;
      if (w[0] === 'True') return true;
      if (w[0] === 'False') return false;
      if (w[0] === 'None') return null;
    }
    throw corrupt(`.npy header: cannot read value at ${i}`);
  };
  const v = value(0);
  ws();
  if (i !== src.length) throw corrupt(`.npy header: unexpected text at ${i}`);
  return v;
}

interface ElementReader {
  itemsize: number;
  read(view: DataView, offset: number): number;
}

function readerFor(descr: PyValue): ElementReader {
  if (typeof descr !== 'string') {
    throw new ImageDecodeError('unsupported format', 'structured or sub-array dtypes are not supported');
  }
  const m = /^([<>|=])([a-zA-Z])(\d+)$/.exec(descr);
  if (!m) {
    if (/^[<>|=]?O/.test(descr)) throw new ImageDecodeError('unsupported format', 'object arrays (pickled data) are not supported');
    throw new ImageDecodeError('unsupported format', `dtype '${descr}' is not supported`);
  }
  const order = m[1];
  const kind = m[2];
  const size = Number(m[3]);
  if (kind === 'O') throw new ImageDecodeError('unsupported format', 'object arrays (pickled data) are not supported');
  if (size > 1 && order !== '<' && order !== '>') {
    throw new ImageDecodeError('unsupported format', `dtype '${descr}' has no explicit byte order`);
  }
  const le = order !== '>';
  const key = `${kind}${size}`;
  switch (key) {
    case 'f8':
      return { itemsize: 8, read: (v, o) => v.getFloat64(o, le) };
    case 'f4':
      return { itemsize: 4, read: (v, o) => v.getFloat32(o, le) };
    case 'u1':
      return { itemsize: 1, read: (v, o) => v.getUint8(o) };
    case 'i1':
      return { itemsize: 1, read: (v, o) => v.getInt8(o) };
    case 'b1':
      return { itemsize: 1, read: (v, o) => (v.getUint8(o) !== 0 ? 1 : 0) };
    case 'u2':
      return { itemsize: 2, read: (v, o) => v.getUint16(o, le) };
    case 'i2':
      return { itemsize: 2, read: (v, o) => v.getInt16(o, le) };
    case 'u4':
      return { itemsize: 4, read: (v, o) => v.getUint32(o, le) };
    case 'i4':
      return { itemsize: 4, read: (v, o) => v.getInt32(o, le) };
    case 'u8':
      return { itemsize: 8, read: (v, o) => Number(v.getBigUint64(o, le)) };
    case 'i8':
      return { itemsize: 8, read: (v, o) => Number(v.getBigInt64(o, le)) };
    default:
      throw new ImageDecodeError('unsupported format', `dtype '${descr}' is not supported`);
  }
}

/**
 * Decode a `.npy` file. Values are converted to float64 (64-bit integers beyond 2^53 lose precision);
 * Fortran-ordered data are transposed so that `data` is always row-major for `shape`.
 * Throws ImageDecodeError: 'unsupported format' (bad magic, unknown version, unsupported or object
 * dtype), 'truncated or corrupt' (short file, unreadable header), 'empty frame' (a zero in the shape).
 */
export function decodeNpy(bytes: Uint8Array): DecodedNpy {
  if (bytes.length < 10 || MAGIC.some((b, k) => bytes[k] !== b)) {
    throw new ImageDecodeError('unsupported format', 'not a .npy file (magic string "\\x93NUMPY" missing)');
  }
  const major = bytes[6];
  const minor = bytes[7];
  if (!((major === 1 || major === 2 || major === 3) && minor === 0)) {
    throw new ImageDecodeError('unsupported format', `.npy format version ${major}.${minor} is not supported`);
  }
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const lenBytes = major === 1 ? 2 : 4;
  if (bytes.length < 8 + lenBytes) throw corrupt('.npy file ends inside the header length');
  const headerLen = lenBytes === 2 ? view.getUint16(8, true) : view.getUint32(8, true);
  const headerStart = 8 + lenBytes;
  const dataOffset = headerStart + headerLen;
  if (bytes.length < dataOffset) throw corrupt('.npy file ends inside the header');
  if (headerLen > 1 << 20) throw corrupt('.npy header is implausibly long');

  const headerBytes = bytes.subarray(headerStart, dataOffset);
  let header = '';
  for (let k = 0; k < headerBytes.length; k++) {
    // Only ASCII matters for the keys and values accepted here; v3.0 UTF-8 only adds field names.
    header += headerBytes[k] < 0x80 ? String.fromCharCode(headerBytes[k]) : '\ufffd';
  }

  const dict = parsePyLiteral(header);
  if (!(dict instanceof Map)) throw corrupt('.npy header is not a dictionary');
  for (const k of ['descr', 'fortran_order', 'shape']) {
    if (!dict.has(k)) throw corrupt(`.npy header lacks '${k}'`);
  }
  if (dict.size !== 3) throw corrupt('.npy header has unexpected keys');

  const fortran = dict.get('fortran_order');
  if (typeof fortran !== 'boolean') throw corrupt("'fortran_order' is not True or False");
  const shapeVal = dict.get('shape');
  if (!(shapeVal instanceof PyTuple)) throw corrupt("'shape' is not a tuple");
  const shape: number[] = [];
  for (const s of shapeVal.items) {
    if (typeof s !== 'number' || !Number.isSafeInteger(s) || s < 0) throw corrupt(`invalid shape entry ${String(s)}`);
    shape.push(s);
  }
  const descrVal = dict.get('descr') as PyValue;
  const reader = readerFor(descrVal);
  const dtype = descrVal as string;

  let count = 1;
  for (const s of shape) count *= s;
  if (count === 0) throw new ImageDecodeError('empty frame', `array shape (${shape.join(', ')}) holds no elements`);
  if (!Number.isSafeInteger(count) || count > 2 ** 31) throw corrupt(`array shape (${shape.join(', ')}) is too large`);
  const needed = count * reader.itemsize;
  if (bytes.length - dataOffset < needed) {
    throw corrupt(`.npy data holds ${bytes.length - dataOffset} bytes, shape and dtype need ${needed}`);
  }

  const data = new Float64Array(count);
  const isz = reader.itemsize;
  if (!fortran || shape.length < 2) {
    for (let k = 0; k < count; k++) data[k] = reader.read(view, dataOffset + k * isz);
  } else {
    // Element (i0, …, in−1) sits at Fortran offset Σ ik·stride_k with stride_0 = 1, stride_k = stride_{k−1}·shape_{k−1}.
    const nd = shape.length;
    const fStride = new Array<number>(nd);
    fStride[0] = 1;
    for (let d = 1; d < nd; d++) fStride[d] = fStride[d - 1] * shape[d - 1];
    const idx = new Array<number>(nd).fill(0);
    let fOff = 0;
    for (let k = 0; k < count; k++) {
      data[k] = reader.read(view, dataOffset + fOff * isz);
      // Advance the row-major odometer (last axis fastest), keeping fOff in step.
      for (let d = nd - 1; d >= 0; d--) {
        idx[d]++;
        fOff += fStride[d];
        if (idx[d] < shape[d]) break;
        fOff -= idx[d] * fStride[d];
        idx[d] = 0;
      }
    }
  }
  return { data, shape, dtype };
}

export interface DecodedNpyFrame {
  /** Row-major pixel values, row 0 first, converted to float64. */
  data: Float64Array;
  widthPx: number;
  heightPx: number;
  dtype: string;
}

/**
 * Decode a `.npy` file holding one grayscale frame: shape (rows, columns), or (rows, columns, 1) /
 * (1, rows, columns) with a single channel or plane. Throws ImageDecodeError 'wrong dimensions' for
 * any other shape, or when `expected` is given and the size differs, and 'truncated or corrupt' when
 * a value is NaN or ±Infinity (the message says how many and where the first one is).
 */
export function decodeNpyFrame(bytes: Uint8Array, expected?: { widthPx: number; heightPx: number }): DecodedNpyFrame {
  const { data, shape, dtype } = decodeNpy(bytes);
  let dims: number[];
  if (shape.length === 2) dims = shape;
  else if (shape.length === 3 && shape[2] === 1) dims = [shape[0], shape[1]];
  else if (shape.length === 3 && shape[0] === 1) dims = [shape[1], shape[2]];
  else throw new ImageDecodeError('wrong dimensions', `expected a 2-D frame, got shape (${shape.join(', ')})`);
  const [heightPx, widthPx] = dims;
  if (expected && (expected.widthPx !== widthPx || expected.heightPx !== heightPx)) {
    throw new ImageDecodeError(
      'wrong dimensions',
      `expected ${expected.widthPx} × ${expected.heightPx} px, file holds ${widthPx} × ${heightPx} px`,
    );
  }
  let nonFinite = 0;
  let firstBad = -1;
  for (let k = 0; k < data.length; k++) {
    if (!Number.isFinite(data[k])) {
      if (firstBad < 0) firstBad = k;
      nonFinite++;
    }
  }
  if (nonFinite > 0) {
    const row = Math.floor(firstBad / widthPx);
    throw new ImageDecodeError(
      'truncated or corrupt',
      `the frame holds ${nonFinite} non-finite value${nonFinite === 1 ? '' : 's'} (NaN or ±Infinity), the first at row ${row}, column ${firstBad - row * widthPx} (value ${data[firstBad]}); a camera frame holds finite counts`,
    );
  }
  return { data, widthPx, heightPx, dtype };
}
