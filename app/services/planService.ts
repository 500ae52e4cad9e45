/**
 * The bench planner's job, shared by every shell (CLI `shadowfront plan`, the desktop app and the local
 * web mode): read a "shadowfront-plan/1" file or JSON value, plan the bench, return the report.
 */
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parsePlan } from '../../core/plan/parsePlan.ts';
import { planBench } from '../../core/plan/plan.ts';
import type { PlanReport } from '../../core/plan/types.ts';
import { FileProblem, readJson } from './files.ts';

/** Progress 0..1; return false to cancel (the call then throws an Error named 'CancelledError'). */
export type PlanProgress = (fraction: number) => boolean | void;

/**
 * Plan from a JSON value already decoded (unit strings allowed). `sourceName` names it in error messages.
 * @throws SetupFieldError naming the source, the field path and the value; CancelledError when cancelled.
 */
export function runPlanJson(json: unknown, sourceName: string, onProgress?: PlanProgress): PlanReport {
  const plan = parsePlan(json, sourceName);
  return planBench(plan, onProgress ? { onProgress } : {});
}

/** Plan from a file. @throws FileProblem (missing file, not JSON) or SetupFieldError (naming the file). */
export function runPlanFile(path: string, onProgress?: PlanProgress): PlanReport {
  return runPlanJson(readJson(path), path, onProgress);
}

function defaultResourcesDir(): string {
  return fileURLToPath(new URL('../../resources/', import.meta.url));
}

/** The bundled example plan (resources/examples/plan-example.json, a synthetic 632.8 nm bench of our own). */
export function examplePlanJson(resourcesDir: string = defaultResourcesDir()): Record<string, unknown> {
  const path = join(resourcesDir, 'examples', 'plan-example.json');
  const json = readJson(path);
  if (typeof json !== 'object' || json === null || Array.isArray(json)) throw new FileProblem(path, 'is not a JSON object');
  return json as Record<string, unknown>;
}
