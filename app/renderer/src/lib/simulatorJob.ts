/**
 * Following a job (contract: jobs.start* → poll jobs.status about every 200 ms → done, failed or
 * cancelled). Pure apart from the waiting, which is injected so that tests need no clock. The one polling
 * loop of the interface: the simulator screen and ./jobRun.ts useJobRun (fits, plans, disc calibrations).
 */
import type { ApiProblem, ApiReply, JobStatus } from '../../../shared/contract.ts';

export const POLL_INTERVAL_MS = 200;

export interface JobStatusApi {
  status(req: { id: string }): Promise<ApiReply<JobStatus>>;
}

export type JobEnd = { ok: true; status: JobStatus } | { ok: false; problem: ApiProblem };

export interface PollOptions {
  intervalMs?: number;
  /** Called with every status read, the last one included. */
  onStatus?: (s: JobStatus) => void;
  /** Stop following (the job keeps its own state; cancel it separately). */
  stopped?: () => boolean;
  sleep?: (ms: number) => Promise<void>;
}

const defaultSleep = (ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms));

/**
 * Poll until the job leaves "running". A job that failed gives its problem; a cancelled job gives
 * ok with state "cancelled"; a reply that is not ok gives that problem; a stopped poll gives a
 * problem of kind "cancelled".
 */
export async function followJob(api: JobStatusApi, id: string, opts: PollOptions = {}): Promise<JobEnd> {
  const sleep = opts.sleep ?? defaultSleep;
  const interval = opts.intervalMs ?? POLL_INTERVAL_MS;
  for (;;) {
    if (opts.stopped?.()) return { ok: false, problem: { kind: 'cancelled', message: 'Stopped following the job.' } };
    const reply = await api.status({ id });
    if (!reply.ok) return { ok: false, problem: reply.problem };
    const s = reply.value;
    opts.onStatus?.(s);
    if (s.state === 'failed') {
      return { ok: false, problem: s.problem ?? { kind: 'internal', message: `The ${s.kind} job stopped with an error at "${s.stage}".` } };
    }
    if (s.state !== 'running') return { ok: true, status: s };
    await sleep(interval);
  }
}

/** "Simulating… 45 %" style text for a progress bar's label. */
export function progressText(s: Pick<JobStatus, 'stage' | 'fraction' | 'state'>): string {
  const pct = Math.round(Math.min(1, Math.max(0, Number.isFinite(s.fraction) ? s.fraction : 0)) * 100);
  if (s.state === 'cancelled') return 'Cancelled.';
  if (s.state === 'failed') return 'Stopped with an error.';
  if (s.state === 'done') return 'Done.';
  return `${s.stage || 'Working'} — ${pct} %`;
}
