/**
 * The one API between Shadowfront's interface (app/renderer) and its services.
 *
 * The Electron preload exposes it as `window.shadowfront` over IPC (app/preload, app/main); the local
 * web mode serves the same calls over HTTP on 127.0.0.1 (app/web). Both call the same implementation
 * (app/services/appService.ts). Nothing else crosses between the interface and the services.
 *
 * Rules for this file:
 *  - types only, plus the channel list and the wire codec; no Node, DOM or Electron imports;
 *  - every call takes one plain-data argument and returns a Promise of plain data;
 *  - bytes travel as Uint8Array, images as Float32Array (the wire codec below carries them over JSON);
 *  - lengths in SI units (metres), as in core/; the interface formats them for people.
 *
 * Long work (fits, reference simulations, the demo) runs as a job: `jobs.start*` returns a job id, the
 * interface polls `jobs.status` (about every 200 ms) for progress and the result, and `jobs.cancel`
 * stops it. This works the same over IPC and HTTP.
 */
import type { FitResult } from '../../core/fit/result.ts';
import type { Asset, Disc, MeasurementRecord, MeasurementSummary } from '../../core/logbook/types.ts';
import type { Comparison } from '../../core/logbook/compare.ts';
import type { Trend } from '../../core/logbook/trend.ts';
import type { PlanReport } from '../../core/plan/types.ts';
import type { DiscCalibration } from '../../core/fit/disc/calibrate.ts';

// ---------------------------------------------------------------- common

/** A file handed over by the interface: its name (the extension may tell the type) and its bytes. */
export interface FileBlob {
  name: string;
  data: Uint8Array;
}

/** An error as the interface shows it: plain words, no stack. */
export interface ApiProblem {
  /** Short machine kind, e.g. "setup-field", "image-decode", "frame", "logbook", "cancelled", "invalid-request", "internal". */
  kind: string;
  /** One or two plain sentences naming the file, field and value where there is one. */
  message: string;
  file?: string;
  field?: string;
}

/** Every call resolves to this: the value, or a problem to show. Calls never reject for user errors. */
export type ApiReply<T> = { ok: true; value: T } | { ok: false; problem: ApiProblem };

/** A grayscale image for display: row-major, `widthPx × heightPx`, in the lab orientation. */
export interface ImagePlane {
  widthPx: number;
  heightPx: number;
  data: Float32Array;
  /** Metres per image pixel on the camera (after any display decimation). */
  pixelM: number;
}

// ---------------------------------------------------------------- safety

export interface SafetyNotice {
  title: string;
  points: string[];
  /** True when it was acknowledged earlier today on this machine (it may be remembered for the day only). */
  acknowledgedToday: boolean;
}

// ---------------------------------------------------------------- setup

/** A setup as the user edits it: the "shadowfront-setup/1" JSON object with unit strings. */
export type SetupJson = Record<string, unknown>;

/** Figures derived from a setup (physics notes §2), for the live panel of the bench-setup screen. */
export interface DerivedFigures {
  effectiveDistanceM: number;
  magnification: number;
  fresnelNumber: number;
  /** Edge Fresnel-zone width Δr = λL'/(2a), m, and the rim tolerance from the 10 % rule. */
  zoneWidthM: number;
  rimToleranceM: number;
  /** Nominal disc radius a, m (from the setup's disc diameter). */
  discRadiusM: number;
  /** First dark ring diameter of the spot, on the sensor, pixels. */
  spotDiameterPx: number;
  /** Shadow diameter on the sensor against the sensor's smaller side, pixels. */
  shadowDiameterPx: number;
  /** Null when the setup gives no camera.sensorSize. */
  sensorMinSidePx: number | null;
  /** Null when the setup gives no camera.sensorSize. */
  shadowFits: boolean | null;
  notes: string[];
}

export interface SetupCheck {
  /** The setup is valid: its derived figures. */
  derived: DerivedFigures | null;
  /** The first problem found (field path and value named), or null. */
  problem: ApiProblem | null;
}

export interface SetupPreset {
  id: string;
  asset: string;
  name: string;
  setup: SetupJson;
  savedAt: string;
}

// ---------------------------------------------------------------- frames

export interface FrameSetRequest {
  frames: FileBlob[];
  darks: FileBlob[];
  setup: SetupJson;
  /** Region override from the interface (lab-frame pixels); default: chosen automatically. */
  region?: { centerPx: [number, number]; radiusPx: number } | null;
}

