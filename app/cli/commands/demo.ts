import { parseArgs } from 'node:util';
import { fileURLToPath } from 'node:url';
import { join, resolve } from 'node:path';
import { safetyText } from '../../../core/safety.ts';
import { benchFigures } from '../../../core/optics/geometry.ts';
import { loadScene } from '../../services/simulateService.ts';
import { runFit } from '../../services/fitService.ts';
import { writeBytesAtomic } from '../../services/files.ts';
import { formatFigures } from './figures.ts';
import { formatResult } from './fit.ts';
import { progressPrinter } from '../output.ts';

export const DEMO_USAGE = `Usage: shadowfront demo [--out <folder>]

Run the bundled synthetic demonstration: print the bench figures of the demo bench, then measure the
beam from the bundled camera frame (resources/demo/frame-demo.png, simulated by Shadowfront's reference
model from resources/demo/scene-demo.json) and compare the result with the aberrations the frame was
made with. The result is written to the output folder as JSON (default: ./shadowfront-demo).

Options:
  --out <folder>   where to write the result
  -h, --help       show this help`;

const here = fileURLToPath(new URL('.', import.meta.url));
export const DEMO_SCENE = resolve(here, '../../../resources/demo/scene-demo.json');
export const DEMO_FRAME = resolve(here, '../../../resources/demo/frame-demo.png');

export async function demoCommand(argv: string[]): Promise<number> {
  const { values } = parseArgs({
    args: argv,
    options: { out: { type: 'string', default: 'shadowfront-demo' }, help: { type: 'boolean', short: 'h', default: false } },
  });
  if (values.help) {
    process.stdout.write(`${DEMO_USAGE}\n`);
    return 0;
  }
  process.stdout.write(`${safetyText()}\n\n`);
  process.stdout.write('Shadowfront demo — SYNTHETIC data made by Shadowfront\'s own simulator, not a real laser.\n');
  process.stdout.write(`setup: ${DEMO_SCENE}\nframe: ${DEMO_FRAME}\n\n`);
  const scene = loadScene(DEMO_SCENE);
  process.stdout.write(`${formatFigures(scene, benchFigures(scene))}\n\n`);
  const result = await runFit({
    framePaths: [DEMO_FRAME],
    darkPaths: [],
    setupPath: DEMO_SCENE,
    onProgress: progressPrinter('measuring the demo frame'),
  });
  process.stdout.write(`${formatResult(result)}\n\n`);
  process.stdout.write('The demo frame was made with these aberrations (waves):\n');
  for (const t of result.zernike.terms) {
    const truth = scene.aberrations.find((a) => a.j === t.j)?.waves ?? 0;
    process.stdout.write(
      `  j=${t.j} ${t.name.padEnd(22)} made with ${truth.toFixed(4).padStart(8)}, measured ${t.waves.toFixed(4).padStart(8)} ± ${t.sigmaWaves.toFixed(4)} (${((t.waves - truth) / t.sigmaWaves).toFixed(1)}σ)\n`,
    );
  }
  const outDir = resolve(values.out!);
  const path = join(outDir, 'demo-result.json');
  writeBytesAtomic(path, new TextEncoder().encode(`${JSON.stringify(result, null, 1)}\n`));
  process.stdout.write(`\nwrote ${path}\n`);
  process.stdout.write('Next: npx shadowfront fit <your frame.png> --setup <your setup.json>   (see npx shadowfront fit --help)\n');
  return 0;
}
