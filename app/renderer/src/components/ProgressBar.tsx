/** A progress bar with the stage in words, the elapsed time and an optional Cancel button. */
import type { JSX } from 'react';
import type { JobStatus } from '../../../shared/contract.ts';

export function ProgressBar(props: {
  fraction: number;
  stage: string;
  elapsedMs?: number;
  onCancel?: () => void;
  cancelTestId?: string;
  testId?: string;
  cancelling?: boolean;
}): JSX.Element {
  const f = Math.min(1, Math.max(0, Number.isFinite(props.fraction) ? props.fraction : 0));
  return (
    <div className="progress" data-testid={props.testId}>
      <div className="progress-track" role="progressbar" aria-valuemin={0} aria-valuemax={100} aria-valuenow={Math.round(100 * f)} aria-label={props.stage}>
        <div className="progress-fill" style={{ width: `${(100 * f).toFixed(1)}%` }} />
      </div>
      <span className="progress-text">
        {props.stage} · {Math.round(100 * f)} %
        {props.elapsedMs !== undefined ? ` · ${(props.elapsedMs / 1000).toFixed(1)} s` : ''}
      </span>
      {props.onCancel ? (
        <button type="button" onClick={props.onCancel} data-testid={props.cancelTestId} disabled={props.cancelling}>
          {props.cancelling ? 'Cancelling…' : 'Cancel'}
        </button>
      ) : null}
    </div>
  );
}

/** A running job's progress bar, or how the last one ended when it gave no value; the same on every screen. */
export function JobProgress(props: {
  job: { running: boolean; cancelling: boolean; status: JobStatus | null; note: string | null };
  onCancel: () => void;
  testId: string;
  cancelTestId: string;
}): JSX.Element {
  const { job } = props;
  return (
    <>
      {job.running ? (
        <ProgressBar
          fraction={job.status?.fraction ?? 0}
          stage={job.status?.stage ?? 'starting'}
          elapsedMs={job.status?.elapsedMs}
          onCancel={props.onCancel}
          cancelTestId={props.cancelTestId}
          testId={props.testId}
          cancelling={job.cancelling}
        />
      ) : null}
      {job.note && !job.running ? <p className="muted">{job.note}</p> : null}
    </>
  );
}
