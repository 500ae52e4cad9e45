/**
 * Speed of the simulators: `npm run bench`. Prints median wall times; no assertions.
 * Scenes: the HeNe example bench (632.8 nm, w = 4 mm, 3 mm disc at 0.8 m) with 5 aberration terms,
 * framed two ways: 5.5 µm pixels (the central spot and rings) and a frame that holds the whole shadow
 * with its edge.
 */
import { fastField } from '../../core/optics/fast/rimModel.ts';
import { referenceField } from '../../core/optics/reference/index.ts';
import { pixelSampleAxes } from '../../core/camera/pixels.ts';
import type { BenchSetup, ZernikeTerm } from '../../core/setup/types.ts';
import { cpus, loadavg } from 'node:os';

const setup: BenchSetup = {
  wavelengthM: 632.8e-9,
  beam: { radiusM: 4e-3, centerM: [0, 0], curvatureRadiusM: Infinity },
  disc: { radiusM: 1.5e-3, ellipticity: 0, ellipseAngleRad: 0, edgeHarmonics: [] },
  camera: { distanceM: 0.8, pixelPitchM: 5.5e-6, bitDepth: 12, saturationCounts: 4095, orientation: { flipX: false, flipY: false, rotateDeg: 0 } },
  zernikeRadiusM: 4e-3,
  source: { sizeM: 0 },
};
const aberrations: ZernikeTerm[] = [
  { j: 3, waves: 0.03 },
  { j: 4, waves: 0.05 },
  { j: 5, waves: 0.1 },
  { j: 7, waves: -0.04 },
  { j: 8, waves: 0.05 },
];

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

/** The fastest of the last `time` call's runs, ms. */
let lastFastestMs = NaN;

function time(fn: () => unknown, repeats: number, warmups = 1): number {
  for (let i = 0; i < warmups; i++) fn(); // warm-up (JIT), not counted
  const t: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const t0 = performance.now();
    fn();
    t.push(performance.now() - t0);
  }
  lastFastestMs = Math.min(...t);
  return median(t);
}

/** "1.09 s, fastest 0.98 s": this machine's speed drifts by ±30 % over minutes, which the fastest run shows. */
const fitTime = (ms: number) => `fit ${(ms / 1000).toFixed(2)} s, fastest ${(lastFastestMs / 1000).toFixed(2)} s`;

const rows: string[][] = [];
function row(...cells: string[]): void {
  rows.push(cells);
  process.stdout.write(`${cells.join('  |  ')}\n`);
}

process.stdout.write(`Shadowfront bench — node ${process.version}, ${cpus().length} cores (${cpus()[0]?.model ?? '?'})\n`);
process.stdout.write('Times are medians of repeated runs after one warm-up run, in ms; points are pixel centres unless noted.\n\n');

// `npm run bench -- --fit-only` skips the simulators and times the fit alone.
const fitOnly = process.argv.includes('--fit-only');
for (const size of fitOnly ? [] : [256, 512]) {
  for (const [label, pitch] of [
    ['spot and rings, 5.5 µm px', 5.5e-6],
    ['whole shadow with edge', (1.3 * 2 * setup.disc.radiusM) / size],
  ] as const) {
    const frame = { widthPx: size, heightPx: size, centerM: [0, 0] as [number, number] };
    const ax = pixelSampleAxes(frame, pitch, 1);
    const probe = fastField(setup, aberrations, ax.xsM, ax.ysM);
    const reps = size === 256 ? 7 : 3;
    const tFast = time(() => fastField(setup, aberrations, ax.xsM, ax.ysM), reps);
    row(`${size}×${size}`, label, `fast ${tFast.toFixed(0)} ms (${probe.nPhi} rim samples)`);
    const ax2 = pixelSampleAxes(frame, pitch, 2);
    const tFast2 = time(() => fastField(setup, aberrations, ax2.xsM, ax2.ysM), size === 256 ? 3 : 1);
    row(`${size}×${size}`, label, `fast with 2×2 pixel integration ${tFast2.toFixed(0)} ms`);
    for (const nTerms of [5, 8]) {
      const terms = [3, 4, 5, 7, 8, 6, 9, 12].slice(0, nTerms);
      const tJac = time(() => fastField(setup, aberrations, ax.xsM, ax.ysM, { derivativeTerms: terms, centerDerivatives: true }), size === 256 ? 3 : 1);
      row(`${size}×${size}`, label, `fast + Jacobian (${nTerms} Zernike terms + centre x, y) ${tJac.toFixed(0)} ms`);
    }
    const tRef = time(() => referenceField(setup, aberrations, ax.xsM, ax.ysM), size === 256 ? 3 : 1);
    row(`${size}×${size}`, label, `reference ${tRef.toFixed(0)} ms`);
  }
}

