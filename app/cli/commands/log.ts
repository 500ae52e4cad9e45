/**
 * `shadowfront log`: the beam-health logbook from the command line. A thin shell over
 * app/services/logbook (storage) and core/logbook (comparison, trends, export, reports).
 */
import { parseArgs } from 'node:util';
import { UsageError } from '../output.ts';
import { DB_HELP, DB_OPTION, HELP_OPTION, dbPath, parseCount, parseFraction01, parseId, parseTerms, parseWavesLimit, printWarnings, requireNoPositionals, withLogbook } from './log/common.ts';

export const LOG_USAGE = `Usage: shadowfront log <action> [options]

The beam-health logbook: every measurement of every laser, with its setup, raw frames and fit
results, kept in one SQLite file. Compare two measurements (before/after cleaning), follow the trend
of a laser with limits and control-chart flags, export and print reports.

Actions:
  asset add|set|list   the lasers and beam lines you track
  disc add|list        the discs (or balls) used, with their calibration data
  add                  log a measurement: a fit result (--result) or frames to fit (--frame)
  list                 list measurements (filter by --asset, --tag, --since, --until)
  show <id>            one measurement with every stored result
  compare <A> <B>      what changed from A to B, and whether it is more than noise
  trend --asset <name> the series of an asset, with limits and flags
  export               CSV or JSON of a selection
  report               a printable HTML report of a measurement, a comparison or a trend
  refit <id>           re-analyse a stored measurement with the current solver (keeps older results)
  delete <id> --yes    remove a measurement (its frames stay while other records use them)
  info                 where the logbook is, its size and schema version
  restore              put back the last good copy of a damaged logbook

Every action takes --db <file>; "shadowfront log <action> --help" shows its options.`;

const ASSET_USAGE = `Usage: shadowfront log asset add <name> [--wavelength <λ>] [--location <text>] [--notes <text>]
                                [--limit-rms <waves>] [--limit-strehl <value>]
       shadowfront log asset set <name> [same options]
       shadowfront log asset list [--json]

A laser or beam line. Limits are used by "log trend" unless it is given others; "none" clears one.
  --wavelength <λ>        nominal wavelength with its unit, e.g. "632.8 nm"
  --limit-rms <waves>     flag RMS wavefront error above this: waves (0.0714) or a fraction (lambda/14)
  --limit-strehl <value>  flag Strehl ratios below this floor, e.g. 0.8
${DB_HELP}`;

const DISC_USAGE = `Usage: shadowfront log disc add <name> --diameter <length> [--calibration <file.json>] [--notes <text>]
       shadowfront log disc list [--json]

A disc or ball used as the obstacle, with its nominal diameter and any calibration data (free JSON).
${DB_HELP}`;

const ADD_USAGE = `Usage: shadowfront log add --asset <name> --result <result.json> [--setup <setup.json>] [options]
       shadowfront log add --asset <name> --setup <setup.json> --frame <file> [--frame ...] [--dark <file> ...]

Log a measurement. With --result, a fit result as written by "shadowfront fit --json" is stored
(with the frames given, if any). Without it, the frames are fitted first.
  --asset <name>          the laser or beam line (see "log asset list")
  --result <file>         a fit result ("shadowfront-result/1")
  --setup <file>          the bench setup ("shadowfront-setup/1"); needed to re-analyse later
  --frame <file>          a camera frame (.png, .tif, .npy); repeat for several; kept for re-analysis
  --dark <file>           a dark frame; repeat for several
  --terms <list>          terms to fit when fitting frames, e.g. 3,4,5,7,8 (default: the fit's)
  --tag <tag>             e.g. weekly, before-cleaning, after-cleaning, after-service; repeatable
  --note <text>           free notes
  --who <name>            who measured
  --when <time>           ISO date or time, e.g. 2025-03-04T09:30 (local time; default: now)
  --disc <name>           the disc used (see "log disc list")
  --json                  print the stored record as JSON
${DB_HELP}`;

const LIST_USAGE = `Usage: shadowfront log list [--asset <name>] [--tag <tag> ...] [--since <time>] [--until <time>] [--json]

Measurements, oldest first, with the current result of each.
${DB_HELP}`;

