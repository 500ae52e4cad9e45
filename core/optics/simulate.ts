/**
 * Simulate a camera frame of the disc's shadow from a scene: coherent intensity from the fast or the
 * reference model, integrated over each pixel's area, blurred by a finite source, and optionally turned
 * into camera counts with the noise model. Pure; shared by the CLI, the app and the tests.
 */
import type { FrameSpec, Scene } from '../setup/types.ts';
import { binSamples, pixelSampleAxes } from '../camera/pixels.ts';
import { blurMarginPx, convolveWithDisc } from '../camera/blur.ts';
import { applyCameraNoise, scaleToCounts } from '../camera/noise.ts';
import { benchFigures } from './geometry.ts';
import { chooseRimSamples, fastField } from './fast/rimModel.ts';
import { rayCheck } from './fast/rayCheck.ts';
import { referenceIntensity } from './reference/index.ts';

export type ModelName = 'fast' | 'reference';

export interface SimulateOptions {
  model?: ModelName;
  /** Gauss–Legendre sub-samples per pixel and axis (1–4); default 2. */
  oversample?: number;
  /** Progress 0..1; return false to cancel (throws an Error named 'CancelledError'). */
  onProgress?: (fraction: number) => boolean | void;
}

export interface SimulatedIntensity {
  widthPx: number;
  heightPx: number;
  /** Pixel-mean intensity relative to the incident peak at the disc plane, row-major, first row on top. */
  intensity: Float64Array;
  model: ModelName;
  /** Rim samples used by the fast model. */
  rimSamples: number | null;
  warnings: string[];
}

export interface SimulatedFrame extends SimulatedIntensity {
  /** Camera counts: noisy when the scene has a noise spec, otherwise scaled so the maximum is full scale. */
  counts: Uint16Array;
  noisy: boolean;
}

function cancelled(): Error {
  const e = new Error('cancelled');
  e.name = 'CancelledError';
  return e;
}

/** Coherent, pixel-integrated and source-blurred intensity of a scene. */
export function simulateIntensity(scene: Scene, options: SimulateOptions = {}): SimulatedIntensity {
  const model = options.model ?? 'fast';
  const oversample = options.oversample ?? 2;
  const warnings: string[] = [];
  const figures = benchFigures(scene);
  const pitch = scene.camera.pixelPitchM;
  const blurPx = figures.sourceBlurM / pitch;
  const margin = blurPx > 0 ? blurMarginPx(blurPx) : 0;
  const padded: FrameSpec = {
    widthPx: scene.frame.widthPx + 2 * margin,
    heightPx: scene.frame.heightPx + 2 * margin,
    centerM: scene.frame.centerM,
  };
  const axes = pixelSampleAxes(padded, pitch, oversample);
  const progress = options.onProgress;
  if (progress && progress(0) === false) throw cancelled();
  let samples: Float64Array;
  let rimSamples: number | null = null;
  if (model === 'fast') {
    const region = {
      xMinM: axes.xsM[0],
      xMaxM: axes.xsM[axes.xsM.length - 1],
      yMinM: axes.ysM[axes.ysM.length - 1],
      yMaxM: axes.ysM[0],
    };
    const check = rayCheck(scene, scene.aberrations, region);
    if (!check.ok) {
      throw new RangeError(`fast model not valid for this scene: ${check.message}. Use the reference model (--model reference).`);
    }
    // Work in bands of rows so that long frames report progress and can be cancelled.
    const nx = axes.xsM.length;
    const ny = axes.ysM.length;
    samples = new Float64Array(nx * ny);
    const band = Math.max(8, Math.ceil(ny / 16));
    const nPhi = chooseRimSamples(scene, scene.aberrations, axes.xsM, axes.ysM);
    let invalid = 0;
    for (let y0 = 0; y0 < ny; y0 += band) {
      const ys = axes.ysM.subarray(y0, Math.min(ny, y0 + band));
      const f = fastField(scene, scene.aberrations, axes.xsM, ys, { nPhi });
      rimSamples = f.nPhi;
      invalid += f.invalidCount;
      for (let i = 0; i < f.re.length; i++) samples[y0 * nx + i] = f.re[i] * f.re[i] + f.im[i] * f.im[i];
      if (progress && progress(Math.min(1, (y0 + band) / ny) * 0.95) === false) throw cancelled();
    }
    if (invalid > 0) {
      throw new RangeError(`fast model not valid at ${invalid} sample points of this frame (no saddle point of the free beam). Use the reference model (--model reference).`);
    }
  } else {
    samples = referenceIntensity(scene, scene.aberrations, axes.xsM, axes.ysM, {
      onProgress: progress ? (f) => progress(f * 0.95) : undefined,
    });
  }
  let intensity = binSamples(samples, padded.widthPx, padded.heightPx, axes);
  if (margin > 0 || blurPx > 0) {
    if (blurPx > 0) intensity = convolveWithDisc(intensity, padded.widthPx, padded.heightPx, blurPx);
    const out = new Float64Array(scene.frame.widthPx * scene.frame.heightPx);
    for (let r = 0; r < scene.frame.heightPx; r++) {
      const src = (r + margin) * padded.widthPx + margin;
      out.set(intensity.subarray(src, src + scene.frame.widthPx), r * scene.frame.widthPx);
    }
    intensity = out;
  }
  const shadowPx = figures.shadowDiameterM / pitch;
  if (shadowPx > Math.hypot(scene.frame.widthPx, scene.frame.heightPx)) {
    warnings.push(
      `the frame (${scene.frame.widthPx}×${scene.frame.heightPx} px) shows only the inside of the shadow (${shadowPx.toFixed(0)} px across): the shadow edge, where defocus and coma show best, is not in the frame`,
    );
  }
  if (progress) progress(1);
  return { widthPx: scene.frame.widthPx, heightPx: scene.frame.heightPx, intensity, model, rimSamples, warnings };
}

/** Simulated frame with camera counts. */
export function simulateFrame(scene: Scene, options: SimulateOptions = {}): SimulatedFrame {
  const sim = simulateIntensity(scene, options);
  const noisy = scene.noise !== null;
  const counts = noisy
    ? applyCameraNoise(sim.intensity, scene.noise!, scene.camera)
    : scaleToCounts(sim.intensity, scene.camera.bitDepth);
  if (noisy) {
    const top = Math.min(scene.camera.saturationCounts, 2 ** scene.camera.bitDepth - 1);
    let sat = 0;
    for (let i = 0; i < counts.length; i++) if (counts[i] >= top) sat++;
    if (sat > 0) sim.warnings.push(`${sat} pixels are saturated at ${top} counts: lower noise.peakCounts (attenuate the beam)`);
  }
  return { ...sim, counts, noisy };
}
