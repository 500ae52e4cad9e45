/**
 * Test helpers: TIFF files built byte by byte from TIFF Revision 6.0 (Adobe, 1992), so that the decoder is
 * checked against the specification rather than against another encoder.
 *   section 2   header ("II" + 42 little-endian or "MM" + 42 big-endian, offset of the first IFD); IFD =
 *               entry count (SHORT), 12-byte entries sorted by tag (tag, type, count, value or offset),
 *               offset of the next IFD; values longer than 4 bytes stored elsewhere, at word (even) offsets;
 *               field types SHORT = 3 (2 bytes), LONG = 4 (4 bytes)
 *   section 9   PackBits: header byte n ≥ 0 copies the next n + 1 bytes, −127 ≤ n ≤ −1 repeats the next
 *               byte 1 − n times, −128 is a no-op
 *   section 13  LZW: ClearCode 256, EndOfInformation 257, first free code 258, codes written high bit
 *               first, starting 9 bits wide and growing to 12
 *   section 14  Predictor 2: each sample (after the first of a row) is stored as its difference from the
 *               sample to its left, modulo 2^BitsPerSample
 */
import { deflateSync } from 'node:zlib';

export interface TiffEntry {
  tag: number;
  type: 3 | 4;
  values: number[];
}

/** A one-image TIFF with the given fields and strips; StripOffsets and StripByteCounts are filled in. */
export function buildTiff(fields: TiffEntry[], strips: Uint8Array[], littleEndian = true): Uint8Array {
  const entries = fields
    .filter((e) => e.tag !== 273 && e.tag !== 279)
    .concat([
      { tag: 273, type: 4, values: strips.map(() => 0) },
      { tag: 279, type: 4, values: strips.map((s) => s.length) },
    ])
    .sort((a, b) => a.tag - b.tag);
  const size = (t: 3 | 4) => (t === 3 ? 2 : 4);
  const ifdOffset = 8;
  const ifdBytes = 2 + 12 * entries.length + 4;
  let extra = ifdOffset + ifdBytes;
  const extraOffsets = new Map<number, number>();
  for (const e of entries) {
    const n = e.values.length * size(e.type);
    if (n > 4) {
      extraOffsets.set(e.tag, extra);
      extra += n + (n % 2);
    }
  }
  const stripOffsets: number[] = [];
  let pos = extra;
  for (const s of strips) {
    stripOffsets.push(pos);
    pos += s.length + (s.length % 2);
  }
  entries.find((e) => e.tag === 273)!.values = stripOffsets;
  const out = new Uint8Array(pos);
  const v = new DataView(out.buffer);
  const le = littleEndian;
  out[0] = out[1] = le ? 0x49 : 0x4d;
  v.setUint16(2, 42, le);
  v.setUint32(4, ifdOffset, le);
  v.setUint16(ifdOffset, entries.length, le);
  let p = ifdOffset + 2;
  const put = (off: number, t: 3 | 4, x: number) => (t === 3 ? v.setUint16(off, x, le) : v.setUint32(off, x, le));
  for (const e of entries) {
    v.setUint16(p, e.tag, le);
    v.setUint16(p + 2, e.type, le);
    v.setUint32(p + 4, e.values.length, le);
    const at = extraOffsets.get(e.tag);
    if (at === undefined) e.values.forEach((x, k) => put(p + 8 + k * size(e.type), e.type, x));
    else {
      v.setUint32(p + 8, at, le);
      e.values.forEach((x, k) => put(at + k * size(e.type), e.type, x));
    }
    p += 12;
  }
  v.setUint32(p, 0, le);
  strips.forEach((s, k) => out.set(s, stripOffsets[k]));
  return out;
}