const SHOW_USAGE = `Usage: shadowfront log show <id> [--json]

One measurement: details, setup, frames and every result (older analyses included).
${DB_HELP}`;

const COMPARE_USAGE = `Usage: shadowfront log compare <A> <B> [--json] [--result-a <id>] [--result-b <id>]

Compare measurement B with measurement A (Δ = B − A), e.g. before and after cleaning: per coefficient,
RMS and Strehl, the difference, its combined 1σ, z = Δ/σ and a verdict: improved, worse, or no
significant change (|z| < 2). Uses each measurement's current result unless --result-a/-b pick one.
  --json                  machine-readable output
${DB_HELP}`;

const TREND_USAGE = `Usage: shadowfront log trend --asset <name> [--limit-rms <waves>] [--limit-strehl <value>] [--baseline <n>]
                          [--since <time>] [--until <time>] [--tag <tag> ...] [--json]

Every coefficient, RMS and Strehl over time with their 1σ, flagged where they break a user limit,
the control limits of a Shewhart individuals chart (centre ± 3·MR̄/1.128 from the baseline) or a run
rule (Nelson tests 1, 2, 3, 5, 6; a drift is six points in a row rising or falling).
  --limit-rms <waves>     RMS limit: waves (0.0714) or a fraction (lambda/14); default: the asset's
  --limit-strehl <value>  Strehl floor, e.g. 0.8; default: the asset's
  --baseline <n>          the first n measurements set the control limits (default: 20, or all if fewer)
${DB_HELP}`;

const EXPORT_USAGE = `Usage: shadowfront log export --format csv|json --out <file> [--asset <name>] [--tag <tag> ...]
                           [--since <time>] [--until <time>] [--all-results]

CSV: one row per measurement with its current result (every result with --all-results), one column
per coefficient and its 1σ. JSON: the records in full, results verbatim.
${DB_HELP}`;

const REPORT_USAGE = `Usage: shadowfront log report measurement <id> --out <report.html>
       shadowfront log report compare <A> <B> --out <report.html>
       shadowfront log report trend --asset <name> [trend options] --out <report.html>

A self-contained HTML report (setup, results, wavefront maps, frames, plots, the laser-safety
reminder). Open it in a browser, or print it to PDF from the app or the browser.
${DB_HELP}`;

const REFIT_USAGE = `Usage: shadowfront log refit <id> [--terms <list>] [--note <text>]

Fit the stored frames of a measurement again with the current solver and add the new result; the
older results stay, each with the software version that made it.
${DB_HELP}`;

const DELETE_USAGE = `Usage: shadowfront log delete <id> --yes

Remove a measurement and its results. Its raw frames are removed only when no other measurement
uses them.
${DB_HELP}`;

const INFO_USAGE = `Usage: shadowfront log info [--json]

Where the logbook is, its schema version, size and counts, and whether a last good copy exists.
${DB_HELP}`;

const RESTORE_USAGE = `Usage: shadowfront log restore

Put back the last good copy (<db>.last-good) when the logbook is damaged. The damaged file is kept
beside it as <db>.damaged-<time>.
${DB_HELP}`;

type Action = (argv: string[]) => Promise<number>;

function help(usage: string): number {
  process.stdout.write(`${usage}\n`);
  return 0;
}

function printJson(v: unknown): void {
  process.stdout.write(`${JSON.stringify(v, null, 2)}\n`);
}

async function parseLengthOption(s: string | undefined): Promise<number | undefined> {
  if (s === undefined) return undefined;
  const { parseLength } = await import('../../../core/units/parseQuantity.ts');
  return parseLength(s, { example: '632.8 nm' });
}

