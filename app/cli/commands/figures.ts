import { parseArgs } from 'node:util';
import { parseSetup } from '../../../core/setup/parseSetup.ts';
import { benchFigures, type BenchFigures } from '../../../core/optics/geometry.ts';
import type { BenchSetup } from '../../../core/setup/types.ts';
import { readJson } from '../../services/files.ts';
import { UsageError } from '../output.ts';

export const FIGURES_USAGE = `Usage: shadowfront figures <setup.json> [--json]

Print the derived figures of a bench setup (a setup or scene file): effective distance, magnification,
Fresnel number, Fresnel-zone width at the rim and the rim tolerance, spot size and shadow size.

Options:
  --json       print one JSON object
  -h, --help   show this help`;

export function formatFigures(setup: BenchSetup, f: BenchFigures): string {
  const mm = (m: number) => `${(m * 1e3).toFixed(3)} mm`;
  const um = (m: number) => `${(m * 1e6).toFixed(1)} µm`;
  const px = (m: number) => `${(m / setup.camera.pixelPitchM).toFixed(0)} px`;
  return [
    `effective distance L'         ${mm(f.effectiveDistanceM)}`,
    `magnification M = L/L'        ${f.magnification.toFixed(4)}`,
    `Fresnel number a²/(λL')       ${f.fresnelNumber.toFixed(2)}`,
    `Fresnel zone at the rim Δr    ${um(f.fresnelZoneWidthM)}`,
    `rim tolerance (10 % of Δr)    ${um(f.rimToleranceM)}   (rule of thumb: edge roughness and dirt below this)`,
    `first dark ring radius        ${um(f.firstDarkRingRadiusM)}   (spot diameter ${f.firstDarkRingDiameterPx.toFixed(1)} px)`,
    `shadow diameter on camera     ${mm(f.shadowDiameterM)}   (${px(f.shadowDiameterM)})`,
    `finite-source blur S·L/G      ${f.sourceBlurM > 0 ? um(f.sourceBlurM) : 'none (point source)'}`,
  ].join('\n');
}

export function figuresCommand(argv: string[]): number {
  const { values, positionals } = parseArgs({
    args: argv,
    allowPositionals: true,
    options: { json: { type: 'boolean', default: false }, help: { type: 'boolean', short: 'h', default: false } },
  });
  if (values.help) {
    process.stdout.write(`${FIGURES_USAGE}\n`);
    return 0;
  }
  if (positionals.length !== 1) throw new UsageError('expected one setup file');
  const json = readJson(positionals[0]) as Record<string, unknown>;
  // A scene file is a setup plus simulation fields: read only the setup part.
  const setupPart = json && typeof json === 'object' && !Array.isArray(json) ? { ...json } : json;
  if (setupPart && typeof setupPart === 'object' && (setupPart as Record<string, unknown>).format === 'shadowfront-scene/1') {
    const s = setupPart as Record<string, unknown>;
    delete s.aberrations;
    delete s.frame;
    delete s.noise;
    s.format = 'shadowfront-setup/1';
  }
  const setup = parseSetup(setupPart, positionals[0]);
  const f = benchFigures(setup);
  if (values.json) process.stdout.write(`${JSON.stringify(f)}\n`);
  else process.stdout.write(`${formatFigures(setup, f)}\n`);
  return 0;
}
