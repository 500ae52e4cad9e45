/**
 * `shadowfront disc`: calibrate a disc's shape and keep it in the logbook's disc library. A thin shell over
 * app/services/discService.ts.
 */
import { parseArgs } from 'node:util';
import { SAFETY_POINTS, SAFETY_TITLE } from '../../../core/safety.ts';
import type { DiscCalibration } from '../../../core/fit/disc/calibrate.ts';
import type { DiscProfile } from '../../../core/fit/disc/profile.ts';
import { progressPrinter, UsageError } from '../output.ts';
import { FIT_TUNING_OPTIONS, fitTuning, parseFitTerms } from '../fitOptions.ts';

export const DISC_USAGE = `Usage: shadowfront disc calibrate <frames> <frames> ... --angles <list> --setup <setup.json> [options]
       shadowfront disc list [--json] [--db <file>]

calibrate   Measure the disc's shape — ellipticity and axis, optionally its edge harmonics of orders 3
            and 4 — with uncertainties, from frames taken with the disc turned in its holder to several
            angles. The beam's aberrations are fitted at the same time: the disc's shape turns with the
            disc, the beam's aberrations do not, which tells them apart (0° and 90° at least). With
            --beam-known the beam is taken as known and only the disc is fitted (one angle is enough).
            Give one argument per angle, in the order of --angles; frames of one angle joined by commas
            (a0.png,b0.png) are averaged.
list        The discs of the logbook's disc library and their profiles.

Options of calibrate:
  --angles <list>          the disc's rotation for each argument, counter-clockwise seen from the laser
                           looking downstream: degrees ("0,90") or with a unit ("0 deg,1.5708 rad")
  --setup <file>           bench setup ("shadowfront-setup/1"), required
  --dark <file>            a dark frame, used for every angle (repeat for several)
  --beam-known <what>      reference-beam calibration: "ideal" (a beam without aberrations), or a fit
                           result ("shadowfront-result/1") whose coefficients are taken as known
  --harmonics              also fit the edge harmonics of orders 3 and 4
  --terms <list>           beam terms fitted with the disc (default 3,4,5,7,8; none with --beam-known)
  --name <disc name>       store the profile in the disc library: a new disc of that name, or an
                           existing disc (name or id) that has no calibration yet
  --replace                replace the existing calibration of that disc
  --notes <text>           notes for a new disc
  --db <file>              the logbook (default: $SHADOWFRONT_DB, else the user data folder)
  --binning <n|auto>       super-pixel size in camera pixels (default auto)
  --gain <counts/e>        camera gain for the shot-noise model (default 1)
  --read-noise <counts>    read noise per frame (default: estimated from the frames)
  --json                   print exactly one JSON object
  -h, --help               show this help

A later fit uses the stored shape with "shadowfront fit ... --disc <name or id>".
Exit status: 0 calibrated (and stored); 1 bad input; 2 bad usage; 3 not trustworthy (the disc's shape
could not be told apart from the beam, or the fit is suspect): nothing is stored.`;

function safetyLines(): string[] {
  const pick = [SAFETY_POINTS.find((p) => /reflects/i.test(p)), SAFETY_POINTS.find((p) => /officer/i.test(p))].filter((p): p is string => !!p);
  return pick.map((p) => `${SAFETY_TITLE}: ${p}`);
}

const deg = (rad: number) => (rad * 180) / Math.PI;

/** "0,90" (degrees) or "0 deg,1.5708 rad". */
export async function parseAngles(text: string): Promise<number[]> {
  const { parseAngle } = await import('../../../core/units/parseQuantity.ts');
  const parts = text.split(',').map((s) => s.trim());
  if (parts.length === 0 || parts.some((p) => p === '')) throw new UsageError(`--angles must list one angle per frame argument, e.g. 0,90, not "${text}"`);
  return parts.map((p) => {
    if (/^[-+\u2212]?\d+(\.\d+)?(e[-+]?\d+)?$/i.test(p)) return (Number(p.replace('\u2212', '-')) * Math.PI) / 180;
    try {
      return parseAngle(p);
    } catch (e) {
      throw new UsageError(`--angles: "${p}" is not an angle: ${(e as Error).message}`);
    }
  });
}

function fmt(v: number, digits: number): string {
  return Number.isFinite(v) ? v.toFixed(digits) : 'n/a';
}