const assetAction: Action = async (argv) => {
  const { values, positionals } = parseArgs({
    args: argv,
    allowPositionals: true,
    options: {
      ...DB_OPTION,
      ...HELP_OPTION,
      wavelength: { type: 'string' },
      location: { type: 'string' },
      notes: { type: 'string' },
      'limit-rms': { type: 'string' },
      'limit-strehl': { type: 'string' },
      json: { type: 'boolean', default: false },
    },
  });
  if (values.help) return help(ASSET_USAGE);
  const [verb, ...names] = positionals;
  if (verb === 'list') {
    requireNoPositionals(names, 'asset list');
    return withLogbook(values.db, false, 'log asset list', async (lb) => {
      const { assetsText } = await import('./log/print.ts');
      if (values.json) printJson(lb.listAssets());
      else process.stdout.write(`${assetsText(lb.listAssets())}\n`);
      return 0;
    });
  }
  if (verb !== 'add' && verb !== 'set') throw new UsageError(verb ? `unknown "log asset" action "${verb}"; use add, set or list` : 'missing the action: add, set or list');
  if (names.length !== 1) throw new UsageError(names.length ? `expected one asset name (quote names with spaces), got ${names.length}` : 'missing the asset name');
  const none = (v: string | undefined) => v !== undefined && v.trim().toLowerCase() === 'none';
  const fields = {
    wavelengthM: await parseLengthOption(values.wavelength),
    location: values.location,
    notes: values.notes,
    limitRmsWaves: none(values['limit-rms']) ? null : parseWavesLimit(values['limit-rms'], '--limit-rms'),
    limitStrehl: none(values['limit-strehl']) ? null : parseFraction01(values['limit-strehl'], '--limit-strehl'),
  };
  return withLogbook(values.db, true, `log asset ${verb}`, (lb) => {
    const a = verb === 'add' ? lb.addAsset({ name: names[0], ...fields }) : lb.updateAsset(names[0], fields);
    if (values.json) printJson(a);
    else process.stdout.write(`${verb === 'add' ? 'added' : 'updated'} asset #${a.id} "${a.name}" in ${lb.path}\n`);
    return 0;
  });
};

const discAction: Action = async (argv) => {
  const { values, positionals } = parseArgs({
    args: argv,
    allowPositionals: true,
    options: { ...DB_OPTION, ...HELP_OPTION, diameter: { type: 'string' }, calibration: { type: 'string' }, notes: { type: 'string' }, json: { type: 'boolean', default: false } },
  });
  if (values.help) return help(DISC_USAGE);
  const [verb, ...names] = positionals;
  if (verb === 'list') {
    requireNoPositionals(names, 'disc list');
    return withLogbook(values.db, false, 'log disc list', async (lb) => {
      const discs = lb.listDiscs();
      if (values.json) printJson(discs);
      else if (!discs.length) process.stdout.write('No discs yet.\n');
      else {
        const { textTable } = await import('../../../core/logbook/format.ts');
        process.stdout.write(`${textTable(['id', 'name', 'diameter', 'calibration', 'notes'], discs.map((d) => [String(d.id), d.name, `${(d.nominalDiameterM * 1e3).toFixed(4)} mm`, d.calibration ? 'yes' : '—', d.notes]))}\n`);
      }
      return 0;
    });
  }
  if (verb !== 'add') throw new UsageError(verb ? `unknown "log disc" action "${verb}"; use add or list` : 'missing the action: add or list');
  if (names.length !== 1) throw new UsageError('expected one disc name');
  if (!values.diameter) throw new UsageError('missing --diameter <length>, e.g. "3 mm"');
  const diameter = (await parseLengthOption(values.diameter))!;
  let calibration: unknown = null;
  if (values.calibration) {
    const { readJson } = await import('../../services/files.ts');
    calibration = readJson(values.calibration);
  }
  return withLogbook(values.db, true, 'log disc add', (lb) => {
    const d = lb.addDisc({ name: names[0], nominalDiameterM: diameter, calibration, notes: values.notes });
    process.stdout.write(values.json ? `${JSON.stringify(d, null, 2)}\n` : `added disc #${d.id} "${d.name}"\n`);
    return 0;
  });
};

