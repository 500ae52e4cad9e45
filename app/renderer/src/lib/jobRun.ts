/**
 * One long job of the services (a fit, a bench plan, a disc calibration) as the interface follows it: start
 * it, poll `jobs.status` about every 200 ms for progress (the shared loop, ./simulatorJob.ts followJob), and
 * end with its value, a cancel or a problem shown in plain words. Kept in App (not in a screen), so that
 * switching screens neither loses nor stops it. A cancel while the job is still starting cancels it as soon
 * as its id arrives.
 */
import { useCallback, useRef, useState } from 'react';
import type { ApiProblem, ApiReply, JobStatus, ShadowfrontApi } from '../../../shared/contract.ts';
import { followJob, POLL_INTERVAL_MS } from './simulatorJob.ts';

/** How often a running job is polled, ms. */
export const POLL_MS = POLL_INTERVAL_MS;

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
  /** Start a job (`startFn` calls a jobs.start* channel); ignored while one runs. True when it was started. */
  start: (startFn: () => Promise<ApiReply<{ id: string }>>) => boolean;
  cancel: () => void;
  /** Forget the shown value (e.g. when the inputs change). */
  clear: () => void;
}

const IDLE = { running: false, cancelling: false, status: null, value: null, note: null };

/** `what` names the work in the notes ("The calibration was cancelled"). */
export function useJobRun<T>(api: ShadowfrontApi, onError: (p: ApiProblem) => void, what: string): JobRun<T> {
  const [state, setState] = useState<JobRunState<T>>(IDLE);
  const jobRef = useRef<string | null>(null);
  const onErrorRef = useRef(onError);
  onErrorRef.current = onError;

  const start = useCallback(
    (startFn: () => Promise<ApiReply<{ id: string }>>): boolean => {
      if (jobRef.current) return false;
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
        let last: JobStatus | null = null;
        const end = await followJob(api.jobs, id, {
          intervalMs: POLL_MS,
          stopped: () => jobRef.current !== id,
          onStatus: (status) => {
            last = status;
            if (status.state === 'running' && jobRef.current === id) setState((s) => ({ ...s, status }));
          },
        });
        if (jobRef.current !== id) return;
        jobRef.current = null;
        const status = last as JobStatus | null;
        if (end.ok && end.status.state === 'done') {
          setState({ running: false, cancelling: false, status: end.status, value: (end.status.value as T | undefined) ?? null, note: null });
        } else if (end.ok) {
          setState((s) => ({ ...s, running: false, cancelling: false, status: end.status, note: `The ${what} was cancelled; nothing was changed.` }));
        } else if (status?.state === 'failed') {
          setState((s) => ({ ...s, running: false, cancelling: false, status, note: `The ${what} stopped with a problem (see the message above).` }));
          onErrorRef.current(end.problem);
        } else {
          // the status could not be read (e.g. the connection to the service was lost)
          setState((s) => ({ ...s, running: false, cancelling: false }));
          onErrorRef.current(end.problem);
        }
      })();
      return true;
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
