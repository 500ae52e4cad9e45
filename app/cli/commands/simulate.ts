import { parseArgs } from 'node:util';
import { runSimulate } from '../../services/simulateService.ts';
import { benchFigures } from '../../../core/optics/geometry.ts';
import { progressPrinter, UsageError } from '../output.ts';

export const SIMULATE_USAGE = `Usage: shadowfront simulate <scene.json> --out <file> [options]

Simulate a camera frame of the disc's shadow from a scene file (format "shadowfront-scene/1";
see core/setup/README.md and the examples in resources/examples/).

The output type follows the file name:
  .png   16-bit grayscale camera counts (noisy when the scene has "noise", else scaled to full scale)
  .tif   the same counts as an uncompressed 16-bit TIFF
  .npy   float64 intensity relative to the incident peak at the disc (NumPy format, first row on top)

Options:
  --out <file>            where to write the frame (required)
  --model fast|reference  diffraction model (default: fast); reference is slower and independent
  --oversample <1-4>      sub-samples per pixel and axis for pixel integration (default: 2)
  --json                  print a JSON summary instead of text
  -h, --help              show this help`;

export function simulateCommand(argv: string[]): number {
  const { values, positionals } = parseArgs({
    args: argv,
    allowPositionals: true,
    options: {
      out: { type: 'string', short: 'o' },
      model: { type: 'string', default: 'fast' },
      oversample: { type: 'string', default: '2' },
      json: { type: 'boolean', default: false },
      help: { type: 'boolean', short: 'h', default: false },
    },
  });
  if (values.help) {
    process.stdout.write(`${SIMULATE_USAGE}\n`);
    return 0;
  }
  if (positionals.length !== 1) throw new UsageError(positionals.length ? `expected one scene file, got ${positionals.length}` : 'missing the scene file');
  if (!values.out) throw new UsageError('missing --out <file>');
  const model = values.model;
  if (model !== 'fast' && model !== 'reference') throw new UsageError(`--model must be "fast" or "reference", not "${model}"`);
  const oversample = Number(values.oversample);
  if (!Number.isInteger(oversample) || oversample < 1 || oversample > 4) throw new UsageError(`--oversample must be 1, 2, 3 or 4, not "${values.oversample}"`);
  const t0 = performance.now();
  const frame = runSimulate({ scenePath: positionals[0], outPath: values.out, model, oversample, onProgress: progressPrinter(`simulating (${model})`) });
  const ms = performance.now() - t0;
  let peak = 0;
  for (const v of frame.intensity) peak = Math.max(peak, v);
  if (values.json) {
    process.stdout.write(
      `${JSON.stringify({ out: values.out, model, widthPx: frame.widthPx, heightPx: frame.heightPx, noisy: frame.noisy, peakIntensity: peak, rimSamples: frame.rimSamples, elapsedMs: Math.round(ms), warnings: frame.warnings })}\n`,
    );
  } else {
    process.stdout.write(
      `wrote ${values.out}: ${frame.widthPx}×${frame.heightPx} px, ${model} model${frame.rimSamples ? ` (${frame.rimSamples} rim samples)` : ''}, ` +
        `${frame.noisy ? 'with camera noise' : 'noiseless, scaled to full scale'}, peak intensity ${peak.toFixed(4)} of the incident peak, ${ms.toFixed(0)} ms\n`,
    );
    for (const w of frame.warnings) process.stdout.write(`warning: ${w}\n`);
  }
  void benchFigures;
  return 0;
}