const addAction: Action = async (argv) => {
  const { values, positionals } = parseArgs({
    args: argv,
    allowPositionals: true,
    options: {
      ...DB_OPTION,
      ...HELP_OPTION,
      asset: { type: 'string' },
      result: { type: 'string' },
      setup: { type: 'string' },
      frame: { type: 'string', multiple: true },
      dark: { type: 'string', multiple: true },
      terms: { type: 'string' },
      tag: { type: 'string', multiple: true },
      note: { type: 'string' },
      who: { type: 'string' },
      when: { type: 'string' },
      disc: { type: 'string' },
      json: { type: 'boolean', default: false },
    },
  });
  if (values.help) return help(ADD_USAGE);
  requireNoPositionals(positionals, 'add');
  if (!values.asset) throw new UsageError('missing --asset <name> (see "shadowfront log asset list")');
  const frames = values.frame ?? [];
  const darks = values.dark ?? [];
  if (!values.result && !frames.length) throw new UsageError('give a fit result (--result <file>) or frames to fit (--frame <file> and --setup <file>)');
  if (!values.result && !values.setup) throw new UsageError('fitting frames needs the bench setup: --setup <setup.json>');
  if (values.result && values.terms) throw new UsageError('--terms is for fitting frames; a --result was already fitted');
  const terms = parseTerms(values.terms);
  const { toIsoTime, normaliseTags } = await import('../../services/logbook/logbook.ts');
  const takenAt = values.when ? toIsoTime(values.when, '--when') : new Date().toISOString();
  const tags = normaliseTags(values.tag ?? []);
  const { readSetupFile } = await import('../../services/logbook/setupFile.ts');
  const setup = values.setup ? readSetupFile(values.setup) : null;
  const details = { asset: values.asset, takenAt, tags, notes: values.note, operator: values.who, disc: values.disc };

  let record;
  if (values.result) {
    const { readJson } = await import('../../services/files.ts');
    const json = readJson(values.result);
    record = await withLogbook(values.db, true, 'log add', (lb) =>
      lb.addMeasurement({
        ...details,
        setup: setup?.json ?? null,
        setupSI: setup?.bench ?? null,
        result: json as never,
        resultSource: values.result,
        frames: [...frames.map((path) => ({ path, role: 'frame' as const })), ...darks.map((path) => ({ path, role: 'dark' as const }))],
      }),
    );
    if (!setup) process.stderr.write('note: no --setup given, so this measurement cannot be re-analysed later\n');
  } else {
    const { addMeasurementFromFrames } = await import('../../services/logbook/fitBridge.ts');
    const out = await addMeasurementFromFrames(dbPath(values.db), { framePaths: frames, darkPaths: darks, setupPath: values.setup!, setup: setup!, terms }, details);
    printWarnings(out.warnings);
    record = out.record;
  }
  if (values.json) printJson(record);
  else {
    const r = record.results[record.results.length - 1]?.result;
    process.stdout.write(
      `added measurement #${record.id} of ${record.assetName} (${record.takenAt}${record.tags.length ? `, ${record.tags.join(', ')}` : ''})` +
        `${r ? `: RMS ${r.rmsWaves.toFixed(4)} ± ${r.sigmaRmsWaves?.toFixed(4) ?? '?'} waves, Strehl ${r.strehl.toFixed(4)}` : ''}` +
        `${record.frames.length ? `, ${record.frames.length} frame${record.frames.length > 1 ? 's' : ''} kept` : ''}\n`,
    );
    if (r && r.trusted === false) process.stderr.write('warning: this fit is marked untrusted (it stopped in a wrong minimum); it is stored but left out of trends\n');
  }
  return 0;
};

function filterOptions() {
  return {
    asset: { type: 'string' as const },
    tag: { type: 'string' as const, multiple: true as const },
    since: { type: 'string' as const },
    until: { type: 'string' as const },
  };
}

const listAction: Action = async (argv) => {
  const { values, positionals } = parseArgs({ args: argv, allowPositionals: true, options: { ...DB_OPTION, ...HELP_OPTION, ...filterOptions(), json: { type: 'boolean', default: false } } });
  if (values.help) return help(LIST_USAGE);
  requireNoPositionals(positionals, 'list');
  return withLogbook(values.db, false, 'log list', async (lb) => {
    const list = lb.listMeasurements({ asset: values.asset, tags: values.tag, since: values.since, until: values.until });
    if (values.json) printJson(list);
    else process.stdout.write(`${(await import('./log/print.ts')).listText(list)}\n`);
    return 0;
  });
};

const showAction: Action = async (argv) => {
  const { values, positionals } = parseArgs({ args: argv, allowPositionals: true, options: { ...DB_OPTION, ...HELP_OPTION, json: { type: 'boolean', default: false } } });
  if (values.help) return help(SHOW_USAGE);
  if (positionals.length > 1) throw new UsageError(`expected one measurement id, got ${positionals.length}`);
  const id = parseId(positionals[0]);
  return withLogbook(values.db, false, 'log show', async (lb) => {
    const m = lb.requireMeasurement(id);
    if (values.json) printJson(m);
    else process.stdout.write(`${(await import('./log/print.ts')).showText(m)}\n`);
    return 0;
  });
};

