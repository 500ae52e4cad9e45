/**
 * The one implementation of the interface's API (app/shared/contract.ts ShadowfrontApi), called by both
 * shells: the Electron main process over IPC (app/main) and the local web mode over HTTP (app/web).
 *
 * Every method resolves to an ApiReply: the value, or a problem in plain words naming the file and the
 * field where there is one (./app/problems.ts). Fits and simulations run as jobs in worker threads
 * (./app/jobs.ts). The logbook is read through a read-only copy and opened for writing only to save.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type {
  ApiReply,
  CompareOutcome,
  DerivedFigures,
  ExportOutcome,
  MeasurementQuery,
  SetupCheck,
  SetupJson,
  ShadowfrontApi,
} from '../shared/contract.ts';
import type { MeasurementSummary } from '../../core/logbook/types.ts';
import { parseSetup } from '../../core/setup/parseSetup.ts';
import type { BenchSetup } from '../../core/setup/types.ts';
import { benchFigures } from '../../core/plan/figures.ts';
import { measurementsCsv } from '../../core/logbook/export.ts';
import { LogbookDataError } from '../../core/logbook/errors.ts';
import type { Logbook } from './logbook/logbook.ts';
import { comparisonReport, measurementReport, trendReport } from './logbook/reports.ts';
import { AppProblem, logToStderr, reply, toProblem, type InternalLogger } from './app/problems.ts';
import { SafetyState } from './app/safetyState.ts';
import { PresetStore } from './app/presets.ts';
import { framePreview } from './app/preview.ts';
import { JobManager } from './app/jobs.ts';
import { LogbookAccess } from './app/logbookAccess.ts';
import { blankSetup, demoFiles, demoSetup, setupPart } from './app/demo.ts';
import { wavefrontPlane, type AssetLimits } from './app/outcome.ts';
import { examplePlanJson } from './planService.ts';
import type { PlanReport } from '../../core/plan/types.ts';
import { parsePlan } from '../../core/plan/parsePlan.ts';
import { parseDiscProfile } from '../../core/fit/disc/profile.ts';
import { discJobPayload, fitDiscProfile } from './app/disc.ts';

export interface AppServiceOptions {
  /** Where the app keeps its own small files (safety.json, presets.json). */
  dataDir: string;
  logbookPath: string;
  /** True when the logbook is a working copy of the bundled synthetic demo. */
  demo: boolean;
  shell: 'electron' | 'web';
  /** The clock (tests inject one to check that the safety acknowledgement lasts one day only). */
  now?: () => Date;
  /** The job worker's entry file (default: app/services/app/worker.mjs). */
  workerEntry?: string;
  /** The folder holding demo/ and examples/ (default: the repository's resources/). */
  resourcesDir?: string;
  /** Where unexpected errors' stacks go (default: stderr). */
  log?: InternalLogger;
  /** Start the fit worker at once, so the first fit does not wait for it to load (the shells set this). */
  prewarm?: boolean;
}

export type AppService = ShadowfrontApi & { close(): Promise<void> };

let versionCache: string | null = null;
function appVersion(): string {
  if (!versionCache) {
    const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version: string };
    versionCache = pkg.version;
  }
  return versionCache;
}

export function defaultResourcesDir(): string {
  return fileURLToPath(new URL('../../resources/', import.meta.url));
}

/** Notes in plain words beside the derived figures. */
function figureNotes(f: ReturnType<typeof benchFigures>): string[] {
  const notes: string[] = [];
  if (f.sensorMinSidePx === null) notes.push('Give camera.sensorSize (width and height in pixels) to compare the shadow with the sensor.');
  else if (f.shadowFits === false)
    notes.push(
      `The shadow (${f.shadowDiameterPx.toFixed(0)} px across) is larger than the sensor's smaller side (${f.sensorMinSidePx} px): frames will hold the inside of the shadow only, so defocus and coma are less well determined.`,
    );
  if (f.visibleRings > 0) notes.push(`About ${f.visibleRings} bright rings around the spot fall inside the shadow${f.sensorMinSidePx !== null ? ' and on the sensor' : ''}.`);
  if (f.sourceBlurPx > 0) notes.push(`The finite source blurs the pattern by about ${f.sourceBlurPx.toFixed(1)} px (S·L/G).`);
  return notes;
}

