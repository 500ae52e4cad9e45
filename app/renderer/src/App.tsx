/**
 * The window: the laser-safety notice first, then the screens (Bench setup, Frames, Result, Compare,
 * Logbook, Simulator, Planner, Discs) under one header. Every problem from the services, and any error in the window
 * itself, is shown in plain words in the problem banner.
 */
import { Component, useCallback, useEffect, useRef, useState } from 'react';
import type { ErrorInfo, JSX, ReactNode } from 'react';
import type { ApiProblem, LogbookInfo, ShadowfrontApi } from '../../shared/contract.ts';
import { ProblemBanner } from './components/ProblemBanner.tsx';
import type { ShownProblem } from './components/ProblemBanner.tsx';
import { useSession } from './lib/session.ts';
import { SafetyGate } from './screens/SafetyGate.tsx';
import { SetupScreen } from './screens/SetupScreen.tsx';
import { FramesScreen } from './screens/FramesScreen.tsx';
import { ResultScreen } from './screens/ResultScreen.tsx';
import { CompareScreen } from './screens/CompareScreen.tsx';
import { LogbookScreen } from './screens/LogbookScreen.tsx';
import { SimulatorScreen } from './screens/SimulatorScreen.tsx';
import { PlannerScreen } from './screens/PlannerScreen.tsx';
import { DiscScreen } from './screens/DiscScreen.tsx';
import { usePlanner } from './lib/planner.ts';
import { useDiscCalibration } from './lib/discCalibration.ts';

export type ScreenId = 'setup' | 'frames' | 'result' | 'compare' | 'logbook' | 'simulator' | 'planner' | 'discs';

export const SCREENS: { id: ScreenId; label: string; key: string }[] = [
  { id: 'setup', label: 'Bench setup', key: '1' },
  { id: 'frames', label: 'Frames', key: '2' },
  { id: 'result', label: 'Result', key: '3' },
  { id: 'compare', label: 'Compare', key: '4' },
  { id: 'logbook', label: 'Logbook', key: '5' },
  { id: 'simulator', label: 'Simulator', key: '6' },
  { id: 'planner', label: 'Planner', key: '7' },
  { id: 'discs', label: 'Discs', key: '8' },
];

interface AppInfo {
  version: string;
  shell: 'electron' | 'web';
  demo: boolean;
  logbook: LogbookInfo;
}

const MAX_PROBLEMS = 5;

/** A window error in plain words: the message only, never a stack. */
export function windowErrorProblem(what: unknown): ApiProblem {
  const msg = what instanceof Error ? what.message : typeof what === 'string' ? what : 'an unexpected error';
  return {
    kind: 'internal',
    message: `Something went wrong in this window (${msg.split('\n')[0]}). Nothing saved in the logbook is affected; if the screen looks wrong, reload the page.`,
  };
}