const compareAction: Action = async (argv) => {
  const { values, positionals } = parseArgs({
    args: argv,
    allowPositionals: true,
    options: { ...DB_OPTION, ...HELP_OPTION, json: { type: 'boolean', default: false }, 'result-a': { type: 'string' }, 'result-b': { type: 'string' } },
  });
  if (values.help) return help(COMPARE_USAGE);
  if (positionals.length !== 2) throw new UsageError(`expected two measurement ids, A and B, got ${positionals.length}`);
  const a = parseId(positionals[0], 'measurement id A');
  const b = parseId(positionals[1], 'measurement id B');
  const resultA = values['result-a'] !== undefined ? parseId(values['result-a'], '--result-a') : undefined;
  const resultB = values['result-b'] !== undefined ? parseId(values['result-b'], '--result-b') : undefined;
  return withLogbook(values.db, false, 'log compare', async (lb) => {
    const c = lb.compareMeasurements(a, b, { resultA, resultB });
    if (values.json) printJson(c);
    else process.stdout.write(`${(await import('./log/print.ts')).comparisonText(c)}\n`);
    return 0;
  });
};

function trendOptionSpec() {
  return {
    ...filterOptions(),
    'limit-rms': { type: 'string' as const },
    'limit-strehl': { type: 'string' as const },
    baseline: { type: 'string' as const },
  };
}

function trendOptions(values: { tag?: string[]; since?: string; until?: string; 'limit-rms'?: string; 'limit-strehl'?: string; baseline?: string }) {
  return {
    tags: values.tag,
    since: values.since,
    until: values.until,
    limitRmsWaves: parseWavesLimit(values['limit-rms'], '--limit-rms'),
    limitStrehl: parseFraction01(values['limit-strehl'], '--limit-strehl'),
    baseline: parseCount(values.baseline, '--baseline', 2),
  };
}

const trendAction: Action = async (argv) => {
  const { values, positionals } = parseArgs({ args: argv, allowPositionals: true, options: { ...DB_OPTION, ...HELP_OPTION, ...trendOptionSpec(), json: { type: 'boolean', default: false } } });
  if (values.help) return help(TREND_USAGE);
  requireNoPositionals(positionals, 'trend');
  if (!values.asset) throw new UsageError('missing --asset <name>');
  const opts = trendOptions(values);
  return withLogbook(values.db, false, 'log trend', async (lb) => {
    const t = lb.trend(values.asset!, opts);
    if (values.json) printJson(t);
    else process.stdout.write(`${(await import('./log/print.ts')).trendText(t)}\n`);
    return 0;
  });
};

const exportAction: Action = async (argv) => {
  const { values, positionals } = parseArgs({
    args: argv,
    allowPositionals: true,
    options: { ...DB_OPTION, ...HELP_OPTION, ...filterOptions(), format: { type: 'string' }, out: { type: 'string', short: 'o' }, 'all-results': { type: 'boolean', default: false } },
  });
  if (values.help) return help(EXPORT_USAGE);
  requireNoPositionals(positionals, 'export');
  const format = values.format ?? (values.out?.toLowerCase().endsWith('.json') ? 'json' : values.out?.toLowerCase().endsWith('.csv') ? 'csv' : undefined);
  if (format !== 'csv' && format !== 'json') throw new UsageError(values.format ? `--format must be "csv" or "json", not "${values.format}"` : 'missing --format csv|json');
  if (!values.out) throw new UsageError('missing --out <file>');
  const { measurementsCsv, measurementsJson } = await import('../../../core/logbook/export.ts');
  const { writeBytesAtomic } = await import('../../services/files.ts');
  const { softwareVersion } = await import('../../services/logbook/logbook.ts');
  return withLogbook(values.db, false, 'log export', (lb) => {
    const filter = { asset: values.asset, tags: values.tag, since: values.since, until: values.until };
    const records = lb.records(filter);
    const text =
      format === 'csv'
        ? measurementsCsv(records, { allResults: values['all-results'] })
        : measurementsJson(records, lb.listAssets(), { exportedAt: new Date().toISOString(), software: softwareVersion(), selection: { ...filter, allResults: values['all-results'] } });
    writeBytesAtomic(values.out!, new TextEncoder().encode(text));
    process.stdout.write(`wrote ${records.length} measurement${records.length === 1 ? '' : 's'} to ${values.out} (${format.toUpperCase()})\n`);
    return 0;
  });
};

