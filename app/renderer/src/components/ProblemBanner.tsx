/** The problems of this window in plain words, newest first, each with a close button. */
import type { JSX } from 'react';
import type { ApiProblem } from '../../../shared/contract.ts';

export interface ShownProblem extends ApiProblem {
  /** Unique per shown problem. */
  key: number;
  /** How many times the same message came in a row. */
  repeats: number;
}

export function ProblemBanner(props: { problems: ShownProblem[]; onDismiss: (key: number) => void; onDismissAll: () => void }): JSX.Element | null {
  const { problems, onDismiss, onDismissAll } = props;
  if (problems.length === 0) return null;
  return (
    <section className="problem-banner" data-testid="problem-banner" role="alert" aria-live="assertive">
      <ul>
        {problems.map((p) => (
          <li key={p.key} className={`problem problem-${p.kind}`}>
            <span className="problem-text">
              {p.message}
              {p.repeats > 1 ? <span className="muted"> (×{p.repeats})</span> : null}
            </span>
            <button type="button" className="small" onClick={() => onDismiss(p.key)} aria-label="Dismiss this message">
              Dismiss
            </button>
          </li>
        ))}
      </ul>
      {problems.length > 1 ? (
        <button type="button" className="small" onClick={onDismissAll}>
          Dismiss all
        </button>
      ) : null}
    </section>
  );
}
