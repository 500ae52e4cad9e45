/**
 * The "simulate" job shared by every shell: read a scene file, simulate, encode the frame.
 */
import { extname } from 'node:path';
import { parseScene } from '../../core/setup/parseScene.ts';
import type { Scene } from '../../core/setup/types.ts';
import { simulateFrame, type ModelName, type SimulatedFrame } from '../../core/optics/simulate.ts';
import { encodePng16 } from '../../core/imageio/png.ts';
import { encodeTiff16 } from '../../core/imageio/tiff.ts';
import { encodeNpy } from '../../core/imageio/npy.ts';
import { FileProblem, readJson, writeBytesAtomic } from './files.ts';

export const OUTPUT_KINDS = ['.png', '.tif', '.tiff', '.npy'] as const;

export function loadScene(path: string): Scene {
  return parseScene(readJson(path), path);
}

/** Encode a simulated frame for the output file's type (by extension). */
export function encodeFrame(frame: SimulatedFrame, outPath: string): Uint8Array {
  const ext = extname(outPath).toLowerCase();
  switch (ext) {
    case '.png':
      return encodePng16(frame.counts, frame.widthPx, frame.heightPx);
    case '.tif':
    case '.tiff':
      return encodeTiff16(frame.counts, frame.widthPx, frame.heightPx);
    case '.npy':
      return encodeNpy(frame.intensity, [frame.heightPx, frame.widthPx]);
    default:
      throw new FileProblem(outPath, `unknown output type "${ext || '(none)'}"; use .png, .tif or .npy`);
  }
}

export interface SimulateJob {
  scenePath: string;
  outPath: string;
  model: ModelName;
  oversample?: number;
  onProgress?: (fraction: number) => boolean | void;
}

export function runSimulate(job: SimulateJob): SimulatedFrame {
  const ext = extname(job.outPath).toLowerCase();
  if (!(OUTPUT_KINDS as readonly string[]).includes(ext)) {
    throw new FileProblem(job.outPath, `unknown output type "${ext || '(none)'}"; use .png, .tif or .npy`);
  }
  const scene = loadScene(job.scenePath);
  const frame = simulateFrame(scene, { model: job.model, oversample: job.oversample, onProgress: job.onProgress });
  writeBytesAtomic(job.outPath, encodeFrame(frame, job.outPath));
  return frame;
}