const reportAction: Action = async (argv) => {
  const { values, positionals } = parseArgs({
    args: argv,
    allowPositionals: true,
    options: { ...DB_OPTION, ...HELP_OPTION, ...trendOptionSpec(), out: { type: 'string', short: 'o' }, 'result-a': { type: 'string' }, 'result-b': { type: 'string' } },
  });
  if (values.help) return help(REPORT_USAGE);
  const [kind, ...ids] = positionals;
  if (!kind) throw new UsageError('missing what to report: measurement <id>, compare <A> <B> or trend --asset <name>');
  if (!values.out) throw new UsageError('missing --out <report.html>');
  let build: (lb: import('../../services/logbook/logbook.ts').Logbook) => string;
  const reports = await import('../../services/logbook/reports.ts');
  if (kind === 'measurement') {
    if (ids.length !== 1) throw new UsageError('"report measurement" takes one measurement id');
    const id = parseId(ids[0]);
    build = (lb) => reports.measurementReport(lb, id);
  } else if (kind === 'compare') {
    if (ids.length !== 2) throw new UsageError('"report compare" takes two measurement ids, A and B');
    const a = parseId(ids[0], 'measurement id A');
    const b = parseId(ids[1], 'measurement id B');
    const resultA = values['result-a'] !== undefined ? parseId(values['result-a'], '--result-a') : undefined;
    const resultB = values['result-b'] !== undefined ? parseId(values['result-b'], '--result-b') : undefined;
    build = (lb) => reports.comparisonReport(lb, a, b, { resultA, resultB });
  } else if (kind === 'trend') {
    requireNoPositionals(ids, 'report trend');
    if (!values.asset) throw new UsageError('"report trend" needs --asset <name>');
    const opts = trendOptions(values);
    build = (lb) => reports.trendReport(lb, values.asset!, opts);
  } else throw new UsageError(`unknown report "${kind}"; use measurement, compare or trend`);
  const { writeBytesAtomic } = await import('../../services/files.ts');
  return withLogbook(values.db, false, 'log report', (lb) => {
    writeBytesAtomic(values.out!, new TextEncoder().encode(build(lb)));
    process.stdout.write(`wrote ${values.out} (open it in a browser; print it to save a PDF)\n`);
    return 0;
  });
};

const refitAction: Action = async (argv) => {
  const { values, positionals } = parseArgs({ args: argv, allowPositionals: true, options: { ...DB_OPTION, ...HELP_OPTION, terms: { type: 'string' }, note: { type: 'string' } } });
  if (values.help) return help(REFIT_USAGE);
  if (positionals.length !== 1) throw new UsageError(positionals.length ? `expected one measurement id, got ${positionals.length}` : 'missing the measurement id');
  const id = parseId(positionals[0]);
  const terms = parseTerms(values.terms);
  const { refitMeasurement } = await import('../../services/logbook/fitBridge.ts');
  const { previous, added } = await refitMeasurement(dbPath(values.db), id, { terms, note: values.note });
  const r = added.result;
  process.stdout.write(
    `added result #${added.id} to measurement #${id} (${r.software}): RMS ${r.rmsWaves.toFixed(4)} waves, Strehl ${r.strehl.toFixed(4)}` +
      `${previous ? `; the earlier result #${previous.id} (${previous.result.software}) is kept` : ''}\n`,
  );
  return 0;
};

const deleteAction: Action = async (argv) => {
  const { values, positionals } = parseArgs({ args: argv, allowPositionals: true, options: { ...DB_OPTION, ...HELP_OPTION, yes: { type: 'boolean', default: false } } });
  if (values.help) return help(DELETE_USAGE);
  if (positionals.length !== 1) throw new UsageError('expected one measurement id');
  const id = parseId(positionals[0]);
  if (!values.yes) throw new UsageError(`deleting measurement #${id} cannot be undone (except from the last good copy); add --yes to confirm`);
  return withLogbook(values.db, true, 'log delete', (lb) => {
    const { removedFrames } = lb.deleteMeasurement(id);
    process.stdout.write(`deleted measurement #${id}${removedFrames.length ? `, and ${removedFrames.length} frame${removedFrames.length > 1 ? 's' : ''} no other record used` : ''}\n`);
    return 0;
  });
};

