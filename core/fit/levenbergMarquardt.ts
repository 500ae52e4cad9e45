/**
 * Weighted non-linear least squares by the Levenberg–Marquardt method (Levenberg 1944; Marquardt 1963),
 * with Marquardt's diagonal scaling: (JᵀWJ + λ·diag(JᵀWJ))·δ = JᵀW·r.
 * The caller supplies residuals already divided by their standard deviations and the matching
 * Jacobian (so W = I here). Pure; no allocation per evaluation beyond what the model does.
 */
import type { Termination } from './result.ts';

export interface WeightedProblem {
  /** Number of parameters. */
  nParams: number;
  /**
   * Normalised residuals r_i = (data_i − model_i)/σ_i for parameters p, and optionally the Jacobian of the
   * MODEL divided by σ_i, row-major [i·nParams + k] (so that J = −∂r/∂p).
   */
  evaluate(p: Float64Array, withJacobian: boolean): { r: Float64Array; J: Float64Array | null };
}

export interface LMOptions {
  maxIterations?: number;
  /** Stop when the relative decrease of χ² in an accepted step is below this. */
  chi2Tolerance?: number;
  /** Stop when every step component is below this fraction of its current 1σ estimate. */
  stepTolerance?: number;
  /**
   * Stop when a step lowers χ², or is predicted to lower it, by less than this absolute amount (default 0:
   * not used). With residuals normalised by their σ, Δχ² < 0.01 leaves the parameters within about 0.1σ of
   * the minimum (Press et al., Numerical Recipes, §15.5: iterating until χ² changes by a negligible amount,
   * well below 1, is all the statistics can use).
   */
  chi2AbsoluteTolerance?: number;
  initialLambda?: number;
  /**
   * Keep the Jacobian of an earlier point while steps are accepted (a chord, or simplified Newton, method;
   * default false): an accepted step costs one evaluation of the residuals only, and the gradient Jᵀr is
   * formed with the kept J. The Jacobian is evaluated afresh when a step is rejected, when an accepted step
   * lowered χ² by less than half the predicted amount, and before the fit is declared converged, so the
   * result (and its normal matrix) is that of a fresh Jacobian at the solution.
   * Cheaper when derivatives cost much more than values and the start is already close. Without it, every
   * trial step is evaluated with its Jacobian, so that an accepted step needs no second evaluation.
   */
  reuseJacobian?: boolean;
  /**
   * Stop (converged) when a step that raised χ² was below this fraction of 1σ in every component (default:
   * stepTolerance). For a Jacobian that is approximate at that level: χ² cannot be lowered along its steps
   * any more, and shrinking them further only spends evaluations.
   */
  rejectedStepTolerance?: number;
  /** Called after each iteration with (iteration, χ²); return false to cancel. */
  onIteration?: (iteration: number, chi2: number) => boolean | void;
}

export interface LMResult {
  params: Float64Array;
  chi2: number;
  /** JᵀJ at the solution (the Fisher information with normalised residuals). */
  normalMatrix: Float64Array;
  iterations: number;
  termination: Termination;
  evaluations: number;
}

function chi2Of(r: Float64Array): number {
  let s = 0;
  for (let i = 0; i < r.length; i++) s += r[i] * r[i];
  return s;
}

/** JᵀJ and Jᵀr for a row-major Jacobian. */
export function normalEquations(J: Float64Array, r: Float64Array, n: number): { A: Float64Array; g: Float64Array } {
  const m = r.length;
  const A = new Float64Array(n * n);
  const g = new Float64Array(n);
  for (let i = 0; i < m; i++) {
    const o = i * n;
    const ri = r[i];
    for (let a = 0; a < n; a++) {
      const ja = J[o + a];
      if (ja === 0) continue;
      g[a] += ja * ri;
      for (let b = a; b < n; b++) A[a * n + b] += ja * J[o + b];
    }
  }
  for (let a = 0; a < n; a++) for (let b = 0; b < a; b++) A[a * n + b] = A[b * n + a];
  return { A, g };
}

