/**
 * The disc-calibration screen's state, kept in App so that switching screens loses nothing: which setup
 * to use, the frames per disc angle, the beam mode, the disc's name, the calibration job and its result,
 * the disc library and the last save. All the work happens in the services (jobs.startDiscCalibration,
 * logbook.saveDiscProfile, logbook.discs); the angles are sent as typed and parsed by the service.
 */
import { useCallback, useEffect, useRef, useState } from 'react';
import type { ApiProblem, DiscCalibrationOutcome, FileBlob, SetupJson, ShadowfrontApi } from '../../../shared/contract.ts';
import type { Disc } from '../../../../core/logbook/types.ts';
import type { DiscProfile } from '../../../../core/fit/disc/profile.ts';
import { useJobRun, type JobRun } from './jobRun.ts';

export interface AngleSlot {
  key: number;
  /** As typed: degrees, or with a unit. */
  angle: string;
  frames: FileBlob[];
  darks: FileBlob[];
}

export type SetupSource = 'session' | 'demo' | 'file';

/** What the shown result was computed from. */
export interface CalibrationUsed {
  setupLabel: string;
  angles: string[];
  beam: 'fit' | 'ideal';
}

export interface SavedDisc {
  id: number;
  name: string;
  created: boolean;
  replaced: boolean;
}

export interface DiscCalibrationState {
  setupSource: SetupSource;
  setSetupSource: (s: SetupSource) => void;
  fileSetup: { name: string; setup: SetupJson } | null;
  setFileSetup: (f: { name: string; setup: SetupJson } | null) => void;
  slots: AngleSlot[];
  updateSlot: (key: number, change: Partial<Omit<AngleSlot, 'key'>>) => void;
  addSlot: () => void;
  removeSlot: (key: number) => void;
  beam: 'fit' | 'ideal';
  setBeam: (b: 'fit' | 'ideal') => void;
  harmonics: boolean;
  setHarmonics: (h: boolean) => void;
  name: string;
  setName: (n: string) => void;
  job: JobRun<DiscCalibrationOutcome>;
  used: CalibrationUsed | null;
  /** Start the calibration with `sessionSetup` when the setup source is the session's. */
  run: (sessionSetup: SetupJson | null) => void;
  library: Disc[];
  libraryLoaded: boolean;
  refreshLibrary: () => void;
  saving: boolean;
  saved: SavedDisc | null;
  /** Store the shown calibration under `name`; `replace` confirms replacing an existing calibration. */
  save: (replace: boolean) => Promise<void>;
}

let nextKey = 1;
const slot = (angle: string): AngleSlot => ({ key: nextKey++, angle, frames: [], darks: [] });

