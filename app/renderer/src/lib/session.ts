/**
 * The state of one measurement as it moves through the screens: the bench setup (and its live check),
 * the frames and darks, the region to analyse, the preview, and the fit job. It lives in App so that
 * switching screens loses nothing and a running fit keeps going.
 *
 * All the work happens in the services through the API; this only sequences calls: the setup is checked
 * (debounced) as it is typed, the preview follows a valid setup and the frames, and a fit job is followed
 * by the same loop as every other job (./jobRun.ts useJobRun) until it is done, failed or cancelled.
 */
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import type {
  ApiProblem,
  FileBlob,
  FitOutcome,
  FramePreview,
  JobStatus,
  SetupCheck,
  SetupJson,
  ShadowfrontApi,
} from '../../../shared/contract.ts';
import type { Asset, Disc } from '../../../../core/logbook/types.ts';
import { useJobRun } from './jobRun.ts';

export interface FrameSet {
  frames: FileBlob[];
  darks: FileBlob[];
  /** Where the frames came from, in words ("demo: before cleaning", "2 files"). */
  label: string;
}

export interface Region {
  centerPx: [number, number];
  radiusPx: number;
}

export interface FitUsed {
  setup: SetupJson;
  frames: FileBlob[];
  darks: FileBlob[];
  terms: number[];
  asset: string | null;
  label: string;
  /** The library disc whose calibrated shape the fit applies (its id), and how far it is turned, degrees. */
  disc: number | null;
  discAngleDeg: number | null;
}

/** What the fit is started with on the Result screen. */
export interface FitChoice {
  terms: number[];
  asset: string | null;
  /** A calibrated disc of the library (its id), or null for none. */
  disc?: number | null;
  /** The disc's turn from its calibrated position, degrees (only with `disc`). */
  discAngleDeg?: number | null;
}

export interface FitState {
  running: boolean;
  cancelling: boolean;
  status: JobStatus | null;
  outcome: FitOutcome | null;
  /** What the shown outcome (or the running job) was computed from. */
  used: FitUsed | null;
  /** A plain note on how the last job ended when it gave no result ("cancelled"). */
  note: string | null;
}

export interface Session {
  api: ShadowfrontApi;
  onError: (p: ApiProblem) => void;
  setup: SetupJson | null;
  /** Replace the setup; `immediate` checks it now instead of after the typing pause. */
  setSetup: (s: SetupJson, immediate?: boolean) => void;
  check: SetupCheck | null;
  checking: boolean;
  frameSet: FrameSet;
  setFrameSet: (f: FrameSet) => void;
  region: Region | null;
  setRegion: (r: Region | null) => void;
  preview: FramePreview | null;
  previewBusy: boolean;
  previewProblem: ApiProblem | null;
  fit: FitState;
  startFit: (opts: FitChoice) => void;
  cancelFit: () => void;
  assets: Asset[];
  refreshAssets: () => void;
  /** The logbook's disc library (Result screen: the calibrated ones, calibratedDiscs). */
  discs: Disc[];
  refreshDiscs: () => void;
}

export const CHECK_DELAY_MS = 300;
export const PREVIEW_DELAY_MS = 250;

const EMPTY_FRAMES: FrameSet = { frames: [], darks: [], label: '' };

/** The format of a stored disc profile (core/fit/disc/profile.ts DISC_PROFILE_FORMAT). */
const DISC_PROFILE_FORMAT = 'shadowfront-disc-profile/1';

/** The discs whose stored calibration is a trusted disc profile: the ones a fit can apply. */
export function calibratedDiscs(discs: readonly Disc[]): Disc[] {
  return discs.filter((d) => {
    const c = d.calibration as { format?: unknown; trusted?: unknown } | null | undefined;
    return !!c && typeof c === 'object' && c.format === DISC_PROFILE_FORMAT && c.trusted === true;
  });
}

/** Reads browser File objects into FileBlobs (name and bytes). */
export async function readFiles(files: Iterable<File>): Promise<FileBlob[]> {
  const out: FileBlob[] = [];
  for (const f of files) out.push({ name: f.name, data: new Uint8Array(await f.arrayBuffer()) });
  return out;
}