/** The prepared frame set, for the preview. */
export interface FramePreview {
  /** Averaged, dark-subtracted counts, oriented to the lab frame (decimated when larger than 1024 px). */
  image: ImagePlane;
  /** Display decimation factor (1 = full resolution). */
  decimation: number;
  /** Pixels masked as saturated or hot, in image-plane pixels. */
  saturated: [number, number][];
  hot: [number, number][];
  /** Detected pattern centre and the region to analyse, in full-resolution lab-frame pixels. */
  centerPx: [number, number];
  region: { centerPx: [number, number]; radiusPx: number; wholeShadow: boolean };
  peakCounts: number;
  warnings: string[];
}

// ---------------------------------------------------------------- jobs

export interface FitRequest extends FrameSetRequest {
  /** ANSI indices; default 3, 4, 5, 7, 8. */
  terms?: number[];
  /**
   * A calibrated disc of the logbook's disc library (its id, or its name): the fit applies its stored shape
   * and the result records which calibration was used (`result.disc`). Default: no calibrated shape.
   */
  disc?: string | number;
  /**
   * How far the disc is turned from its calibrated position in these frames, degrees, counter-clockwise
   * seen from the laser looking downstream (default 0). Only with `disc`.
   */
  discAngleDeg?: number;
}

export interface SimulateRequest {
  setup: SetupJson;
  /** Aberrations as ANSI j → waves (unit-RMS over the setup's Zernike radius). */
  aberrationsWaves: Record<string, number>;
  /** Disc imperfections: ellipticity e (a_major = a(1+e)) and its axis, radians. */
  disc?: { ellipticity?: number; axisRad?: number; edgeRoughnessM?: number };
  widthPx?: number;
  heightPx?: number;
  model?: 'fast' | 'reference';
}

/** What a finished fit job returns: the result plus images for the result screen. */
export interface FitOutcome {
  result: FitResult;
  /** The frame set's measured counts, the model at the fitted parameters and the residual (measured − model) / σ, over the analysed region. */
  measured: ImagePlane;
  model: ImagePlane;
  residual: ImagePlane;
  /** Azimuthally averaged profile about the fitted centre: radius (m on the camera) against measured and model counts. */
  profile: { radiusM: number[]; measured: number[]; model: number[] };
  /** Wavefront map over the unit Zernike disc, waves, NaN outside. */
  wavefront: ImagePlane;
  /** Pass / warn / fail against an asset's limits (when an asset was named), with the reasons. */
  verdict: Verdict | null;
}

export interface Verdict {
  level: 'pass' | 'warn' | 'fail';
  reasons: string[];
}

export interface SimulateOutcome {
  image: ImagePlane;
  model: 'fast' | 'reference';
  notes: string[];
}

/** Frames taken with the disc turned to one angle in its holder. */
export interface DiscAngleFrames {
  /**
   * The disc's rotation for these frames, counter-clockwise seen from the laser looking downstream: a plain
   * number is degrees ("90"), or text with a unit ("1.5708 rad"); the service parses it.
   */
  angle: string;
  frames: FileBlob[];
  darks?: FileBlob[];
}

/** A disc calibration (physics notes §3): frames at several disc angles, the beam fitted with the disc or declared ideal. */
export interface DiscCalibrationRequest {
  /** The bench setup the frames were taken with (a setup, or a scene whose setup part is used). */
  setup: SetupJson;
  /** One entry per disc angle; at least two angles (e.g. 0° and 90°) when the beam is fitted. */
  sets: DiscAngleFrames[];
  /** 'fit': the beam's aberrations are fitted with the disc; 'ideal': a reference beam without aberrations. */
  beam: 'fit' | 'ideal';
  /** Also fit the edge harmonics of orders 3 and 4 (default: ellipticity and axis only). */
  harmonics?: boolean;
  /** Beam terms fitted with the disc (ANSI; default 3, 4, 5, 7, 8 when the beam is fitted, none when ideal). */
  terms?: number[];
}

/** What a finished disc-calibration job returns: the profile to store, the fit behind it, trust and warnings. */
export type DiscCalibrationOutcome = DiscCalibration;

export interface SaveDiscProfileRequest {
  /** A new disc's name, or an existing disc's name (or "#id"). */
  name: string;
  /** The `profile` of a DiscCalibrationOutcome ("shadowfront-disc-profile/1"). */
  profile: Record<string, unknown>;
  /** Replace the disc's existing calibration; without it an existing calibration is never overwritten. */
  replace?: boolean;
  /** Notes for a new disc. */
  notes?: string;
}

