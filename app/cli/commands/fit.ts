import { parseArgs } from 'node:util';
import type { FitResult } from '../../../core/fit/result.ts';
import { runFit } from '../../services/fitService.ts';
import { progressPrinter, UsageError } from '../output.ts';
import { FIT_TUNING_OPTIONS, fitTuning, parseFitTerms } from '../fitOptions.ts';

export const FIT_USAGE = `Usage: shadowfront fit <frame files...> --setup <setup.json> [options]

Fit camera frames of the disc's shadow for the beam's low-order aberrations. Several frames of the same
setup are averaged; dark frames are averaged and subtracted. Formats: PNG, TIFF (8/16-bit), PGM/PNM, NumPy .npy.

Options:
  --setup <file>          bench setup (format "shadowfront-setup/1"), required
  --dark <file>           a dark frame (repeat for several)
  --terms <list>          ANSI Zernike indices to fit (default 3,4,5,7,8; optional 6, 9, 12)
  --also <setup>=<files>  another frame set of the same beam with its own setup (another camera
                          distance, or the disc turned); files separated by commas; repeatable
  --free-distance         free the camera distance (degenerate with defocus unless frames at two
                          distances are given)
  --free-disc <tolerance> free the disc radius within a tolerance, e.g. "5 um"
  --disc <name or id>     use the calibrated shape of this disc from the logbook's disc library
                          (see "shadowfront disc list"); the result records which calibration
  --disc-angle <angle>    how far the disc is turned from its calibrated position, e.g. "90 deg"
  --db <file>             the logbook holding the disc library (default: $SHADOWFRONT_DB, else the
                          user data folder)
  --source-size <length>  diameter of the source (fibre core, pinhole), e.g. "25 um", replacing the
                          setup's source.size; the model blurs each frame by S·L/G
  --free-source-size      fit the source size (a diverging or converging beam only)
  --binning <n|auto>      super-pixel size in camera pixels (default auto: about 1/5 of the ring period)
  --gain <counts/e>       camera gain for the shot-noise model (default 1)
  --read-noise <counts>   read noise per frame (default: estimated from the frames)
  --json                  print exactly one JSON object (format "shadowfront-result/1")
  -h, --help              show this help

Exit status: 0 fitted; 1 bad input; 2 bad usage; 3 the fit is not trustworthy (wrong minimum suspected).`;