/** Solve the symmetric positive-definite system A x = b by Cholesky; null when A is not positive definite. */
export function choleskySolve(A: Float64Array, b: Float64Array, n: number): Float64Array | null {
  const L = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = A[i * n + j];
      for (let k = 0; k < j; k++) s -= L[i * n + k] * L[j * n + k];
      if (i === j) {
        if (!(s > 0)) return null;
        L[i * n + i] = Math.sqrt(s);
      } else L[i * n + j] = s / L[j * n + j];
    }
  }
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = b[i];
    for (let k = 0; k < i; k++) s -= L[i * n + k] * y[k];
    y[i] = s / L[i * n + i];
  }
  const x = new Float64Array(n);
  for (let i = n - 1; i >= 0; i--) {
    let s = y[i];
    for (let k = i + 1; k < n; k++) s -= L[k * n + i] * x[k];
    x[i] = s / L[i * n + i];
  }
  return x;
}

/** Inverse of a symmetric positive-definite matrix (null when singular). */
export function invertSPD(A: Float64Array, n: number): Float64Array | null {
  // Scale to unit diagonal for conditioning, invert, scale back.
  const d = new Float64Array(n);
  for (let i = 0; i < n; i++) d[i] = A[i * n + i] > 0 ? 1 / Math.sqrt(A[i * n + i]) : 1;
  const S = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) S[i * n + j] = A[i * n + j] * d[i] * d[j];
  const inv = new Float64Array(n * n);
  const e = new Float64Array(n);
  for (let c = 0; c < n; c++) {
    e.fill(0);
    e[c] = 1;
    const x = choleskySolve(S, e, n);
    if (!x) return null;
    for (let r = 0; r < n; r++) inv[r * n + c] = x[r] * d[r] * d[c];
  }
  return inv;
}

/** Jᵀr for a row-major Jacobian. */
function gradient(J: Float64Array, r: Float64Array, n: number): Float64Array {
  const g = new Float64Array(n);
  for (let i = 0; i < r.length; i++) {
    const o = i * n;
    const ri = r[i];
    for (let a = 0; a < n; a++) g[a] += J[o + a] * ri;
  }
  return g;
}

