/**
 * One long job of the services (a bench plan, a disc calibration) as the interface follows it: start it,
 * poll `jobs.status` about every 200 ms for progress, and end with its value, a cancel or a problem shown
 * in plain words. Kept in App (not in a screen), so that switching screens neither loses nor stops it.
 */
import { useCallback, useRef, useState } from 'react';
import type { ApiProblem, ApiReply, JobStatus, ShadowfrontApi } from '../../../shared/contract.ts';
import { POLL_MS } from './session.ts';

export interface JobRunState<T> {
  running: boolean;
  cancelling: boolean;
  status: JobStatus | null;
  /** The value of the last job that finished. */
  value: T | null;
  /** How the last job ended when it gave no value, in plain words. */
  note: string | null;
}

export interface JobRun<T> extends JobRunState<T> {
  /** Start a job (`startFn` calls a jobs.start* channel); ignored while one runs. */
  start: (startFn: () => Promise<ApiReply<{ id: string }>>) => void;
  cancel: () => void;
  /** Forget the shown value (e.g. when the inputs change). */
  clear: () => void;
}

const IDLE = { running: false, cancelling: false, status: null, value: null, note: null };

function sleep(ms: number): Promise<void> {
  return new Promise((r) => setTimeout(r, ms));
}

/** `what` names the work in the notes ("The calibration was cancelled"). */
export function useJobRun<T>(api: ShadowfrontApi, onError: (p: ApiProblem) => void, what: string): JobRun<T> {
  const [state, setState] = useState<JobRunState<T>>(IDLE);
  const jobRef = useRef<string | null>(null);
  const onErrorRef = useRef(onError);
  onErrorRef.current = onError;

  const start = useCallback(
    (startFn: () => Promise<ApiReply<{ id: string }>>) => {
      if (jobRef.current) return;
      const marker = `starting-${Date.now()}`;
      jobRef.current = marker;
      setState({ running: true, cancelling: false, status: null, value: null, note: null });
      void (async () => {
        const started = await startFn();
        if (!started.ok) {
          if (jobRef.current === marker) jobRef.current = null;
          setState((s) => ({ ...s, running: false, cancelling: false }));
          onErrorRef.current(started.problem);
          return;
        }
        const id = started.value.id;
        if (jobRef.current !== marker) {
          await api.jobs.cancel({ id }); // cancelled while it was starting
          return;
        }
        jobRef.current = id;
        for (;;) {
          const st = await api.jobs.status({ id });
          if (jobRef.current !== id) return;
          if (!st.ok) {
            jobRef.current = null;
            setState((s) => ({ ...s, running: false, cancelling: false }));
            onErrorRef.current(st.problem);
            return;
          }
          const status = st.value;
          if (status.state === 'running') {
            setState((s) => ({ ...s, status }));
            await sleep(POLL_MS);
            continue;
          }
          jobRef.current = null;
          if (status.state === 'done') {
            setState({ running: false, cancelling: false, status, value: (status.value as T | undefined) ?? null, note: null });
          } else if (status.state === 'cancelled') {
            setState((s) => ({ ...s, running: false, cancelling: false, status, note: `The ${what} was cancelled; nothing was changed.` }));
          } else {
            setState((s) => ({ ...s, running: false, cancelling: false, status, note: `The ${what} stopped with a problem (see the message above).` }));
            onErrorRef.current(status.problem ?? { kind: 'internal', message: `The ${what} stopped without saying why.` });
          }
          return;
        }
      })();
    },
    [api, what],
  );

  const cancel = useCallback(() => {
    const id = jobRef.current;
    if (!id) return;
    setState((s) => ({ ...s, cancelling: true }));
    if (id.startsWith('starting-')) {
      jobRef.current = null;
      setState((s) => ({ ...s, running: false, cancelling: false, note: `The ${what} was cancelled; nothing was changed.` }));
      return;
    }
    void api.jobs.cancel({ id }).then((reply) => {
      if (!reply.ok) onErrorRef.current(reply.problem);
    });
  }, [api, what]);

  const clear = useCallback(() => setState((s) => (s.running ? s : { ...s, value: null, note: null })), []);

  return { ...state, start, cancel, clear };
}