export function useDiscCalibration(api: ShadowfrontApi, onError: (p: ApiProblem) => void): DiscCalibrationState {
  const [setupSource, setSetupSource] = useState<SetupSource>('session');
  const [fileSetup, setFileSetup] = useState<{ name: string; setup: SetupJson } | null>(null);
  const [slots, setSlots] = useState<AngleSlot[]>(() => [slot('0'), slot('90')]);
  const [beam, setBeam] = useState<'fit' | 'ideal'>('fit');
  const [harmonics, setHarmonics] = useState(false);
  const [name, setName] = useState('');
  const [used, setUsed] = useState<CalibrationUsed | null>(null);
  const [library, setLibrary] = useState<Disc[]>([]);
  const [libraryLoaded, setLibraryLoaded] = useState(false);
  const [saving, setSaving] = useState(false);
  const [saved, setSaved] = useState<SavedDisc | null>(null);
  const job = useJobRun<DiscCalibrationOutcome>(api, onError, 'disc calibration');
  const onErrorRef = useRef(onError);
  onErrorRef.current = onError;

  const refreshLibrary = useCallback(() => {
    void api.logbook.discs().then((reply) => {
      setLibraryLoaded(true);
      if (reply.ok) setLibrary(reply.value);
      else onErrorRef.current(reply.problem);
    });
  }, [api]);

  useEffect(() => {
    refreshLibrary();
  }, [refreshLibrary]);

  const updateSlot = useCallback((key: number, change: Partial<Omit<AngleSlot, 'key'>>) => {
    setSlots((list) => list.map((s) => (s.key === key ? { ...s, ...change } : s)));
  }, []);
  const addSlot = useCallback(() => setSlots((list) => [...list, slot('')]), []);
  const removeSlot = useCallback((key: number) => setSlots((list) => (list.length > 1 ? list.filter((s) => s.key !== key) : list)), []);

  const run = useCallback(
    (sessionSetup: SetupJson | null) => {
      const sets = slots.map((s) => ({ angle: s.angle, frames: s.frames, ...(s.darks.length ? { darks: s.darks } : {}) }));
      const angles = slots.map((s) => s.angle.trim());
      const source = setupSource;
      const file = fileSetup;
      setSaved(null);
      job.start(async () => {
        let setup: SetupJson | null;
        let setupLabel: string;
        if (source === 'session') {
          setup = sessionSetup;
          setupLabel = 'the setup of the Bench setup screen';
        } else if (source === 'file') {
          setup = file?.setup ?? null;
          setupLabel = file ? `the setup file ${file.name}` : '';
        } else {
          const ex = await api.setup.example({ which: 'demo' });
          if (!ex.ok) return ex;
          setup = ex.value;
          setupLabel = 'the demo setup (synthetic)';
        }
        if (!setup) {
          return {
            ok: false as const,
            problem: {
              kind: 'setup',
              field: 'setup',
              message: source === 'file' ? 'Open the setup file of the calibration bench first (or choose another setup).' : 'There is no bench setup yet: fill in the Bench setup screen, or choose the demo setup or a setup file.',
            },
          };
        }
        const reply = await api.jobs.startDiscCalibration({ setup, sets, beam, harmonics });
        if (reply.ok) setUsed({ setupLabel, angles, beam });
        return reply;
      });
    },
    [api, job, slots, setupSource, fileSetup, beam, harmonics],
  );

  const save = useCallback(
    async (replace: boolean) => {
      const outcome = job.value;
      if (!outcome) return;
      const n = name.trim();
      if (!n) {
        onErrorRef.current({ kind: 'invalid-input', field: 'name', message: 'Name the disc to store its calibration under (a new name adds the disc to the library).' });
        return;
      }
      setSaving(true);
      const reply = await api.logbook.saveDiscProfile({ name: n, profile: outcome.profile as unknown as Record<string, unknown>, ...(replace ? { replace: true } : {}) });
      setSaving(false);
      if (!reply.ok) {
        onErrorRef.current(reply.problem);
        if (reply.problem.kind === 'exists') refreshLibrary(); // the library was out of date: the screen then asks to confirm
        return;
      }
      setSaved({ id: reply.value.disc.id, name: reply.value.disc.name, created: reply.value.created, replaced: reply.value.replaced });
      refreshLibrary();
    },
    [api, job.value, name, refreshLibrary],
  );

  return {
    setupSource,
    setSetupSource,
    fileSetup,
    setFileSetup,
    slots,
    updateSlot,
    addSlot,
    removeSlot,
    beam,
    setBeam,
    harmonics,
    setHarmonics,
    name,
    setName,
    job,
    used,
    run,
    library,
    libraryLoaded,
    refreshLibrary,
    saving,
    saved,
    save,
  };
}

/** A stored calibration read as a disc profile for display, or null when it does not look like one (format and numbers). */
export function profileOf(d: Disc): DiscProfile | null {
  const c = d.calibration as Partial<DiscProfile> | null | undefined;
  if (!c || typeof c !== 'object' || c.format !== 'shadowfront-disc-profile/1') return null;
  if (typeof c.ellipticity !== 'number' || typeof c.axisRad !== 'number' || typeof c.radiusM !== 'number') return null;
  return c as DiscProfile;
}

/** The library disc that a name (or "#id") refers to, as the service would find it. */
export function discNamed(library: Disc[], name: string): Disc | undefined {
  const t = name.trim();
  const m = /^#?(\d+)$/.exec(t);
  return m ? library.find((d) => d.id === Number(m[1])) : library.find((d) => d.name === t);
}
