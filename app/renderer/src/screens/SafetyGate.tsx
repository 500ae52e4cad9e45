/**
 * The laser-safety notice. It is shown on every start before anything else and blocks the window until
 * the button is pressed; the header's "Laser safety" button shows it again at any time. The text comes
 * from the services (core/safety.ts); if they cannot be reached, the same text is shown from core.
 * The acknowledgement may be remembered for the current day only; the notice is never switched off.
 */
import { useEffect, useRef, useState } from 'react';
import type { JSX } from 'react';
import type { ApiProblem, SafetyNotice, ShadowfrontApi } from '../../../shared/contract.ts';
import { SAFETY_POINTS, SAFETY_TITLE } from '../../../../core/safety.ts';

export function SafetyGate(props: {
  api: ShadowfrontApi;
  onError: (p: ApiProblem) => void;
  onAcknowledged: () => void;
}): JSX.Element {
  const { api, onError, onAcknowledged } = props;
  const [notice, setNotice] = useState<SafetyNotice | null>(null);
  const [busy, setBusy] = useState(false);
  const buttonRef = useRef<HTMLButtonElement>(null);

  useEffect(() => {
    let stale = false;
    void api.safety.notice().then((reply) => {
      if (stale) return;
      if (reply.ok) setNotice(reply.value);
      else {
        onError(reply.problem);
        setNotice({ title: SAFETY_TITLE, points: [...SAFETY_POINTS], acknowledgedToday: false });
      }
    });
    return () => {
      stale = true;
    };
  }, [api, onError]);

  useEffect(() => {
    if (notice) buttonRef.current?.focus();
  }, [notice]);

  const acknowledge = async (): Promise<void> => {
    setBusy(true);
    const reply = await api.safety.acknowledge();
    setBusy(false);
    if (!reply.ok) onError(reply.problem);
    onAcknowledged();
  };

  return (
    <div className="gate-backdrop">
      <section className="gate" data-testid="safety-notice" role="dialog" aria-modal="true" aria-labelledby="safety-title">
        <h1 id="safety-title">
          <span className="gate-mark" aria-hidden="true">⚠</span> {notice?.title ?? SAFETY_TITLE}
        </h1>
        {notice ? (
          <>
            <p className="gate-lead">Before you work at the bench:</p>
            <ul className="gate-points">
              {notice.points.map((p) => (
                <li key={p}>{p}</li>
              ))}
            </ul>
            {notice.acknowledgedToday ? (
              <p className="gate-today" data-testid="safety-acknowledged-today">
                You acknowledged this notice earlier today on this computer. Read it again whenever the bench or the laser has changed.
              </p>
            ) : null}
            <p className="muted small-text">This program only reminds you; it does not replace your site's laser safety rules or training.</p>
            <button ref={buttonRef} type="button" className="primary big" onClick={() => void acknowledge()} disabled={busy} data-testid="safety-acknowledge">
              I have read this and will follow my site's laser safety rules
            </button>
          </>
        ) : (
          <p className="muted">Loading the notice…</p>
        )}
      </section>
    </div>
  );
}
