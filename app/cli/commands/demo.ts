import { parseArgs } from 'node:util';
import { fileURLToPath } from 'node:url';
import { join, resolve } from 'node:path';
import { safetyText } from '../../../core/safety.ts';
import { benchFigures } from '../../../core/optics/geometry.ts';
import { loadScene, encodeFrame } from '../../services/simulateService.ts';
import { simulateFrame } from '../../../core/optics/simulate.ts';
import { writeBytesAtomic } from '../../services/files.ts';
import { formatFigures } from './figures.ts';
import { progressPrinter } from '../output.ts';

export const DEMO_USAGE = `Usage: shadowfront demo [--out <folder>]

Run the bundled synthetic demonstration: print the bench figures of the demo bench, simulate its
shadow with the fast model and check it against the independent reference model, and write the frames
(PNG counts and NumPy intensity) to the output folder (default: ./shadowfront-demo).

Options:
  --out <folder>   where to write the demo frames
  -h, --help       show this help`;

const here = fileURLToPath(new URL('.', import.meta.url));
export const DEMO_SCENE = resolve(here, '../../../resources/demo/scene-demo.json');

export function demoCommand(argv: string[]): number {
  const { values } = parseArgs({
    args: argv,
    options: { out: { type: 'string', default: 'shadowfront-demo' }, help: { type: 'boolean', short: 'h', default: false } },
  });
  if (values.help) {
    process.stdout.write(`${DEMO_USAGE}\n`);
    return 0;
  }
  process.stdout.write(`${safetyText()}\n\n`);
  process.stdout.write('Shadowfront demo (synthetic data made by our own simulator).\n');
  process.stdout.write(`scene: ${DEMO_SCENE}\n\n`);
  const scene = loadScene(DEMO_SCENE);
  process.stdout.write(`${formatFigures(scene, benchFigures(scene))}\n\n`);
  process.stdout.write(`aberrations (waves over ${(scene.zernikeRadiusM * 1e3).toFixed(2)} mm): ${scene.aberrations.map((t) => `Z${t.j} ${t.waves}`).join(', ')}\n\n`);
  const outDir = resolve(values.out!);
  const t0 = performance.now();
  const fast = simulateFrame(scene, { model: 'fast', onProgress: progressPrinter('fast model     ') });
  const t1 = performance.now();
  const ref = simulateFrame(scene, { model: 'reference', onProgress: progressPrinter('reference model') });
  const t2 = performance.now();
  let peak = 0;
  let sq = 0;
  for (let i = 0; i < fast.intensity.length; i++) {
    peak = Math.max(peak, ref.intensity[i]);
    sq += (fast.intensity[i] - ref.intensity[i]) ** 2;
  }
  const rms = Math.sqrt(sq / fast.intensity.length);
  process.stdout.write(`fast model      ${(t1 - t0).toFixed(0)} ms (${fast.rimSamples} rim samples)\n`);
  process.stdout.write(`reference model ${(t2 - t1).toFixed(0)} ms\n`);
  process.stdout.write(`fast − reference: RMS ${(rms / peak).toExponential(2)} of the peak over the frame\n`);
  for (const [name, frame] of [['fast', fast], ['reference', ref]] as const) {
    for (const ext of ['png', 'npy']) {
      const path = join(outDir, `demo-${name}.${ext}`);
      writeBytesAtomic(path, encodeFrame(frame, path));
    }
  }
  for (const w of fast.warnings) process.stdout.write(`warning: ${w}\n`);
  process.stdout.write(`\nwrote demo-fast.png/.npy and demo-reference.png/.npy to ${outDir}\n`);
  process.stdout.write('Next: npx shadowfront simulate resources/examples/scene-diverging-green.json --out frame.png\n');
  return 0;
}