export function useSession(api: ShadowfrontApi, onError: (p: ApiProblem) => void): Session {
  const [setup, setSetupState] = useState<SetupJson | null>(null);
  const [checked, setChecked] = useState<{ setup: SetupJson; check: SetupCheck } | null>(null);
  const [checking, setChecking] = useState(false);
  const [checkNow, setCheckNow] = useState(0);
  const [frameSet, setFrameSet] = useState<FrameSet>(EMPTY_FRAMES);
  const [region, setRegion] = useState<Region | null>(null);
  const [preview, setPreview] = useState<FramePreview | null>(null);
  const [previewBusy, setPreviewBusy] = useState(false);
  const [previewProblem, setPreviewProblem] = useState<ApiProblem | null>(null);
  const [used, setUsed] = useState<FitUsed | null>(null);
  const fitJob = useJobRun<FitOutcome>(api, onError, 'fit');
  const [assets, setAssets] = useState<Asset[]>([]);
  const [discs, setDiscs] = useState<Disc[]>([]);
  const onErrorRef = useRef(onError);
  onErrorRef.current = onError;
  const immediateRef = useRef(false);

  const setSetup = useCallback((s: SetupJson, immediate = false) => {
    immediateRef.current = immediate;
    setSetupState(s);
    if (immediate) setCheckNow((n) => n + 1);
  }, []);

  // Live check of the setup, after a typing pause.
  useEffect(() => {
    if (!setup) return;
    let stale = false;
    const delay = immediateRef.current ? 0 : CHECK_DELAY_MS;
    immediateRef.current = false;
    const timer = setTimeout(async () => {
      setChecking(true);
      const reply = await api.setup.check({ setup });
      if (stale) return;
      setChecking(false);
      if (reply.ok) setChecked({ setup, check: reply.value });
      else onErrorRef.current(reply.problem);
    }, delay);
    return () => {
      stale = true;
      clearTimeout(timer);
    };
  }, [api, setup, checkNow]);

  // The preview follows a valid checked setup, the frames and the region.
  const validSetup = checked && checked.check.derived && !checked.check.problem ? checked.setup : null;
  useEffect(() => {
    if (frameSet.frames.length === 0) {
      setPreview(null);
      setPreviewProblem(null);
      return;
    }
    if (!validSetup) return;
    let stale = false;
    const timer = setTimeout(async () => {
      setPreviewBusy(true);
      const reply = await api.frames.preview({ frames: frameSet.frames, darks: frameSet.darks, setup: validSetup, region });
      if (stale) return;
      setPreviewBusy(false);
      if (reply.ok) {
        setPreview(reply.value);
        setPreviewProblem(null);
      } else {
        setPreview(null);
        setPreviewProblem(reply.problem);
        onErrorRef.current(reply.problem);
      }
    }, PREVIEW_DELAY_MS);
    return () => {
      stale = true;
      clearTimeout(timer);
      setPreviewBusy(false);
    };
  }, [api, frameSet, validSetup, region]);

  const setFrames = useCallback((f: FrameSet) => {
    setFrameSet(f);
    setRegion(null);
  }, []);

  const refreshAssets = useCallback(() => {
    void api.logbook.assets().then((reply) => {
      if (reply.ok) setAssets(reply.value);
      else onErrorRef.current(reply.problem);
    });
  }, [api]);

  useEffect(() => {
    refreshAssets();
  }, [refreshAssets]);

  const refreshDiscs = useCallback(() => {
    void api.logbook.discs().then((reply) => {
      if (reply.ok) setDiscs(reply.value);
      else onErrorRef.current(reply.problem);
    });
  }, [api]);

  const { start: startJob } = fitJob;
  const startFit = useCallback(
    (opts: FitChoice) => {
      if (fitJob.running) return;
      const s = setup;
      if (!s || frameSet.frames.length === 0) {
        onErrorRef.current({ kind: 'frame', message: 'Load at least one frame (Frames screen) and a valid bench setup before running the fit.' });
        return;
      }
      const disc = opts.disc ?? null;
      const next: FitUsed = {
        setup: s,
        frames: frameSet.frames,
        darks: frameSet.darks,
        terms: opts.terms,
        asset: opts.asset,
        label: frameSet.label,
        disc,
        discAngleDeg: disc !== null ? (opts.discAngleDeg ?? null) : null,
      };
      const started = startJob(() =>
        api.jobs.startFit({
          frames: next.frames,
          darks: next.darks,
          setup: next.setup,
          region,
          terms: next.terms,
          ...(next.asset ? { asset: next.asset } : {}),
          ...(next.disc !== null ? { disc: next.disc } : {}),
          ...(next.discAngleDeg !== null ? { discAngleDeg: next.discAngleDeg } : {}),
        }),
      );
      if (started) setUsed(next);
    },
    [api, startJob, fitJob.running, setup, frameSet, region],
  );

  const fit: FitState = useMemo(
    () => ({ running: fitJob.running, cancelling: fitJob.cancelling, status: fitJob.status, outcome: fitJob.value, used, note: fitJob.note }),
    [fitJob.running, fitJob.cancelling, fitJob.status, fitJob.value, fitJob.note, used],
  );

  return {
    api,
    onError,
    setup,
    setSetup,
    check: checked?.check ?? null,
    checking,
    frameSet,
    setFrameSet: setFrames,
    region,
    setRegion,
    preview,
    previewBusy,
    previewProblem,
    fit,
    startFit,
    cancelFit: fitJob.cancel,
    assets,
    refreshAssets,
    discs,
    refreshDiscs,
  };
}
