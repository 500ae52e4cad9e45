/**
 * Makes resources/examples/beam-synthetic-binned.png, a SYNTHETIC beam frame (no camera was involved):
 * an elliptical Gaussian beam written as 12-bit counts with shot and read noise by Shadowfront's own
 * camera model (core/camera/noise.ts), for the bench of resources/examples/setup-beam-example.json.
 *
 *   npx tsx test/beam/make-example-beam-frame.ts            write the file
 * test/beam/example.test.ts checks that the committed file is exactly what this script makes.
 */
import { fileURLToPath } from 'node:url';
import { writeFileSync } from 'node:fs';
import { applyCameraNoise } from '../../core/camera/noise.ts';
import { encodePng16 } from '../../core/imageio/png.ts';

/** The beam in the example frame, at the camera plane (lab frame, relative to the frame centre). */
export const EXAMPLE_BEAM = {
  widthPx: 320,
  heightPx: 256,
  pixelPitchM: 22e-6,
  /** 1/e² radii along the beam's own axes, m. */
  radiusUM: 0.9e-3,
  radiusVM: 0.65e-3,
  /** Angle of the u axis from +x, counter-clockwise. */
  angleRad: (15 * Math.PI) / 180,
  centerM: [0.1e-3, -0.05e-3] as [number, number],
  noise: { peakCounts: 3000, readNoise: 3, offset: 20, seed: 20240611 },
  camera: { bitDepth: 12, saturationCounts: 4095 },
};

export function makeExampleBeamFrame(): Uint8Array {
  const b = EXAMPLE_BEAM;
  const I = new Float64Array(b.widthPx * b.heightPx);
  const c = Math.cos(b.angleRad);
  const s = Math.sin(b.angleRad);
  for (let r = 0; r < b.heightPx; r++) {
    for (let col = 0; col < b.widthPx; col++) {
      const x = (col - (b.widthPx - 1) / 2) * b.pixelPitchM - b.centerM[0];
      const y = ((b.heightPx - 1) / 2 - r) * b.pixelPitchM - b.centerM[1];
      const u = x * c + y * s;
      const v = -x * s + y * c;
      I[r * b.widthPx + col] = Math.exp((-2 * u * u) / b.radiusUM ** 2 - (2 * v * v) / b.radiusVM ** 2);
    }
  }
  const counts = applyCameraNoise(I, b.noise, b.camera);
  return encodePng16(counts, b.widthPx, b.heightPx, {
    text: {
      Software: 'Shadowfront (test/beam/make-example-beam-frame.ts)',
      Comment: 'SYNTHETIC beam frame made by Shadowfront, not a camera recording: elliptical Gaussian beam, 12-bit counts with simulated shot and read noise',
    },
  });
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const out = fileURLToPath(new URL('../../resources/examples/beam-synthetic-binned.png', import.meta.url));
  writeFileSync(out, makeExampleBeamFrame());
  process.stdout.write(`wrote ${out}\n`);
}