export function App(props: { api: ShadowfrontApi }): JSX.Element {
  const { api } = props;
  const [problems, setProblems] = useState<ShownProblem[]>([]);
  const nextKey = useRef(1);
  const onError = useCallback((p: ApiProblem) => {
    setProblems((list) => {
      const first = list[0];
      if (first && first.message === p.message) return [{ ...first, repeats: first.repeats + 1 }, ...list.slice(1)];
      return [{ ...p, key: nextKey.current++, repeats: 1 }, ...list].slice(0, MAX_PROBLEMS);
    });
  }, []);
  const dismiss = useCallback((key: number) => setProblems((list) => list.filter((p) => p.key !== key)), []);

  const [gate, setGate] = useState<'start' | 'reopened' | 'closed'>('start');
  const [info, setInfo] = useState<AppInfo | null>(null);
  const [screen, setScreen] = useState<ScreenId>('setup');
  const session = useSession(api, onError);
  const planner = usePlanner(api, onError);
  const discCalibration = useDiscCalibration(api, onError);
  const mainRef = useRef<HTMLElement>(null);
  const setupLoaded = useRef(false);

  // Errors in the window itself (not from the services) still reach the banner, in plain words.
  useEffect(() => {
    const onWindowError = (e: ErrorEvent): void => {
      if (/ResizeObserver loop/.test(e.message)) return; // benign browser notice, not an error of ours
      onError(windowErrorProblem(e.error ?? e.message));
    };
    const onRejection = (e: PromiseRejectionEvent): void => onError(windowErrorProblem(e.reason));
    window.addEventListener('error', onWindowError);
    window.addEventListener('unhandledrejection', onRejection);
    return () => {
      window.removeEventListener('error', onWindowError);
      window.removeEventListener('unhandledrejection', onRejection);
    };
  }, [onError]);

  useEffect(() => {
    void api.app.info().then(async (reply) => {
      if (!reply.ok) {
        onError(reply.problem);
        return;
      }
      setInfo(reply.value);
      if (!setupLoaded.current) {
        setupLoaded.current = true;
        const ex = await api.setup.example({ which: reply.value.demo ? 'demo' : 'blank' });
        if (ex.ok) session.setSetup(ex.value, true);
        else onError(ex.problem);
      }
    });
  }, [api, onError]);

  const go = useCallback((id: ScreenId) => {
    setScreen(id);
    requestAnimationFrame(() => mainRef.current?.focus());
  }, []);

  // Alt+1 … Alt+8 switch screens.
  useEffect(() => {
    if (gate !== 'closed') return;
    const onKey = (e: KeyboardEvent): void => {
      if (!e.altKey || e.ctrlKey || e.metaKey) return;
      const s = SCREENS.find((x) => x.key === e.key);
      if (s) {
        e.preventDefault();
        go(s.id);
      }
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [gate, go]);

  const banner = <ProblemBanner problems={problems} onDismiss={dismiss} onDismissAll={() => setProblems([])} />;

  if (gate === 'start') {
    return (
      <div className="app gated">
        {banner}
        <SafetyGate api={api} onError={onError} onAcknowledged={() => setGate('closed')} />
      </div>
    );
  }

  return (
    <div className="app">
      <div className="app-body" inert={gate === 'reopened' ? true : undefined}>
        <header className="app-header">
          <div className="brand">
            <span className="brand-name">Shadowfront</span>
            {info ? <span className="muted small-text">{info.version}</span> : null}
            {info?.demo ? (
              <span className="demo-label" data-testid="demo-label" title="The logbook and the demo frames were made by Shadowfront's own simulator; they are not real measurements.">
                Synthetic demo data
              </span>
            ) : null}
          </div>
          <nav className="main-nav" aria-label="Screens">
            {SCREENS.map((s) => (
              <button
                key={s.id}
                type="button"
                className={screen === s.id ? 'nav-item active' : 'nav-item'}
                aria-current={screen === s.id ? 'page' : undefined}
                onClick={() => go(s.id)}
                title={`${s.label} (Alt+${s.key})`}
                data-testid={`nav-${s.id}`}
              >
                {s.label}
                {s.id === 'result' && session.fit.running ? <span className="nav-dot" aria-label="fit running" /> : null}
                {s.id === 'planner' && planner.job.running ? <span className="nav-dot" aria-label="plan running" /> : null}
                {s.id === 'discs' && discCalibration.job.running ? <span className="nav-dot" aria-label="calibration running" /> : null}
              </button>
            ))}
          </nav>
          <button type="button" className="safety-button" onClick={() => setGate('reopened')} data-testid="show-safety">
            ⚠ Laser safety
          </button>
        </header>
        {banner}
        <main ref={mainRef} className="app-main" tabIndex={-1} aria-label={SCREENS.find((s) => s.id === screen)?.label}>
          <ScreenBoundary key={screen} onError={onError}>
            {screen === 'setup' ? <SetupScreen session={session} /> : null}
            {screen === 'frames' ? <FramesScreen session={session} /> : null}
            {screen === 'result' ? <ResultScreen session={session} /> : null}
            {screen === 'compare' ? <CompareScreen api={api} onError={onError} /> : null}
            {screen === 'logbook' ? <LogbookScreen api={api} onError={onError} /> : null}
            {screen === 'simulator' ? <SimulatorScreen api={api} onError={onError} /> : null}
            {screen === 'planner' ? <PlannerScreen planner={planner} /> : null}
            {screen === 'discs' ? <DiscScreen state={discCalibration} session={session} /> : null}
          </ScreenBoundary>
        </main>
      </div>
      {gate === 'reopened' ? <SafetyGate api={api} onError={onError} onAcknowledged={() => setGate('closed')} /> : null}
    </div>
  );
}

/** Keeps a failing screen from blanking the window: it says what happened in plain words instead. */
class ScreenBoundary extends Component<{ onError: (p: ApiProblem) => void; children: ReactNode }, { failed: boolean }> {
  override state = { failed: false };

  static getDerivedStateFromError(): { failed: boolean } {
    return { failed: true };
  }

  override componentDidCatch(error: Error, _info: ErrorInfo): void {
    this.props.onError(windowErrorProblem(error));
  }

  override render(): ReactNode {
    if (this.state.failed) {
      return (
        <div className="screen">
          <p className="field-problem block">This screen could not be shown. Choose another screen and come back, or reload the page; nothing saved is lost.</p>
        </div>
      );
    }
    return this.props.children;
  }
}
