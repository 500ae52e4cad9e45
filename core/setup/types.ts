/**
 * The bench setup and simulation scene, in SI units, as used everywhere inside `core`.
 * The JSON files (`shadowfront-setup/1`, `shadowfront-scene/1`) carry unit strings; `parseSetup`
 * and `parseScene` turn them into these types at the edge.
 *
 * Lab frame (physics notes, section 5): looking downstream, x right, y up, θ counter-clockwise from +x.
 */

/** A periodic deviation of the disc edge: r(θ) gains amplitudeM·cos(order·θ − phaseRad). */
export interface EdgeHarmonic {
  order: number;
  amplitudeM: number;
  phaseRad: number;
}

/** How a stored image maps onto the lab frame: first flip, then rotate counter-clockwise. */
export interface CameraOrientation {
  flipX: boolean;
  flipY: boolean;
  /** 0, 90, 180 or 270 */
  rotateDeg: 0 | 90 | 180 | 270;
}

export interface BeamSpec {
  /** 1/e² intensity radius of the Gaussian beam at the disc plane. */
  radiusM: number;
  /** Beam (amplitude) axis relative to the disc centre, lab frame. */
  centerM: [number, number];
  /** Nominal wavefront radius at the disc; +Infinity when collimated, > 0 diverging. */
  curvatureRadiusM: number;
}

export interface DiscSpec {
  /** Nominal radius a (half the diameter). */
  radiusM: number;
  /** Edge radius a·(1 + e·cos 2(θ − θe)). */
  ellipticity: number;
  ellipseAngleRad: number;
  edgeHarmonics: EdgeHarmonic[];
}

export interface CameraSpec {
  /** Disc plane to sensor plane, L. */
  distanceM: number;
  pixelPitchM: number;
  bitDepth: number;
  /** Counts at and above which a pixel is saturated; default 2^bitDepth − 1. */
  saturationCounts: number;
  orientation: CameraOrientation;
  /**
   * Sensor size [width, height] in pixels, from the optional `camera.sensorSize`; null when not given.
   * `parseSetup` always sets it (null when absent); setups built in code may leave it out.
   */
  sensorPx?: [number, number] | null;
}

export interface SourceSpec {
  /** Diameter of a uniform disc-shaped source, S. 0 for a point source. */
  sizeM: number;
}

export interface BenchSetup {
  wavelengthM: number;
  beam: BeamSpec;
  disc: DiscSpec;
  camera: CameraSpec;
  /** Normalisation radius of every Zernike coefficient read or reported. */
  zernikeRadiusM: number;
  source: SourceSpec;
}

/** One Zernike term, ANSI single index j, coefficient in waves over `zernikeRadiusM`. */
export interface ZernikeTerm {
  j: number;
  waves: number;
}

export interface FrameSpec {
  widthPx: number;
  heightPx: number;
  /** Frame centre in the camera plane, relative to where the line from the nominal source through the disc centre meets the sensor. */
  centerM: [number, number];
}

export interface NoiseSpec {
  /** Expected counts (above offset) of a pixel at relative intensity 1 (the incident peak at the disc plane). */
  peakCounts: number;
  /** Gaussian read noise, RMS counts. */
  readNoise: number;
  /** Constant offset (bias) in counts. */
  offset: number;
  seed: number;
}

export interface Scene extends BenchSetup {
  aberrations: ZernikeTerm[];
  frame: FrameSpec;
  noise: NoiseSpec | null;
}