/** Baseline grayscale fields (TIFF 6.0 section 4), plus any extra ones. */
export function grayFields(widthPx: number, heightPx: number, bits: number, rowsPerStrip: number, compression: number, extra: TiffEntry[] = []): TiffEntry[] {
  return [
    { tag: 256, type: 4, values: [widthPx] },
    { tag: 257, type: 4, values: [heightPx] },
    { tag: 258, type: 3, values: [bits] },
    { tag: 259, type: 3, values: [compression] },
    { tag: 262, type: 3, values: [1] },
    { tag: 277, type: 3, values: [1] },
    { tag: 278, type: 4, values: [rowsPerStrip] },
    ...extra,
  ];
}

/** Samples as bytes in the file's byte order (TIFF 6.0 section 2: the byte order applies to all multi-byte data). */
export function sampleBytes(samples: ArrayLike<number>, bits: 8 | 16, littleEndian: boolean): Uint8Array {
  if (bits === 8) return Uint8Array.from(samples);
  const out = new Uint8Array(2 * samples.length);
  const v = new DataView(out.buffer);
  for (let k = 0; k < samples.length; k++) v.setUint16(2 * k, samples[k], littleEndian);
  return out;
}

/** PackBits (TIFF 6.0 section 9): runs of 3 or more equal bytes as repeats, the rest as literals. */
export function packBits(data: Uint8Array): Uint8Array {
  const out: number[] = [];
  let i = 0;
  while (i < data.length) {
    let run = 1;
    while (i + run < data.length && data[i + run] === data[i] && run < 128) run++;
    if (run >= 3) {
      out.push((1 - run) & 0xff, data[i]);
      i += run;
    } else {
      const start = i;
      while (i < data.length && i - start < 128) {
        if (i + 2 < data.length && data[i] === data[i + 1] && data[i] === data[i + 2]) break;
        i++;
      }
      out.push(i - start - 1, ...data.subarray(start, i));
    }
  }
  return Uint8Array.from(out);
}

/**
 * LZW (TIFF 6.0 section 13). Codes are packed high bit first. The code width grows from 9 to 10 bits once
 * the table holds 512 entries (and so on), the point used by libtiff's encoder (from memory); the
 * tests only pass when utif2, an independent decoder, reads the result back.
 */
export function lzw(data: Uint8Array): Uint8Array {
  const out: number[] = [];
  let acc = 0;
  let nacc = 0;
  let width = 9;
  const write = (code: number) => {
    acc = (acc << width) | code;
    nacc += width;
    while (nacc >= 8) {
      out.push((acc >>> (nacc - 8)) & 0xff);
      nacc -= 8;
    }
    acc &= (1 << nacc) - 1;
  };
  let table = new Map<string, number>();
  let next = 258;
  const reset = () => {
    table = new Map();
    next = 258;
    width = 9;
  };
  write(256);
  let omega = '';
  for (let k = 0; k < data.length; k++) {
    const ch = String.fromCharCode(data[k]);
    const cand = omega + ch;
    if (omega === '' || table.has(cand)) {
      omega = cand;
      continue;
    }
    write(omega.length === 1 ? omega.charCodeAt(0) : table.get(omega)!);
    table.set(cand, next++);
    if (next === 4094) {
      write(256);
      reset();
    } else if (next === 1 << width) width++;
    omega = ch;
  }
  if (omega !== '') write(omega.length === 1 ? omega.charCodeAt(0) : table.get(omega)!);
  write(257);
  if (nacc > 0) out.push((acc << (8 - nacc)) & 0xff);
  return Uint8Array.from(out);
}

/** Deflate strip: a zlib stream (RFC 1950/1951), as the Adobe TIFF technical notes prescribe for Compression 8. */
export function deflate(data: Uint8Array): Uint8Array {
  return new Uint8Array(deflateSync(data));
}

/** Horizontal differencing (TIFF 6.0 section 14) of a row-major image of single samples. */
export function predictor2(samples: ArrayLike<number>, widthPx: number, bits: 8 | 16): number[] {
  const mod = 2 ** bits;
  const out: number[] = [];
  for (let k = 0; k < samples.length; k++) {
    out.push(k % widthPx === 0 ? samples[k] : (samples[k] - samples[k - 1] + mod) % mod);
  }
  return out;
}