export function formatResult(r: FitResult): string {
  const lines: string[] = [];
  const rho = r.zernike.radius_m * 1e3;
  lines.push(`terms fitted: ${r.zernike.terms.map((t) => `j=${t.j}`).join(', ')} — ${r.zernike.basis}, r = ${rho.toFixed(3)} mm`);
  lines.push('');
  lines.push('   j  term                        waves      ±1σ          nm      ±1σ');
  for (const t of r.zernike.terms) {
    lines.push(
      `  ${String(t.j).padStart(2)}  ${t.name.padEnd(24)} ${t.waves.toFixed(4).padStart(9)} ${t.sigmaWaves.toFixed(4).padStart(8)}  ${t.nm.toFixed(1).padStart(10)} ${t.sigmaNm.toFixed(1).padStart(8)}`,
    );
  }
  lines.push('');
  const diffLimit = 1 / 14;
  lines.push(
    `RMS wavefront error (without piston and tilt, fitted terms)  ${r.rmsWaves.toFixed(4)} ± ${r.sigmaRmsWaves.toFixed(4)} waves` +
      `  (${(r.rmsWaves * r.wavelength_m * 1e9).toFixed(1)} nm) — ${r.rmsWaves <= diffLimit ? 'within' : 'beyond'} λ/14 (Maréchal criterion)`,
  );
  lines.push(`peak-to-valley                                             ${r.pvWaves.toFixed(4)} waves`);
  lines.push(`Strehl ratio (Maréchal approximation)                      ${r.strehl.toFixed(3)} ± ${r.sigmaStrehl.toFixed(3)}`);
  if (r.residualCurvatureRadius_m !== null) {
    lines.push(
      `equivalent residual curvature radius                       ${r.residualCurvatureRadius_m.toFixed(2)} m (${r.residualCurvatureRadius_m > 0 ? 'diverging' : 'converging'} relative to the nominal)`,
    );
  }
  r.centers_m.forEach((c, i) => {
    lines.push(`pattern centre${r.centers_m.length > 1 ? ` (set ${i + 1})` : ''}                                  x ${(c[0] * 1e6).toFixed(1)} µm, y ${(c[1] * 1e6).toFixed(1)} µm from the frame centre`);
  });
  const st = r.settings as { distanceOffsetM?: number; sigmaDistanceOffsetM?: number; discRadiusOffsetM?: number; sigmaDiscRadiusOffsetM?: number };
  if (st.distanceOffsetM !== undefined) {
    lines.push(`camera distance offset (fitted)                            ${(st.distanceOffsetM * 1e3).toFixed(2)} ± ${((st.sigmaDistanceOffsetM ?? NaN) * 1e3).toFixed(2)} mm`);
  }
  if (st.discRadiusOffsetM !== undefined) {
    lines.push(`disc radius offset (fitted)                                ${(st.discRadiusOffsetM * 1e6).toFixed(2)} ± ${((st.sigmaDiscRadiusOffsetM ?? NaN) * 1e6).toFixed(2)} µm`);
  }
  if (r.disc) lines.push(`disc shape                                                 calibrated: disc${r.disc.id !== null ? ` #${r.disc.id}` : ''} "${r.disc.name}", calibrated ${r.disc.calibratedAt}`);
  if (r.source) {
    const blur = r.source.blurM.map((b) => `${(b * 1e6).toFixed(1)} µm`).join(', ');
    lines.push(
      `source size${r.source.fitted ? ' (fitted)' : ''}                                        ${(r.source.sizeM * 1e6).toFixed(2)}${r.source.sigmaSizeM !== null ? ` ± ${(r.source.sigmaSizeM * 1e6).toFixed(2)}` : ''} µm (blur S·L/G on the camera: ${blur})`,
    );
  }
  lines.push(`χ²/dof ${r.chi2PerDof.toFixed(3)} (${r.dof} dof), ${r.iterations} iterations, ${r.termination}, ${(r.elapsedMs / 1000).toFixed(2)} s`);
  r.regions.forEach((g, i) =>
    lines.push(`region${r.regions.length > 1 ? ` ${i + 1}` : ''}: circle of radius ${g.radiusPx.toFixed(1)} px around column ${g.centerPx[0].toFixed(1)}, row ${g.centerPx[1].toFixed(1)}, super-pixels of ${g.binning}×${g.binning}`),
  );
  if (r.warnings.length) {
    lines.push('');
    lines.push('warnings:');
    for (const w of r.warnings) lines.push(`  - ${w}`);
  }
  return lines.join('\n');
}

export async function fitCommand(argv: string[]): Promise<number> {
  const { values, positionals } = parseArgs({
    args: argv,
    allowPositionals: true,
    options: {
      setup: { type: 'string' },
      dark: { type: 'string', multiple: true, default: [] },
      terms: { type: 'string' },
      also: { type: 'string', multiple: true, default: [] },
      'free-distance': { type: 'boolean', default: false },
      'free-disc': { type: 'string' },
      disc: { type: 'string' },
      'disc-angle': { type: 'string' },
      db: { type: 'string' },
      'source-size': { type: 'string' },
      'free-source-size': { type: 'boolean', default: false },
      ...FIT_TUNING_OPTIONS,
      json: { type: 'boolean', default: false },
      help: { type: 'boolean', short: 'h', default: false },
    },
  });
  if (values.help) {
    process.stdout.write(`${FIT_USAGE}\n`);
    return 0;
  }
  if (positionals.length === 0) throw new UsageError('missing the frame files');
  if (!values.setup) throw new UsageError('missing --setup <setup.json>');
  const terms = values.terms ? parseFitTerms(values.terms) : undefined;
  const tuning = fitTuning(values);
  let discTolM: number | undefined;
  if (values['free-disc'] !== undefined) {
    const { parseLength } = await import('../../../core/units/parseQuantity.ts');
    try {
      discTolM = parseLength(values['free-disc']);
    } catch (e) {
      throw new UsageError(`--free-disc: ${(e as Error).message}`);
    }
  }
  let discAngleRad: number | undefined;
  let sourceSizeM: number | undefined;
  if (values['disc-angle'] !== undefined || values['source-size'] !== undefined) {
    const { parseAngle, parseLength } = await import('../../../core/units/parseQuantity.ts');
    try {
      if (values['disc-angle'] !== undefined) discAngleRad = parseAngle(values['disc-angle']);
    } catch (e) {
      throw new UsageError(`--disc-angle: ${(e as Error).message}`);
    }
    try {
      if (values['source-size'] !== undefined) sourceSizeM = parseLength(values['source-size']);
    } catch (e) {
      throw new UsageError(`--source-size: ${(e as Error).message}`);
    }
    if (sourceSizeM !== undefined && !(sourceSizeM >= 0)) throw new UsageError(`--source-size must be a length ≥ 0, not "${values['source-size']}"`);
  }
  if (discAngleRad !== undefined && values.disc === undefined) throw new UsageError('--disc-angle turns a calibrated disc shape: give --disc <name or id> too');
  const extraSets = (values.also as string[]).map((spec) => {
    const eq = spec.indexOf('=');
    if (eq <= 0) throw new UsageError(`--also must look like setup.json=frame1.png,frame2.png, not "${spec}"`);
    return { setupPath: spec.slice(0, eq), framePaths: spec.slice(eq + 1).split(',').filter(Boolean), discRotationRad: discAngleRad };
  });
  const bar = values.json ? () => {} : progressPrinter('fitting');
  const result = await runFit({
    framePaths: positionals,
    darkPaths: values.dark as string[],
    setupPath: values.setup,
    terms,
    extraSets,
    discRotationRad: discAngleRad,
    disc: values.disc,
    logbookPath: values.db,
    sourceSizeM,
    options: {
      ...tuning,
      freeDistance: values['free-distance'],
      freeSourceSize: values['free-source-size'],
      freeDiscRadius: discTolM !== undefined,
      discRadiusToleranceM: discTolM,
    },
    onProgress: (f) => bar(f),
  });
  if (values.json) {
    process.stdout.write(`${JSON.stringify(result)}\n`);
    return result.trusted ? 0 : 3;
  }
  if (!result.trusted) {
    process.stdout.write('The fit did not reach a trustworthy minimum, so no coefficients are reported.\n');
    for (const w of result.warnings) process.stdout.write(`  - ${w}\n`);
    process.stdout.write('Check the setup (distance, disc size, wavelength, orientation) and the frame, or give --terms fewer terms.\n');
    return 3;
  }
  process.stdout.write(`${formatResult(result)}\n`);
  return 0;
}