export function formatProfile(p: DiscProfile): string[] {
  const a = p.radiusM;
  const lines = [
    `ellipticity e        ${fmt(p.ellipticity, 6)} ± ${fmt(p.sigmaEllipticity, 6)}   (e·a = ${fmt(p.ellipticity * a * 1e6, 3)} ± ${fmt(p.sigmaEllipticity * a * 1e6, 3)} µm, a = ${(a * 1e3).toFixed(4)} mm)`,
    `axis                 ${fmt(deg(p.axisRad), 2)}° ± ${fmt(deg(p.sigmaAxisRad), 2)}°   (disc's own frame: at rotation 0, counter-clockwise from +x)`,
  ];
  for (const h of p.harmonics) {
    lines.push(`edge harmonic n = ${h.order}   amplitude ${fmt(h.amplitudeM * 1e6, 3)} ± ${fmt(h.sigmaAmplitudeM * 1e6, 3)} µm, phase ${fmt(deg(h.phaseRad), 1)}° ± ${fmt(deg(h.sigmaPhaseRad), 1)}°`);
  }
  return lines;
}

export function formatCalibration(c: DiscCalibration): string {
  const p = c.profile;
  const lines: string[] = [];
  lines.push(
    `disc calibration (${p.method === 'rotation' ? 'disc turned, beam fitted with it' : `reference beam (${p.beam})`}), disc angles ${p.anglesRad.map((r) => `${fmt(deg(r), 1)}°`).join(', ')}`,
  );
  lines.push('');
  lines.push(...formatProfile(p).map((l) => `  ${l}`));
  lines.push('');
  if (p.beamTerms.length) {
    lines.push(`beam (${p.beam === 'fitted' ? 'fitted with the disc' : 'taken as known'}), waves over r = ${(c.fit.zernike.radius_m * 1e3).toFixed(3)} mm:`);
    for (const t of p.beamTerms) lines.push(`  j=${String(t.j).padEnd(3)} ${t.waves.toFixed(5).padStart(9)}${t.sigmaWaves === null ? '' : ` ± ${fmt(t.sigmaWaves, 5)}`}`);
  } else lines.push('beam: declared ideal (no aberrations)');
  for (const s of p.separation) {
    if (s.beamTerms.length === 0) continue;
    lines.push(
      `order ${s.order} told apart from beam terms ${s.beamTerms.map((j) => `j=${j}`).join(', ')}: angle spread ${s.angleSpread.toFixed(2)} (1 = best), largest |correlation| ${fmt(s.maxAbsCorrelation, 3)}`,
    );
  }
  lines.push(`χ²/dof ${c.fit.chi2PerDof.toFixed(3)} (${c.fit.dof} dof), ${(c.fit.elapsedMs / 1000).toFixed(1)} s — ${c.trusted ? 'trusted' : c.degenerate ? 'NOT trusted: degenerate' : 'NOT trusted'}`);
  if (c.warnings.length) {
    lines.push('');
    lines.push('warnings:');
    for (const w of c.warnings) lines.push(`  - ${w}`);
  }
  return lines.join('\n');
}

