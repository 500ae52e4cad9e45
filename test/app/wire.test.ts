/** The wire codec of app/shared/contract.ts (HTTP): typed arrays and non-finite numbers survive JSON. Contract checks. */
import { describe, expect, it } from 'vitest';
import { fromWire, toWire } from '../../app/shared/contract.ts';

describe('toWire / fromWire', () => {
  it('round-trips Uint8Array and Float32Array exactly, inside nested objects and lists', () => {
    const bytes = new Uint8Array(70_000);
    for (let i = 0; i < bytes.length; i++) bytes[i] = (i * 37 + 11) & 0xff;
    const floats = Float32Array.from([0, -1.5, 3.25e-7, 1e30, -0, Number.MIN_VALUE]);
    const value = { frames: [{ name: 'a.png', data: bytes }], image: { widthPx: 3, heightPx: 2, data: floats, pixelM: 5.5e-6 }, empty: new Uint8Array(0) };
    const back = fromWire(toWire(value)) as typeof value;
    expect(back.frames[0].data).toBeInstanceOf(Uint8Array);
    expect(back.frames[0].data.length).toBe(bytes.length);
    expect(back.frames[0].data.every((b, i) => b === bytes[i])).toBe(true);
    expect(back.image.data).toBeInstanceOf(Float32Array);
    expect(Array.from(back.image.data)).toEqual(Array.from(floats));
    expect(Object.is(back.image.data[4], -0)).toBe(true);
    expect(back.empty).toBeInstanceOf(Uint8Array);
    expect(back.empty.length).toBe(0);
    expect(back.image.pixelM).toBe(5.5e-6);
  });

  it('round-trips a Float32Array view that starts inside a larger buffer', () => {
    const big = new Float32Array([1, 2, 3, 4, 5]);
    const view = big.subarray(2, 4);
    const back = fromWire(toWire({ v: view })) as { v: Float32Array };
    expect(Array.from(back.v)).toEqual([3, 4]);
  });

  it('round-trips NaN and ±Infinity, in plain numbers and inside Float32Array', () => {
    const value = { a: NaN, b: Infinity, c: -Infinity, list: [1, NaN, 2], f: Float32Array.from([NaN, Infinity, -Infinity, 1]) };
    const text = toWire(value);
    expect(text).not.toContain('null');
    const back = fromWire(text) as typeof value;
    expect(back.a).toBeNaN();
    expect(back.b).toBe(Infinity);
    expect(back.c).toBe(-Infinity);
    expect(back.list[0]).toBe(1);
    expect(back.list[1]).toBeNaN();
    expect(back.f[0]).toBeNaN();
    expect(back.f[1]).toBe(Infinity);
    expect(back.f[2]).toBe(-Infinity);
  });

  it('leaves ordinary objects that happen to use similar keys alone when they have more than one key', () => {
    const value = { $u8: 'not base64 here', other: 1 };
    expect(fromWire(toWire(value))).toEqual(value);
  });
});