export type JobKind = 'fit' | 'simulate' | 'plan' | 'disc';

export interface JobStatus {
  id: string;
  kind: JobKind;
  state: 'running' | 'done' | 'failed' | 'cancelled';
  /** 0..1 */
  fraction: number;
  stage: string;
  elapsedMs: number;
  /** When state is 'done': FitOutcome for 'fit', SimulateOutcome for 'simulate', PlanReport for 'plan', DiscCalibrationOutcome for 'disc'. */
  value?: FitOutcome | SimulateOutcome | PlanReport | DiscCalibrationOutcome;
  problem?: ApiProblem;
}

// ---------------------------------------------------------------- logbook

export interface SaveMeasurementRequest {
  asset: string;
  takenAt?: string;
  operator?: string;
  tags: string[];
  notes: string;
  setup: SetupJson;
  frames: FileBlob[];
  darks: FileBlob[];
  result: FitResult;
}

export interface MeasurementQuery {
  asset?: string;
  since?: string;
  until?: string;
  tags?: string[];
  /** Free text matched against notes, tags and asset name. */
  text?: string;
}

export interface CompareRequest {
  a: number;
  b: number;
}

export interface CompareOutcome {
  comparison: Comparison;
  /** Wavefront maps of both, same colour scale. */
  wavefrontA: ImagePlane;
  wavefrontB: ImagePlane;
}

export interface ExportOutcome {
  /** Suggested file name and content. */
  name: string;
  mime: string;
  data: Uint8Array;
}

export interface LogbookInfo {
  path: string;
  writable: boolean;
  assets: number;
  measurements: number;
  /** True when the logbook holds the bundled synthetic demo scenario. */
  demo: boolean;
}

// ---------------------------------------------------------------- the API

export interface ShadowfrontApi {
  app: {
    info(): Promise<ApiReply<{ version: string; shell: 'electron' | 'web'; demo: boolean; logbook: LogbookInfo }>>;
  };
  safety: {
    notice(): Promise<ApiReply<SafetyNotice>>;
    acknowledge(): Promise<ApiReply<{ acknowledgedAt: string }>>;
  };
  setup: {
    check(req: { setup: SetupJson }): Promise<ApiReply<SetupCheck>>;
    /** The bundled demo setup, or a blank example. */
    example(req: { which: 'demo' | 'blank' }): Promise<ApiReply<SetupJson>>;
    listPresets(req: { asset?: string }): Promise<ApiReply<SetupPreset[]>>;
    savePreset(req: { asset: string; name: string; setup: SetupJson }): Promise<ApiReply<SetupPreset>>;
    deletePreset(req: { id: string }): Promise<ApiReply<{ deleted: boolean }>>;
  };
  frames: {
    preview(req: FrameSetRequest): Promise<ApiReply<FramePreview>>;
    /** The bundled synthetic demo frames (before and after cleaning), as files. */
    demoFiles(): Promise<ApiReply<{ setup: SetupJson; frames: FileBlob[]; label: string }[]>>;
  };
  jobs: {
    startFit(req: FitRequest & { asset?: string }): Promise<ApiReply<{ id: string }>>;
    startSimulate(req: SimulateRequest): Promise<ApiReply<{ id: string }>>;
    /** A bench plan as a job (a plan takes seconds): the plan is checked at once, the report is the job's value. */
    startPlan(req: { plan: Record<string, unknown> }): Promise<ApiReply<{ id: string }>>;
    /** A disc calibration as a job: the setup and the angles are checked at once, the calibration is the job's value. */
    startDiscCalibration(req: DiscCalibrationRequest): Promise<ApiReply<{ id: string }>>;
    status(req: { id: string }): Promise<ApiReply<JobStatus>>;
    cancel(req: { id: string }): Promise<ApiReply<{ cancelled: boolean }>>;
  };
  logbook: {
    info(): Promise<ApiReply<LogbookInfo>>;
    assets(): Promise<ApiReply<Asset[]>>;
    discs(): Promise<ApiReply<Disc[]>>;
    /**
     * Store a trusted disc calibration in the disc library: a new disc of that name, or the named disc's
     * calibration. An existing calibration is refused (kind "exists") unless `replace` is set.
     */
    saveDiscProfile(req: SaveDiscProfileRequest): Promise<ApiReply<{ disc: Disc; created: boolean; replaced: boolean }>>;
    measurements(req: MeasurementQuery): Promise<ApiReply<MeasurementSummary[]>>;
    measurement(req: { id: number }): Promise<ApiReply<MeasurementRecord>>;
    save(req: SaveMeasurementRequest): Promise<ApiReply<{ id: number }>>;
    compare(req: CompareRequest): Promise<ApiReply<CompareOutcome>>;
    trend(req: { asset: string; since?: string; until?: string; tags?: string[] }): Promise<ApiReply<Trend>>;
    exportCsv(req: MeasurementQuery): Promise<ApiReply<ExportOutcome>>;
    /** HTML report of the measurements (the Electron shell prints it to PDF; the web mode offers the HTML). */
    exportReport(req: MeasurementQuery & { kind: 'measurement' | 'trend' | 'comparison'; ids?: number[] }): Promise<ApiReply<ExportOutcome>>;
  };
  plan: {
    /** A "shadowfront-plan/1" JSON object (unit strings allowed, parsed at the edge) → the ranked report. */
    run(req: { plan: Record<string, unknown> }): Promise<ApiReply<PlanReport>>;
    example(): Promise<ApiReply<Record<string, unknown>>>;
  };
}