export function derivedFigures(setup: BenchSetup): DerivedFigures {
  const f = benchFigures(setup);
  return {
    effectiveDistanceM: f.effectiveDistanceM,
    magnification: f.magnification,
    fresnelNumber: f.fresnelNumber,
    zoneWidthM: f.zoneWidthM,
    rimToleranceM: f.rimToleranceM,
    discRadiusM: setup.disc.radiusM,
    spotDiameterPx: f.spotDiameterPx,
    shadowDiameterPx: f.shadowDiameterPx,
    sensorMinSidePx: f.sensorMinSidePx,
    shadowFits: f.shadowFits,
    notes: figureNotes(f),
  };
}

/** Free-text match against notes, tags and asset name (case-insensitive; every word must match). */
export function matchesText(m: MeasurementSummary, text: string | undefined): boolean {
  const words = (text ?? '').toLowerCase().split(/\s+/).filter(Boolean);
  if (!words.length) return true;
  const hay = `${m.notes}\n${m.tags.join(' ')}\n${m.assetName}`.toLowerCase();
  return words.every((w) => hay.includes(w));
}

function filterOf(q: MeasurementQuery) {
  return { asset: q.asset || undefined, since: q.since || undefined, until: q.until || undefined, tags: q.tags?.length ? q.tags : undefined };
}

function today(now: Date): string {
  return now.toISOString().slice(0, 10);
}

const utf8 = (s: string) => new TextEncoder().encode(s);

