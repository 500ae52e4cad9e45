/**
 * The bench planner's state, kept in App so that switching screens loses nothing: the plan being edited
 * (a "shadowfront-plan/1" object with unit strings; the service parses the units), its JSON text when it
 * is edited as text, the plan job and its report, and the last problem the service named a field for.
 * Also the pure helpers the planner screen reads the report with (σ per group of terms, chart series).
 */
import { useCallback, useState } from 'react';
import type { ApiProblem, ShadowfrontApi } from '../../../shared/contract.ts';
import type { CandidateReport, PlanReport } from '../../../../core/plan/types.ts';
import { useJobRun, type JobRun } from './jobRun.ts';

export type PlanJson = Record<string, unknown>;

export interface Planner {
  plan: PlanJson | null;
  setPlan: (p: PlanJson) => void;
  /** 'fields': unit-aware fields; 'json': the whole plan as JSON text. */
  mode: 'fields' | 'json';
  setMode: (m: 'fields' | 'json') => void;
  text: string;
  /** Edit the JSON text; a text that is a JSON object becomes the plan. */
  setText: (t: string) => void;
  /** Why the JSON text is not a plan yet, or null. */
  textProblem: string | null;
  loadExample: () => Promise<void>;
  run: () => void;
  job: JobRun<PlanReport>;
  /** The last problem of a run (its field is marked beside the field). */
  problem: ApiProblem | null;
}

export function usePlanner(api: ShadowfrontApi, onError: (p: ApiProblem) => void): Planner {
  const [plan, setPlanState] = useState<PlanJson | null>(null);
  const [mode, setModeState] = useState<'fields' | 'json'>('fields');
  const [text, setTextState] = useState('');
  const [textProblem, setTextProblem] = useState<string | null>(null);
  const [problem, setProblem] = useState<ApiProblem | null>(null);
  const job = useJobRun<PlanReport>(api, onError, 'bench plan');

  const setPlan = useCallback((p: PlanJson) => {
    setPlanState(p);
    setTextState(JSON.stringify(p, null, 2));
    setTextProblem(null);
  }, []);

  const setText = useCallback((t: string) => {
    setTextState(t);
    let parsed: unknown;
    try {
      parsed = JSON.parse(t);
    } catch (err) {
      setTextProblem(`The text is not valid JSON yet (${(err as Error).message}); the plan shown in the fields is the last valid one.`);
      return;
    }
    if (!parsed || typeof parsed !== 'object' || Array.isArray(parsed)) {
      setTextProblem('A plan is one JSON object: {"format": "shadowfront-plan/1", …}.');
      return;
    }
    setTextProblem(null);
    setPlanState(parsed as PlanJson);
  }, []);

  const setMode = useCallback(
    (m: 'fields' | 'json') => {
      if (m === 'json' && plan) {
        setTextState(JSON.stringify(plan, null, 2));
        setTextProblem(null);
      }
      setModeState(m);
    },
    [plan],
  );

  const loadExample = useCallback(async () => {
    const reply = await api.plan.example();
    if (!reply.ok) {
      onError(reply.problem);
      return;
    }
    setPlan(reply.value);
    setProblem(null);
  }, [api, onError, setPlan]);

  const run = useCallback(() => {
    if (!plan) {
      onError({ kind: 'plan', message: 'Load the example plan or write a plan first.' });
      return;
    }
    const current = plan;
    setProblem(null);
    job.start(async () => {
      const r = await api.jobs.startPlan({ plan: current });
      if (!r.ok) setProblem(r.problem);
      return r;
    });
  }, [api, job, onError, plan]);

  return { plan, setPlan, mode, setMode, text, setText, textProblem, loadExample, run, job, problem };
}

export const ASTIGMATISM_TERMS = [3, 5];
export const COMA_TERMS = [7, 8];
export const DEFOCUS_TERMS = [4];

/** The larger predicted σ of the given terms (waves), or null when none of them was fitted. */
export function sigmaOf(c: CandidateReport, js: readonly number[]): number | null {
  const s = c.predicted.filter((p) => js.includes(p.j)).map((p) => p.sigmaWaves);
  return s.length ? Math.max(...s) : null;
}

export interface PlanChartSeries {
  discDiameterM: number;
  astigmatism: (number | null)[];
  coma: (number | null)[];
}

/** Distances (ascending, m) and, per disc diameter, the predicted σ of astigmatism and coma there (null: not usable or not fitted). */
export function planChartData(report: PlanReport): { distancesM: number[]; series: PlanChartSeries[] } {
  const distancesM = [...new Set(report.candidates.map((c) => c.candidate.cameraDistanceM))].sort((a, b) => a - b);
  const discs = [...new Set(report.candidates.map((c) => c.candidate.discDiameterM))].sort((a, b) => a - b);
  const series = discs.map((d) => {
    const at = (x: number) => report.candidates.find((c) => c.candidate.discDiameterM === d && c.candidate.cameraDistanceM === x);
    const pick = (js: readonly number[]) =>
      distancesM.map((x) => {
        const c = at(x);
        const s = c && c.usable ? sigmaOf(c, js) : null;
        return s !== null && Number.isFinite(s) && s > 0 ? s : null;
      });
    return { discDiameterM: d, astigmatism: pick(ASTIGMATISM_TERMS), coma: pick(COMA_TERMS) };
  });
  return { distancesM, series };
}