// --- the fit (5 terms), frames made with the fast model plus noise (speed only; accuracy: fit-accuracy.ts)
import { simulateFrame } from '../../core/optics/simulate.ts';
import { prepareFrames } from '../../core/frames/prepare.ts';
import { measureBeam } from '../../core/fit/measure.ts';
import type { Scene } from '../../core/setup/types.ts';
import { localFieldEngine } from '../../core/optics/fieldEngine.ts';
import { FieldThreads, helperCount } from '../../app/services/threads/fieldThreads.ts';

// Warm-up fits before each timed row: the first fits in a process (and in a new helper thread) run 1.5–2×
// slower while the JIT compiles, which one warm-up did not cover for the first row.
const FIT_WARMUPS = 3;
// The shells' fits share each model grid with helper threads (app/services/threads/fieldThreads.ts).
const helpers = helperCount();
const threads = helpers > 0 ? new FieldThreads({ helpers }) : null;
if (threads) await threads.whenReady();
process.stdout.write(
  `\nFit of one frame, 5 terms (median of 5 after ${FIT_WARMUPS} warm-up fits), as the shells run it: ${helpers + 1} thread(s)` +
    `${threads ? ' (the calling thread and ' + helpers + ' helper)' : ''}; "1 thread" rows: all in the calling thread:\n`,
);
for (const size of [256, 512]) {
  for (const [label, pitch] of [
    ['spot and rings, 5.5 µm px', 5.5e-6],
    ['whole shadow with edge', (1.4 * 2 * setup.disc.radiusM) / size],
  ] as const) {
    const scene: Scene = {
      ...setup,
      camera: { ...setup.camera, pixelPitchM: pitch },
      aberrations,
      frame: { widthPx: size, heightPx: size, centerM: [30e-6, -20e-6] },
      noise: { peakCounts: 3000, readNoise: 3, offset: 20, seed: 5 },
    };
    const sim = simulateFrame(scene, { model: 'fast' });
    const prepared = prepareFrames([{ data: Float64Array.from(sim.counts), widthPx: size, heightPx: size, bitDepth: 16, warnings: [], format: 'png' }], [], scene.camera, ['bench.png']);
    let binning = 0;
    const fieldEngine = threads ?? localFieldEngine;
    const t = time(() => {
      const r = measureBeam([{ setup: scene, prepared }], { gainCountsPerElectron: 1, readNoiseCounts: 3, fieldEngine });
      binning = r.regions[0].binning;
    }, 5, FIT_WARMUPS);
    row(`${size}×${size}`, label, `${fitTime(t)} (super-pixels ${binning}×${binning})`);
    if (threads) {
      const t1 = time(() => void measureBeam([{ setup: scene, prepared }], { gainCountsPerElectron: 1, readNoiseCounts: 3 }), 5, FIT_WARMUPS);
      row(`${size}×${size}`, `${label}, 1 thread`, fitTime(t1));
    }
    if (label.startsWith('whole')) {
      // the same fit without the reference-model polish (core/fit/referencePolish.ts), to show its cost
      const t2 = time(() => void measureBeam([{ setup: scene, prepared }], { gainCountsPerElectron: 1, readNoiseCounts: 3, referencePolish: 'never', fieldEngine }), 5, FIT_WARMUPS);
      row(`${size}×${size}`, `${label}, no polish`, fitTime(t2));
    }
  }
}
await threads?.close();
process.stdout.write(`\nload average at the end: ${loadavg().map((v) => v.toFixed(2)).join(' ')}\n`);