export function levenbergMarquardt(problem: WeightedProblem, start: Float64Array, options: LMOptions = {}): LMResult {
  const n = problem.nParams;
  const maxIt = options.maxIterations ?? 60;
  const tolChi2 = options.chi2Tolerance ?? 1e-10;
  const tolStep = options.stepTolerance ?? 1e-4;
  const tolRejected = Math.max(tolStep, options.rejectedStepTolerance ?? tolStep);
  const reuse = !!options.reuseJacobian;
  const tolAbs = options.chi2AbsoluteTolerance ?? 0;
  let lambda = options.initialLambda ?? 1e-3;
  let p = Float64Array.from(start);
  let evals = 1;
  let { r, J } = problem.evaluate(p, true);
  let chi2 = chi2Of(r);
  if (!Number.isFinite(chi2) || !J) {
    return { params: p, chi2, normalMatrix: new Float64Array(n * n), iterations: 0, termination: 'non-finite', evaluations: evals };
  }
  let ne = normalEquations(J, r, n);
  // Whether J was evaluated at p (false after an accepted step with a kept Jacobian).
  let fresh = true;
  const refresh = (): boolean => {
    const full = problem.evaluate(p, true);
    evals++;
    if (!full.J || !Number.isFinite(chi2Of(full.r))) return false;
    r = full.r;
    J = full.J;
    chi2 = chi2Of(r);
    ne = normalEquations(J, r, n);
    fresh = true;
    return true;
  };
  // Every component of a step below tol × its 1σ (from the undamped normal matrix).
  const below = (delta: Float64Array, tol: number): boolean => {
    for (let a = 0; a < n; a++) if (Math.abs(delta[a]) > tol / Math.sqrt(Math.max(ne.A[a * n + a], 1e-300))) return false;
    return true;
  };
  let termination: Termination = 'iteration limit';
  let it = 0;
  for (it = 1; it <= maxIt; it++) {
    let accepted = false;
    let done = false;
    while (lambda < 1e12) {
      const A = Float64Array.from(ne.A);
      for (let a = 0; a < n; a++) A[a * n + a] += lambda * Math.max(ne.A[a * n + a], 1e-300);
      const delta = choleskySolve(A, ne.g, n);
      if (!delta) {
        lambda *= 10;
        continue;
      }
      // A step below the tolerance everywhere changes nothing that matters: converged, without evaluating it
      // (at the minimum, rounding-level changes of χ² would otherwise reject it and raise λ to its limit).
      // Predicted decrease of χ² for this (damped) step: 2δᵀg − δᵀAδ (A undamped); and for the undamped
      // Gauss–Newton step, gᵀA⁻¹g: when even that is negligible, there is nothing left to gain.
      let predicted = 0;
      for (let a = 0; a < n; a++) {
        let ad = 0;
        for (let b = 0; b < n; b++) ad += ne.A[a * n + b] * delta[b];
        predicted += delta[a] * (2 * ne.g[a] - ad);
      }
      let gaussNewton = Infinity;
      if (tolAbs > 0) {
        const gn = choleskySolve(ne.A, ne.g, n);
        if (gn) gaussNewton = gn.reduce((sum, v, a) => sum + v * ne.g[a], 0);
      }
      if (below(delta, tolStep) || gaussNewton < tolAbs) {
        if (!fresh && refresh()) continue;
        done = true;
        break;
      }
      const trial = new Float64Array(n);
      for (let a = 0; a < n; a++) trial[a] = p[a] + delta[a];
      evals++;
      const ev = problem.evaluate(trial, !reuse);
      const c2 = chi2Of(ev.r);
      if (Number.isFinite(c2) && c2 <= chi2) {
        const rel = (chi2 - c2) / Math.max(chi2, 1e-300);
        const stepSmall = below(delta, tolStep);
        const chi2Before = chi2;
        p = trial;
        r = ev.r;
        chi2 = c2;
        if (reuse || !ev.J) {
          if (reuse && chi2Before - c2 >= 0.5 * predicted) {
            ne = { A: ne.A, g: gradient(J!, r, n) };
            fresh = false;
          } else if (!refresh()) break; // the kept Jacobian predicted the step poorly: a fresh one
        } else {
          J = ev.J;
          ne = normalEquations(J, r, n);
        }
        lambda = Math.max(lambda / 10, 1e-12);
        accepted = true;
        if (rel < tolChi2 || stepSmall || chi2Before - c2 < tolAbs) {
          // Converged with a kept Jacobian: evaluate it afresh at p and iterate once more with it.
          if (!fresh) refresh();
          else done = true;
        }
        break;
      }
      // A rejected step with a kept Jacobian: evaluate it afresh at p and try again at the same damping.
      if (!fresh && Number.isFinite(chi2)) {
        if (refresh()) continue;
      }
      if (Number.isFinite(c2) && below(delta, tolRejected)) {
        done = true;
        break;
      }
      if (!Number.isFinite(c2) && lambda > 1e8) break;
      lambda *= 10;
    }
    if (options.onIteration && options.onIteration(it, chi2) === false) {
      termination = 'cancelled';
      break;
    }
    if (done) {
      termination = 'converged';
      break;
    }
    if (!accepted) {
      // No downhill step at any damping: we are at a minimum to machine precision, or stuck.
      termination = lambda >= 1e12 ? 'converged' : 'stalled';
      break;
    }
  }
  if (!Number.isFinite(chi2)) termination = 'non-finite';
  if (!fresh && termination !== 'cancelled') refresh();
  return { params: p, chi2, normalMatrix: ne.A, iterations: Math.min(it, maxIt), termination, evaluations: evals };
}