async function calibrate(argv: string[]): Promise<number> {
  const { values, positionals } = parseArgs({
    args: argv,
    allowPositionals: true,
    options: {
      angles: { type: 'string' },
      setup: { type: 'string' },
      dark: { type: 'string', multiple: true, default: [] },
      'beam-known': { type: 'string' },
      harmonics: { type: 'boolean', default: false },
      terms: { type: 'string' },
      name: { type: 'string' },
      replace: { type: 'boolean', default: false },
      notes: { type: 'string' },
      db: { type: 'string' },
      ...FIT_TUNING_OPTIONS,
      json: { type: 'boolean', default: false },
      help: { type: 'boolean', short: 'h', default: false },
    },
  });
  if (values.help) {
    process.stdout.write(`${DISC_USAGE}\n`);
    return 0;
  }
  if (positionals.length === 0) throw new UsageError('missing the frame files (one argument per disc angle)');
  if (!values.setup) throw new UsageError('missing --setup <setup.json>');
  if (!values.angles) throw new UsageError('missing --angles, e.g. --angles 0,90 (one angle per frame argument)');
  const angles = await parseAngles(values.angles);
  if (angles.length !== positionals.length) {
    throw new UsageError(`--angles gives ${angles.length} angle${angles.length === 1 ? '' : 's'} for ${positionals.length} frame argument${positionals.length === 1 ? '' : 's'}: give one angle per argument`);
  }
  const known = values['beam-known'];
  if (!known && new Set(angles.map((a) => Math.round(deg(a) * 1e3))).size < 2) {
    process.stderr.write('note: all frames have the disc at one angle: the calibration will report that the disc shape and the beam astigmatism cannot be told apart (give two angles, e.g. 0,90, or --beam-known)\n');
  }
  const terms = values.terms ? parseFitTerms(values.terms) : undefined;
  const tuning = fitTuning(values);
  if (values.replace && !values.name) throw new UsageError('--replace needs --name <disc name or id>');
  const { runDiscCalibration, saveDiscProfile, checkDiscProfileTarget } = await import('../../services/discService.ts');
  // Refuse an existing calibration before the long fit, not after it.
  if (values.name) await checkDiscProfileTarget(values.db, values.name, values.replace);
  const bar = values.json ? () => {} : progressPrinter('calibrating');
  const calibration = runDiscCalibration({
    setupPath: values.setup,
    sets: positionals.map((arg, i) => ({ angleRad: angles[i], framePaths: arg.split(',').filter(Boolean), darkPaths: values.dark as string[] })),
    beam: known === undefined ? 'fit' : known === 'ideal' ? 'ideal' : { resultPath: known },
    orders: values.harmonics ? [2, 3, 4] : [2],
    terms,
    options: tuning,
    onProgress: (f) => bar(f),
  });
  let stored: { id: number; name: string; created: boolean; replaced: boolean } | null = null;
  if (values.name && calibration.trusted) {
    const s = await saveDiscProfile(values.db, values.name, calibration.profile, { replace: values.replace, notes: values.notes });
    stored = { id: s.disc.id, name: s.disc.name, created: s.created, replaced: s.replaced };
  }
  if (values.json) {
    process.stdout.write(`${JSON.stringify({ safety: safetyLines(), trusted: calibration.trusted, degenerate: calibration.degenerate, stored, profile: calibration.profile, fit: calibration.fit })}\n`);
    return calibration.trusted ? 0 : 3;
  }
  process.stdout.write(`${safetyLines().join('\n')}\n\n${formatCalibration(calibration)}\n`);
  if (stored) process.stdout.write(`\n${stored.created ? 'stored as new disc' : stored.replaced ? 'replaced the calibration of disc' : 'stored the calibration of disc'} #${stored.id} "${stored.name}"\n`);
  else if (values.name) process.stdout.write('\nnot stored: the calibration is not trustworthy\n');
  return calibration.trusted ? 0 : 3;
}

async function list(argv: string[]): Promise<number> {
  const { values, positionals } = parseArgs({
    args: argv,
    allowPositionals: true,
    options: { db: { type: 'string' }, json: { type: 'boolean', default: false }, help: { type: 'boolean', short: 'h', default: false } },
  });
  if (values.help) {
    process.stdout.write(`${DISC_USAGE}\n`);
    return 0;
  }
  if (positionals.length) throw new UsageError(`"disc list" takes no arguments (got ${positionals.join(' ')})`);
  const { listDiscProfiles } = await import('../../services/discService.ts');
  const discs = await listDiscProfiles(values.db);
  if (values.json) {
    process.stdout.write(`${JSON.stringify(discs)}\n`);
    return 0;
  }
  if (!discs.length) {
    process.stdout.write('No discs in the library yet ("shadowfront disc calibrate … --name <disc>" adds one).\n');
    return 0;
  }
  const { textTable } = await import('../../../core/logbook/format.ts');
  const rows = discs.map((d) => {
    const p = d.profile;
    return [
      String(d.id),
      d.name,
      `${(d.nominalDiameterM * 1e3).toFixed(3)} mm`,
      p ? `${fmt(p.ellipticity * p.radiusM * 1e6, 2)} ± ${fmt(p.sigmaEllipticity * p.radiusM * 1e6, 2)} µm` : '—',
      p ? `${fmt(deg(p.axisRad), 1)}° ± ${fmt(deg(p.sigmaAxisRad), 1)}°` : '—',
      p ? (p.harmonics.length ? p.harmonics.map((h) => `n=${h.order} ${fmt(h.amplitudeM * 1e6, 2)} µm`).join(', ') : '—') : '—',
      p ? `${p.method}${p.trusted ? '' : ' (not trusted)'}` : d.problem ? 'not a disc profile' : 'none',
      p ? p.calibratedAt : '',
    ];
  });
  process.stdout.write(`${textTable(['id', 'name', 'diameter', 'e·a', 'axis', 'harmonics', 'calibration', 'calibrated at'], rows)}\n`);
  return 0;
}

export async function discCommand(argv: string[]): Promise<number> {
  const [action, ...rest] = argv;
  if (!action || action === '-h' || action === '--help') {
    process.stdout.write(`${DISC_USAGE}\n`);
    return action ? 0 : 2;
  }
  if (action === 'calibrate') return calibrate(rest);
  if (action === 'list') return list(rest);
  throw new UsageError(`unknown "disc" action "${action}"; use calibrate or list`);
}
