/**
 * The JSON shapes of the setup and scene files, as written by `setupToJson` / `sceneToJson`.
 * Quantities are text with units; see core/setup/README.md for every field.
 * These are optional helper types; the SI types used inside `core` are in ./types.ts.
 */

export const SETUP_FORMAT = 'shadowfront-setup/1';
export const SCENE_FORMAT = 'shadowfront-scene/1';

export type FlipName = 'none' | 'horizontal' | 'vertical' | 'both';

export interface EdgeHarmonicJson {
  order: number;
  amplitude: string;
  phase: string;
}

export interface SetupBodyJson {
  /** Optional free text, ignored by the program. */
  note?: string;
  wavelength: string;
  beam: { radius: string; center: [string, string]; curvatureRadius: string };
  disc: { diameter: string; ellipticity: number; ellipseAngle: string; edgeHarmonics: EdgeHarmonicJson[] };
  camera: {
    distance: string;
    pixelPitch: string;
    bitDepth: number;
    saturation: number;
    orientation: { flip: FlipName; rotate: string };
    /** [width, height] in pixels; written only when known. */
    sensorSize?: [number, number];
  };
  zernike: { radius: string };
  source: { size: string };
}

export interface SetupFileJson extends SetupBodyJson {
  format: typeof SETUP_FORMAT;
}

export interface SceneFileJson extends SetupBodyJson {
  format: typeof SCENE_FORMAT;
  /** ANSI index j (as a string key) → waves over zernike.radius. */
  aberrations: Record<string, number>;
  frame: { width: number; height: number; center: [string, string] };
  noise?: { peakCounts: number; readNoise: number; offset: number; seed: number };
}

/** Options for writing a file. */
export interface ToJsonOptions {
  /** Free text stored in the optional "note" field. */
  note?: string;
}
