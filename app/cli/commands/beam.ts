import { parseArgs } from 'node:util';
import { SAFETY_POINTS, SAFETY_TITLE } from '../../../core/safety.ts';
import { runBeam, mmText, type BeamReport } from '../../services/beamService.ts';
import { UsageError } from '../output.ts';

export const BEAM_USAGE = `Usage: shadowfront beam <frame> [<frame> ...] --setup <setup.json> [options]

Measure the laser beam itself from a beam frame (the beam recorded on the camera with the disc
removed): centroid and second-moment (D4σ) widths along the principal axes, azimuth and ellipticity
per ISO 11146-1, with the iterative integration area of three times the widths and the background
taken from outside it (ISO/TR 11146-3). Prints the beam.radius and beam.center the setup file should
hold. Several frames are averaged. PNG, TIFF, PGM and .npy files are read.

Options:
  --setup <file>          bench setup (or scene) file: pixel pitch, bit depth, orientation, distances
  --dark <file>           dark frame (laser blocked, same exposure); repeat for several
  --plane camera|disc     where the frame was recorded (default: camera, i.e. the disc removed and the
                          camera where it measures the shadow); camera frames are transferred to the
                          disc plane by the nominal curvature
  --shadow <file>         a shadow frame from the same camera position: its pattern centre marks the
                          disc axis (otherwise the frame centre is taken to lie on the axis)
  --json                  print one JSON object
  -h, --help              show this help`;

function safetyLine(): string {
  const point = SAFETY_POINTS.find((p) => /attenuate/i.test(p)) ?? SAFETY_POINTS[0];
  return `${SAFETY_TITLE}: ${point}`;
}

const deg = (rad: number) => `${((rad * 180) / Math.PI).toFixed(2)}°`;

export function formatBeamReport(r: BeamReport): string {
  const m = r.moments;
  const p = r.pixelPitchM;
  const s = r.suggestion;
  const sign = (v: number) => (v >= 0 ? '+' : '−') + mmText(Math.abs(v));
  const lines = [
    `beam frame       ${r.frames.join(', ')} (${r.widthPx} × ${r.heightPx} px, ${(p * 1e6).toFixed(2)} µm pixels)${r.darks.length ? `, ${r.darks.length} dark frame${r.darks.length > 1 ? 's' : ''}` : ', no dark frames'}`,
    `background       ${m.backgroundCounts.toFixed(2)} counts (${m.backgroundMethod})`,
    `centroid         column ${m.centroidPx[0].toFixed(2)}, row ${m.centroidPx[1].toFixed(2)}: x ${sign(m.centroidFromCenterPx[0] * p)}, y ${sign(m.centroidFromCenterPx[1] * p)} from the frame centre`,
    `D4σ widths       dσx = ${mmText(m.dSigmaXPx * p)}, dσy = ${mmText(m.dSigmaYPx * p)} (ISO 11146-1, principal axes; ${m.dSigmaXPx.toFixed(2)} px, ${m.dSigmaYPx.toFixed(2)} px)`,
    `azimuth          φ = ${deg(m.azimuthRad)} (from +x, counter-clockwise, to the axis of dσx); major axis at ${deg(m.majorAxisAngleRad)}`,
    `ellipticity      ${m.ellipticity.toFixed(3)}   generalised diameter dσ = ${mmText(m.generalisedDiameterPx * p)}`,
    `1/e² radius      ${mmText(s.measuredRadiusM)} at the frame (mean of the principal D4σ widths / 2)`,
    `integration      3 × the widths, ${m.iterations} iteration${m.iterations === 1 ? '' : 's'}${m.converged ? '' : ' (not settled)'}, ${m.integrationArea.insideFrame ? 'inside the frame' : 'NOT inside the frame'}`,
    `disc axis        ${r.axisSource}`,
    '',
    'suggested setup fields (disc plane):',
    `  "beam": { "radius": "${r.suggestedFields.radius}", "center": ["${r.suggestedFields.center[0]}", "${r.suggestedFields.center[1]}"] }`,
  ];
  for (const n of s.notes) lines.push(`note: ${n}`);
  for (const w of r.warnings) lines.push(`warning: ${w}`);
  return lines.join('\n');
}

export function beamCommand(argv: string[]): number {
  const { values, positionals } = parseArgs({
    args: argv,
    allowPositionals: true,
    options: {
      setup: { type: 'string' },
      dark: { type: 'string', multiple: true },
      plane: { type: 'string', default: 'camera' },
      shadow: { type: 'string' },
      json: { type: 'boolean', default: false },
      help: { type: 'boolean', short: 'h', default: false },
    },
  });
  if (values.help) {
    process.stdout.write(`${BEAM_USAGE}\n`);
    return 0;
  }
  if (positionals.length === 0) throw new UsageError('missing the beam frame file');
  if (!values.setup) throw new UsageError('missing --setup <setup.json>');
  const plane = values.plane;
  if (plane !== 'camera' && plane !== 'disc') throw new UsageError(`--plane must be "camera" or "disc", not "${plane}"`);
  const report = runBeam({ framePaths: positionals, setupPath: values.setup, darkPaths: values.dark ?? [], recordedAt: plane, shadowPath: values.shadow });
  if (values.json) {
    const { setup: _setup, ...rest } = report;
    void _setup;
    process.stdout.write(`${JSON.stringify({ safety: safetyLine(), ...rest })}\n`);
  } else {
    process.stdout.write(`${safetyLine()}\n\n${formatBeamReport(report)}\n`);
  }
  return 0;
}