const infoAction: Action = async (argv) => {
  const { values, positionals } = parseArgs({ args: argv, allowPositionals: true, options: { ...DB_OPTION, ...HELP_OPTION, json: { type: 'boolean', default: false } } });
  if (values.help) return help(INFO_USAGE);
  requireNoPositionals(positionals, 'info');
  return withLogbook(values.db, false, 'log info', (lb) => {
    const i = lb.info();
    if (values.json) printJson(i);
    else {
      process.stdout.write(
        [
          `logbook        ${i.path}`,
          `schema         version ${i.schemaVersion}`,
          `size           ${(i.fileBytes / 1024).toFixed(1)} KiB (raw frames are kept apart, in ${i.path}.frames)`,
          `contents       ${i.assets} assets, ${i.measurements} measurements, ${i.results} results, ${i.frames} frames`,
          `last good copy ${i.lastGood ?? 'none yet'}`,
        ].join('\n') + '\n',
      );
    }
    return 0;
  });
};

const restoreAction: Action = async (argv) => {
  const { values, positionals } = parseArgs({ args: argv, allowPositionals: true, options: { ...DB_OPTION, ...HELP_OPTION } });
  if (values.help) return help(RESTORE_USAGE);
  requireNoPositionals(positionals, 'restore');
  const { restoreLastGood } = await import('../../services/logbook/logbook.ts');
  const r = await restoreLastGood(dbPath(values.db));
  process.stdout.write(
    `restored ${dbPath(values.db)} from ${r.restoredFrom} (${r.measurements} measurements)${r.damagedKeptAs ? `; the damaged file is kept as ${r.damagedKeptAs}` : ''}\n`,
  );
  return 0;
};

const ACTIONS: Record<string, { run: Action; usage: string }> = {
  asset: { run: assetAction, usage: ASSET_USAGE },
  disc: { run: discAction, usage: DISC_USAGE },
  add: { run: addAction, usage: ADD_USAGE },
  list: { run: listAction, usage: LIST_USAGE },
  show: { run: showAction, usage: SHOW_USAGE },
  compare: { run: compareAction, usage: COMPARE_USAGE },
  trend: { run: trendAction, usage: TREND_USAGE },
  export: { run: exportAction, usage: EXPORT_USAGE },
  report: { run: reportAction, usage: REPORT_USAGE },
  refit: { run: refitAction, usage: REFIT_USAGE },
  delete: { run: deleteAction, usage: DELETE_USAGE },
  info: { run: infoAction, usage: INFO_USAGE },
  restore: { run: restoreAction, usage: RESTORE_USAGE },
};

/** Errors of the logbook written for the user, printed as "shadowfront: error: ..." with exit code 1. */
const LOGBOOK_USER_ERRORS = new Set(['LogbookDataError', 'SetupFieldError', 'QuantityError', 'FileProblem', 'ImageDecodeError']);

export async function logCommand(argv: string[]): Promise<number> {
  const [action, ...rest] = argv;
  if (!action || action === '-h' || action === '--help' || action === 'help') {
    process.stdout.write(`${LOG_USAGE}\n`);
    return action ? 0 : 2;
  }
  const entry = ACTIONS[action];
  if (!entry) throw new UsageError(`unknown log action "${action}"; one of: ${Object.keys(ACTIONS).join(', ')}`);
  try {
    return await entry.run(rest);
  } catch (err) {
    const e = err as Error & { code?: string };
    if (err instanceof UsageError || e.code?.startsWith('ERR_PARSE_ARGS')) {
      process.stderr.write(`shadowfront: ${e.message}\n\n${entry.usage}\n`);
      return 2;
    }
    if (e && LOGBOOK_USER_ERRORS.has(e.name)) {
      process.stderr.write(`shadowfront: error: ${e.message}\n`);
      return 1;
    }
    throw err;
  }
}