/** The channel names, "group.method": the IPC channels and the HTTP paths (POST /api/<channel>). */
export const API_CHANNELS = [
  'app.info',
  'safety.notice',
  'safety.acknowledge',
  'setup.check',
  'setup.example',
  'setup.listPresets',
  'setup.savePreset',
  'setup.deletePreset',
  'frames.preview',
  'frames.demoFiles',
  'jobs.startFit',
  'jobs.startSimulate',
  'jobs.startPlan',
  'jobs.startDiscCalibration',
  'jobs.status',
  'jobs.cancel',
  'logbook.info',
  'logbook.assets',
  'logbook.discs',
  'logbook.saveDiscProfile',
  'logbook.measurements',
  'logbook.measurement',
  'logbook.save',
  'logbook.compare',
  'logbook.trend',
  'logbook.exportCsv',
  'logbook.exportReport',
  'plan.run',
  'plan.example',
] as const;

export type ApiChannel = (typeof API_CHANNELS)[number];

/** The IPC channel prefix, so that no other channel is mistaken for one of ours. */
export const IPC_PREFIX = 'shadowfront:';

// ---------------------------------------------------------------- wire codec (HTTP)

/**
 * JSON with typed arrays: a Uint8Array becomes {"$u8": base64}, a Float32Array {"$f32": base64},
 * non-finite numbers {"$num": "NaN" | "Infinity" | "-Infinity"}. Pure; uses btoa/atob, present in
 * browsers and in Node ≥ 16.
 */
export function toWire(value: unknown): string {
  return JSON.stringify(value, function replacer(this: unknown, key: string, v: unknown) {
    const raw = (this as Record<string, unknown>)[key];
    if (raw instanceof Uint8Array) return { $u8: bytesToBase64(raw) };
    if (raw instanceof Float32Array) return { $f32: bytesToBase64(new Uint8Array(raw.buffer, raw.byteOffset, raw.byteLength)) };
    if (typeof raw === 'number' && !Number.isFinite(raw)) return { $num: String(raw) };
    return v;
  });
}

export function fromWire(text: string): unknown {
  return JSON.parse(text, (_key, v: unknown) => {
    if (v && typeof v === 'object' && !Array.isArray(v)) {
      const o = v as Record<string, unknown>;
      const keys = Object.keys(o);
      if (keys.length === 1) {
        if (typeof o.$u8 === 'string') return base64ToBytes(o.$u8);
        if (typeof o.$f32 === 'string') {
          const b = base64ToBytes(o.$f32);
          return new Float32Array(b.buffer, b.byteOffset, b.byteLength / 4);
        }
        if (typeof o.$num === 'string') return Number(o.$num);
      }
    }
    return v;
  });
}

function bytesToBase64(bytes: Uint8Array): string {
  let s = '';
  const chunk = 0x8000;
  for (let i = 0; i < bytes.length; i += chunk) s += String.fromCharCode(...bytes.subarray(i, i + chunk));
  return btoa(s);
}

function base64ToBytes(b64: string): Uint8Array {
  const s = atob(b64);
  const out = new Uint8Array(s.length);
  for (let i = 0; i < s.length; i++) out[i] = s.charCodeAt(i);
  return out;
}