export function createAppService(options: AppServiceOptions): AppService {
  const now = options.now ?? (() => new Date());
  const log = options.log ?? logToStderr;
  const resources = options.resourcesDir ?? defaultResourcesDir();
  const safety = new SafetyState(options.dataDir, now);
  const presets = new PresetStore(options.dataDir, now);
  const jobs = new JobManager({ workerEntry: options.workerEntry, log });
  const logbook = new LogbookAccess(options.logbookPath, options.demo);
  if (options.prewarm) jobs.prewarm('fit');
  const run = <T>(fn: () => T | Promise<T>): Promise<ApiReply<T>> => reply(fn, log);

  /** The logbook for reading; without one yet, `empty` is the answer. */
  async function withReader<T>(empty: T, fn: (lb: Logbook) => T): Promise<T> {
    const lb = await logbook.reader();
    return lb ? fn(lb) : empty;
  }
  async function requireReader(): Promise<Logbook> {
    const lb = await logbook.reader();
    if (!lb) throw new AppProblem('logbook', `${logbook.path}: there is no logbook here yet; saving a first measurement creates it.`, logbook.path);
    return lb;
  }
  async function limitsFor(asset: string | undefined): Promise<AssetLimits | null> {
    const name = asset?.trim();
    if (!name) return null;
    const lb = await logbook.reader();
    const a = lb?.getAsset(name);
    if (!a) return null;
    return { asset: a.name, limitRmsWaves: a.limitRmsWaves, limitStrehl: a.limitStrehl };
  }
  function selection(lb: Logbook, q: MeasurementQuery): MeasurementSummary[] {
    return lb.listMeasurements(filterOf(q)).filter((m) => matchesText(m, q.text));
  }

  return {
    app: {
      info: () => run(async () => ({ version: appVersion(), shell: options.shell, demo: options.demo, logbook: await logbook.info() })),
    },
    safety: {
      notice: () => run(() => safety.notice()),
      acknowledge: () => run(() => safety.acknowledge()),
    },
    setup: {
      check: (req) =>
        run((): SetupCheck => {
          let setup: BenchSetup;
          try {
            setup = parseSetup(req.setup, 'bench setup');
          } catch (err) {
            return { derived: null, problem: toProblem(err, log) };
          }
          try {
            return { derived: derivedFigures(setup), problem: null };
          } catch (err) {
            // e.g. a camera at or beyond the focus: no shadow forms (a RangeError in plain words).
            return { derived: null, problem: toProblem(err, log) };
          }
        }),
      example: (req) => run((): SetupJson => (req.which === 'demo' ? demoSetup(resources) : blankSetup(resources))),
      listPresets: (req) => run(() => presets.list(req.asset)),
      savePreset: (req) => run(() => presets.save(req.asset, req.name, req.setup)),
      deletePreset: (req) => run(() => presets.delete(req.id)),
    },
    frames: {
      preview: (req) => run(() => framePreview(req)),
      demoFiles: () => run(() => demoFiles(resources)),
    },
    jobs: {
      startFit: (req) =>
        run(async () => {
          if (!req.frames?.length) throw new AppProblem('frame', 'No frame was given: open or drop at least one camera frame.', undefined, 'frames');
          const setup = parseSetup(req.setup, 'bench setup'); // a bad field is reported at once, not from the worker
          const { asset, disc, discAngleDeg, ...request } = req;
          if (discAngleDeg !== undefined && disc === undefined) {
            throw new AppProblem('invalid-input', `A disc angle (${discAngleDeg}°) turns a calibrated disc's shape: choose the disc too, or leave the angle out.`, undefined, 'discAngleDeg');
          }
          if (discAngleDeg !== undefined && !Number.isFinite(discAngleDeg)) {
            throw new AppProblem('invalid-input', `The disc angle is ${String(discAngleDeg)}; expected a number of degrees, e.g. 0 or 90.`, undefined, 'discAngleDeg');
          }
          // The logbook belongs to the service: the disc's profile is read here and handed to the worker.
          const discProfile = disc === undefined ? null : fitDiscProfile(await logbook.reader(), logbook.path, disc);
          const discRotationRad = discAngleDeg === undefined ? 0 : (discAngleDeg * Math.PI) / 180;
          let limits: AssetLimits | null = null;
          try {
            limits = await limitsFor(asset);
          } catch {
            limits = null; // an unreadable logbook does not stop a fit; the verdict is then left out
          }
          return { id: jobs.start('fit', { request, setup, limits, discProfile, discRotationRad }) };
        }),
      startSimulate: (req) =>
        run(() => {
          const setup = parseSetup(req.setup, 'bench setup');
          return { id: jobs.start('simulate', { request: req, setup }) };
        }),
      startPlan: (req) =>
        run(() => {
          parsePlan(req.plan, 'bench plan'); // a bad field is reported at once, not from the worker
          return { id: jobs.start('plan', { plan: req.plan }) };
        }),
      startDiscCalibration: (req) =>
        run(() => {
          const setup = parseSetup(setupPart(req.setup), 'bench setup');
          return { id: jobs.start('disc', discJobPayload(req, setup)) };
        }),
      status: (req) => run(() => jobs.status(req.id)),
      cancel: (req) => run(() => jobs.cancel(req.id)),
    },
    logbook: {
      info: () => run(() => logbook.info()),
      assets: () => run(() => withReader([], (lb) => lb.listAssets())),
      discs: () => run(() => withReader([], (lb) => lb.listDiscs())),
      saveDiscProfile: (req) =>
        run(async () => {
          const name = req.name?.trim();
          if (!name) throw new AppProblem('invalid-input', 'Name the disc to store its calibration under (a new name adds the disc to the library).', undefined, 'name');
          const profile = parseDiscProfile(req.profile, 'disc calibration');
          if (!profile.trusted) {
            throw new AppProblem(
              'untrusted',
              `This calibration is not trustworthy (${profile.degenerate ? 'the disc shape could not be told apart from the beam' : 'the fit is suspect'}), so it was not stored. Take frames with the disc turned by 90°, or declare the beam ideal, and calibrate again.`,
              undefined,
              'profile',
            );
          }
          const { storeDiscProfile, discKey } = await import('./discService.ts');
          return logbook.write('disc calibration from the app', (lb) => {
            const existing = lb.getDisc(discKey(name));
            if (existing && existing.calibration !== null && existing.calibration !== undefined && !req.replace) {
              const when = (existing.calibration as { calibratedAt?: unknown }).calibratedAt;
              throw new AppProblem(
                'exists',
                `Disc #${existing.id} "${existing.name}" already has a calibration${typeof when === 'string' ? ` (made ${when.slice(0, 10)})` : ''}. Nothing was changed: confirm to replace it, or save this one under another name.`,
                undefined,
                'name',
              );
            }
            return storeDiscProfile(lb, name, profile, { replace: req.replace === true, notes: req.notes });
          });
        }),
      measurements: (req) => run(async () => {
        const lb = await logbook.reader();
        return lb ? selection(lb, req) : [];
      }),
      measurement: (req) => run(async () => (await requireReader()).requireMeasurement(req.id)),
      save: (req) =>
        run(async () => {
          const assetName = req.asset?.trim();
          if (!assetName) throw new AppProblem('invalid-input', 'Name the asset (the laser or beam line) to save the measurement under.', undefined, 'asset');
          if (!req.frames?.length) throw new AppProblem('frame', 'A measurement is saved with its camera frames; none were given.', undefined, 'frames');
          const setupJson = setupPart(req.setup);
          const setupSI = parseSetup(setupJson, 'bench setup');
          return logbook.write('save from the app', (lb) => {
            if (!lb.getAsset(assetName)) lb.addAsset({ name: assetName, wavelengthM: setupSI.wavelengthM });
            const record = lb.addMeasurement({
              asset: assetName,
              takenAt: req.takenAt || undefined,
              operator: req.operator,
              tags: req.tags ?? [],
              notes: req.notes ?? '',
              setup: setupJson,
              setupSI,
              frames: [...req.frames.map((f) => ({ bytes: f.data, name: f.name, role: 'frame' as const })), ...(req.darks ?? []).map((f) => ({ bytes: f.data, name: f.name, role: 'dark' as const }))],
              result: req.result,
              resultSource: 'fit result',
            });
            return { id: record.id };
          });
        }),
      compare: (req) =>
        run(async (): Promise<CompareOutcome> => {
          const lb = await requireReader();
          const comparison = lb.compareMeasurements(req.a, req.b);
          return { comparison, wavefrontA: wavefrontPlane(lb.analysed(req.a).result), wavefrontB: wavefrontPlane(lb.analysed(req.b).result) };
        }),
      trend: (req) => run(async () => (await requireReader()).trend(req.asset, { since: req.since || undefined, until: req.until || undefined, tags: req.tags?.length ? req.tags : undefined })),
      exportCsv: (req) =>
        run(async (): Promise<ExportOutcome> => {
          const lb = await requireReader();
          const ids = selection(lb, req).map((m) => m.id);
          const records = lb.records({ ids });
          return { name: `shadowfront-logbook-${today(now())}.csv`, mime: 'text/csv', data: utf8(measurementsCsv(records)) };
        }),
      exportReport: (req) =>
        run(async (): Promise<ExportOutcome> => {
          const lb = await requireReader();
          let html: string;
          let name: string;
          if (req.kind === 'measurement') {
            const id = req.ids?.[0] ?? selection(lb, req).at(-1)?.id;
            if (id === undefined) throw new LogbookDataError('no measurement matches the selection, so there is nothing to report');
            html = measurementReport(lb, id);
            name = `shadowfront-measurement-${id}.html`;
          } else if (req.kind === 'comparison') {
            if (!req.ids || req.ids.length !== 2) throw new AppProblem('invalid-input', 'A comparison report needs two measurements: pick A and B.', undefined, 'ids');
            html = comparisonReport(lb, req.ids[0], req.ids[1]);
            name = `shadowfront-comparison-${req.ids[0]}-${req.ids[1]}.html`;
          } else {
            if (!req.asset) throw new AppProblem('invalid-input', 'A trend report is made for one asset: choose the asset first.', undefined, 'asset');
            html = trendReport(lb, req.asset, filterOf(req));
            name = `shadowfront-trend-${req.asset.replace(/[^\p{L}\p{N}._-]+/gu, '-')}.html`;
          }
          return { name, mime: 'text/html', data: utf8(html) };
        }),
    },
    plan: {
      // A plan can take many seconds: it runs in a worker, and this call answers when it is done.
      run: (req) => run(async () => (await jobs.run('plan', { plan: req.plan })) as PlanReport),
      example: () => run(() => examplePlanJson(resources)),
    },
    async close() {
      await jobs.close();
      logbook.close();
    },
  };
}
