/**
 * Colour → gray conversion for frames that were saved in colour.
 *
 * Weights: ITU-R Recommendation BT.709-6 (06/2015), Part 1, item 3.2 "Derivation of luminance signal":
 *   E'Y = 0.2126 E'R + 0.7152 E'G + 0.0722 E'B.
 * They are applied to the stored sample values as they are. A camera frame saved in colour has lost
 * what the sensor measured (demosaicing, white balance, possibly gamma), so the result is only an
 * approximation of the light on the sensor; callers warn about it.
 */
export const BT709_LUMA = { r: 0.2126, g: 0.7152, b: 0.0722 } as const;

/** Luma of one pixel (BT.709 weights). */
export function luma709(r: number, g: number, b: number): number {
  return BT709_LUMA.r * r + BT709_LUMA.g * g + BT709_LUMA.b * b;
}

/** The warning every decoder attaches to a colour image converted to gray. */
export function colourWarning(what: string): string {
  return (
    `${what} is a colour image: converted to gray with the ITU-R BT.709 luma weights ` +
    '(0.2126 R + 0.7152 G + 0.0722 B). Record frames in monochrome (raw) mode for measurements; ' +
    'saturation cannot be detected reliably after the conversion'
  );
}
