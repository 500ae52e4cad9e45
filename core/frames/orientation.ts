/**
 * Turning a camera's readout into the lab frame of the physics notes (section 5).
 *
 * Lab frame: looking downstream (from the laser toward the camera), x to the right, y up. A stored
 * image in the lab frame has its column index along +x and its row index along −y: row 0 is the top,
 * column 0 the left, as an image is normally displayed.
 *
 * `camera.orientation` says how to get there from the file as stored, in this order:
 *   1. flipX — mirror left ↔ right: column c goes to column W − 1 − c (rows unchanged);
 *   2. flipY — mirror top ↔ bottom: row r goes to row H − 1 − r (columns unchanged);
 *   3. rotateDeg — turn the (flipped) image counter-clockwise, as displayed, by 0, 90, 180 or 270°.
 *      A 90° turn of a W × H image gives an H × W image: the top-right corner goes to the top-left,
 *      i.e. (x, y) → (−y, x) about the image centre; input pixel (row r, column c) lands at
 *      (row W − 1 − c, column r). 180° maps (r, c) → (H − 1 − r, W − 1 − c); 270° maps
 *      (r, c) → (c, H − 1 − r).
 *
 * Pure.
 */
import type { CameraOrientation } from '../setup/types.ts';

export interface OrientedImage<T extends Float64Array | Uint8Array> {
  data: T;
  widthPx: number;
  heightPx: number;
}

/** Where the stored pixel (row, col) of a W × H readout lands after the orientation; also the new size. */
export function orientIndex(
  row: number,
  col: number,
  widthPx: number,
  heightPx: number,
  o: CameraOrientation,
): { row: number; col: number; widthPx: number; heightPx: number } {
  let r = o.flipY ? heightPx - 1 - row : row;
  let c = o.flipX ? widthPx - 1 - col : col;
  switch (o.rotateDeg) {
    case 0:
      return { row: r, col: c, widthPx, heightPx };
    case 90:
      return { row: widthPx - 1 - c, col: r, widthPx: heightPx, heightPx: widthPx };
    case 180:
      return { row: heightPx - 1 - r, col: widthPx - 1 - c, widthPx, heightPx };
    case 270:
      [r, c] = [c, heightPx - 1 - r];
      return { row: r, col: c, widthPx: heightPx, heightPx: widthPx };
    default:
      throw new RangeError(`camera orientation: rotate must be 0, 90, 180 or 270 degrees (got ${String(o.rotateDeg)})`);
  }
}

/** True when the orientation changes nothing. */
export function isIdentityOrientation(o: CameraOrientation): boolean {
  return !o.flipX && !o.flipY && o.rotateDeg === 0;
}

/** Apply `camera.orientation` to a row-major image (see the module comment for the exact mapping). */
export function orientImage<T extends Float64Array | Uint8Array>(
  data: T,
  widthPx: number,
  heightPx: number,
  o: CameraOrientation,
): OrientedImage<T> {
  if (data.length !== widthPx * heightPx) throw new RangeError(`orientImage: ${data.length} values for ${widthPx} × ${heightPx} px`);
  const size = orientIndex(0, 0, widthPx, heightPx, o);
  if (isIdentityOrientation(o)) return { data: data.slice() as T, widthPx, heightPx };
  const out = (data instanceof Float64Array ? new Float64Array(data.length) : new Uint8Array(data.length)) as T;
  const W2 = size.widthPx;
  for (let r = 0; r < heightPx; r++) {
    for (let c = 0; c < widthPx; c++) {
      const p = orientIndex(r, c, widthPx, heightPx, o);
      out[p.row * W2 + p.col] = data[r * widthPx + c];
    }
  }
  return { data: out, widthPx: size.widthPx, heightPx: size.heightPx };
}
