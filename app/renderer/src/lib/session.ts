/**
 * The state of one measurement as it moves through the screens: the bench setup (and its live check),
 * the frames and darks, the region to analyse, the preview, and the fit job. It lives in App so that
 * switching screens loses nothing and a running fit keeps going.
 *
 * All the work happens in the services through the API; this only sequences calls: the setup is checked
 * (debounced) as it is typed, the preview follows a valid setup and the frames, and a fit job is polled
 * about every 200 ms until it is done, failed or cancelled.
 */
import { useCallback, useEffect, useRef, useState } from 'react';
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
import type { Asset } from '../../../../core/logbook/types.ts';

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
  startFit: (opts: { terms: number[]; asset: string | null }) => void;
  cancelFit: () => void;
  assets: Asset[];
  refreshAssets: () => void;
}

export const CHECK_DELAY_MS = 300;
export const PREVIEW_DELAY_MS = 250;
export const POLL_MS = 200;

const EMPTY_FRAMES: FrameSet = { frames: [], darks: [], label: '' };
const IDLE_FIT: FitState = { running: false, cancelling: false, status: null, outcome: null, used: null, note: null };

/** Reads browser File objects into FileBlobs (name and bytes). */
export async function readFiles(files: Iterable<File>): Promise<FileBlob[]> {
  const out: FileBlob[] = [];
  for (const f of files) out.push({ name: f.name, data: new Uint8Array(await f.arrayBuffer()) });
  return out;
}

function sleep(ms: number): Promise<void> {
  return new Promise((r) => setTimeout(r, ms));
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
  const [fit, setFit] = useState<FitState>(IDLE_FIT);
  const [assets, setAssets] = useState<Asset[]>([]);
  const jobRef = useRef<string | null>(null);
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

  const startFit = useCallback(
    (opts: { terms: number[]; asset: string | null }) => {
      if (jobRef.current) return;
      const s = setup;
      if (!s || frameSet.frames.length === 0) {
        onErrorRef.current({ kind: 'frame', message: 'Load at least one frame (Frames screen) and a valid bench setup before running the fit.' });
        return;
      }
      const used: FitUsed = { setup: s, frames: frameSet.frames, darks: frameSet.darks, terms: opts.terms, asset: opts.asset, label: frameSet.label };
      const marker = `starting-${Date.now()}`;
      jobRef.current = marker;
      setFit({ running: true, cancelling: false, status: null, outcome: null, used, note: null });
      void (async () => {
        const started = await api.jobs.startFit({
          frames: used.frames,
          darks: used.darks,
          setup: used.setup,
          region,
          terms: used.terms,
          ...(used.asset ? { asset: used.asset } : {}),
        });
        if (!started.ok) {
          jobRef.current = null;
          setFit((f) => ({ ...f, running: false }));
          onErrorRef.current(started.problem);
          return;
        }
        const id = started.value.id;
        if (jobRef.current !== marker) {
          // cancelled while starting
          await api.jobs.cancel({ id });
          return;
        }
        jobRef.current = id;
        for (;;) {
          const st = await api.jobs.status({ id });
          if (jobRef.current !== id) return;
          if (!st.ok) {
            jobRef.current = null;
            setFit((f) => ({ ...f, running: false, cancelling: false }));
            onErrorRef.current(st.problem);
            return;
          }
          const status = st.value;
          if (status.state === 'running') {
            setFit((f) => ({ ...f, status }));
            await sleep(POLL_MS);
            continue;
          }
          jobRef.current = null;
          if (status.state === 'done') {
            setFit({ running: false, cancelling: false, status, outcome: (status.value as FitOutcome) ?? null, used, note: null });
          } else if (status.state === 'cancelled') {
            setFit((f) => ({ ...f, running: false, cancelling: false, status, note: 'The fit was cancelled; nothing was changed.' }));
          } else {
            setFit((f) => ({ ...f, running: false, cancelling: false, status, note: 'The fit stopped with a problem (see the message above).' }));
            onErrorRef.current(status.problem ?? { kind: 'internal', message: 'The fit stopped without saying why.' });
          }
          return;
        }
      })();
    },
    [api, setup, frameSet, region],
  );

  const cancelFit = useCallback(() => {
    const id = jobRef.current;
    if (!id) return;
    setFit((f) => ({ ...f, cancelling: true }));
    if (id.startsWith('starting-')) {
      jobRef.current = null;
      setFit((f) => ({ ...f, running: false, cancelling: false, note: 'The fit was cancelled; nothing was changed.' }));
      return;
    }
    void api.jobs.cancel({ id }).then((reply) => {
      if (!reply.ok) onErrorRef.current(reply.problem);
    });
  }, [api]);

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
    cancelFit,
    assets,
    refreshAssets,
  };
}
