/**
 * Statistical control of a quantity measured over time: the Shewhart individuals chart with the
 * moving-range estimate of σ, and the usual run rules for special causes.
 *
 * Sources:
 *  - NIST/SEMATECH e-Handbook of Statistical Methods, §6.3.2.2 "Individuals Control Charts":
 *    MR_i = |x_i − x_{i−1}|, MR̄ = mean of the n − 1 moving ranges, centre line x̄,
 *    limits x̄ ± 3·MR̄/d2 with d2 = 1.128 for moving ranges of two; moving-range chart UCL = D4·MR̄,
 *    D4 = 3.267, LCL = 0. (Also D. C. Montgomery, Introduction to Statistical Quality Control, the chapter
 *    on control charts for individual measurements.) The constants d2 = 1.128 and D4 = 3.267 are the
 *    tabulated values for n = 2 (quoted from memory; d2 = 2/√π = 1.1284 exactly for n = 2).
 *  - Run rules: L. S. Nelson, "The Shewhart Control Chart — Tests for Special Causes", Journal of
 *    Quality Technology 16(4), 237–239 (1984), tests 1, 2, 3, 5 and 6; tests 1, 5 and 6 are also rules
 *    1–3 of the Western Electric Statistical Quality Control Handbook (1956). Zones are measured in
 *    units of σ̂ = MR̄/d2 from the centre line.
 */

/** d2 for moving ranges of two consecutive points (= 2/√π). */
export const D2_MR2 = 1.128;
/** D4 for moving ranges of two consecutive points: UCL of the moving-range chart = D4·MR̄. */
export const D4_MR2 = 3.267;

export interface IndividualsLimits {
  /** Number of baseline points the limits were computed from. */
  baselineCount: number;
  /** Centre line x̄ of the baseline. */
  center: number;
  /** Mean moving range of the baseline. */
  mrBar: number;
  /** σ̂ = MR̄/d2. */
  sigma: number;
  ucl: number;
  lcl: number;
  /** Upper limit of the moving-range chart, D4·MR̄ (its lower limit is 0). */
  mrUcl: number;
}

/**
 * Control limits of the individuals chart from a baseline period (Phase I data).
 * @throws RangeError with fewer than two finite values
 */
export function individualsLimits(baseline: readonly number[]): IndividualsLimits {
  if (baseline.length < 2 || baseline.some((v) => !Number.isFinite(v))) {
    throw new RangeError(`individualsLimits: need at least two finite baseline values, got ${baseline.length}`);
  }
  const n = baseline.length;
  const center = baseline.reduce((s, v) => s + v, 0) / n;
  let mrSum = 0;
  for (let i = 1; i < n; i++) mrSum += Math.abs(baseline[i] - baseline[i - 1]);
  const mrBar = mrSum / (n - 1);
  const sigma = mrBar / D2_MR2;
  return { baselineCount: n, center, mrBar, sigma, ucl: center + 3 * sigma, lcl: center - 3 * sigma, mrUcl: D4_MR2 * mrBar };
}

/** Moving ranges |x_i − x_{i−1}|; the first entry is null (no predecessor). */
export function movingRanges(values: readonly number[]): (number | null)[] {
  return values.map((v, i) => (i === 0 ? null : Math.abs(v - values[i - 1])));
}

export type RuleId = 'beyond-limits' | 'nine-same-side' | 'six-trend' | 'two-of-three-beyond-2-sigma' | 'four-of-five-beyond-1-sigma' | 'moving-range';

export const RULES: Record<RuleId, { nelson: number | null; westernElectric: number | null; title: string }> = {
  'beyond-limits': { nelson: 1, westernElectric: 1, title: 'a point beyond the 3σ control limits' },
  'nine-same-side': { nelson: 2, westernElectric: null, title: 'nine points in a row on one side of the centre line' },
  'six-trend': { nelson: 3, westernElectric: null, title: 'six points in a row steadily rising or falling (drift)' },
  'two-of-three-beyond-2-sigma': { nelson: 5, westernElectric: 2, title: 'two of three points in a row beyond 2σ on one side' },
  'four-of-five-beyond-1-sigma': { nelson: 6, westernElectric: 3, title: 'four of five points in a row beyond 1σ on one side' },
  'moving-range': { nelson: null, westernElectric: null, title: 'a jump between consecutive points above the moving-range limit D4·MR̄' },
};

export interface RuleSignal {
  rule: RuleId;
  /** Indices of the points that make up the pattern, ascending. */
  indices: number[];
  /** above/below the centre line, or up/down for a trend and a jump. */
  direction: 'above' | 'below' | 'up' | 'down';
  description: string;
}

function ruleLabel(rule: RuleId): string {
  const r = RULES[rule];
  const refs = [r.nelson !== null ? `Nelson test ${r.nelson}` : null, r.westernElectric !== null ? `Western Electric rule ${r.westernElectric}` : null].filter(Boolean);
  return refs.length ? `${r.title} (${refs.join('; ')})` : r.title;
}

/**
 * Apply the run rules to every point of the series against limits from a baseline.
 * A pattern that continues over more points is reported once, with all its points.
 */
export function runRules(values: readonly number[], limits: IndividualsLimits): RuleSignal[] {
  const out: RuleSignal[] = [];
  const { center, sigma } = limits;
  const n = values.length;
  // Each signal collects its points in a set; a pattern that goes on (overlapping windows of the same
  // rule and direction) extends the latest signal instead of starting another.
  const groups: { signal: RuleSignal; points: Set<number>; last: number }[] = [];
  const latest = new Map<string, { signal: RuleSignal; points: Set<number>; last: number }>();
  const push = (rule: RuleId, indices: number[], direction: RuleSignal['direction']) => {
    const key = `${rule}:${direction}`;
    const cur = latest.get(key);
    const gap = rule === 'six-trend' || rule === 'nine-same-side' ? 0 : 1;
    if (cur && indices[0] <= cur.last + gap) {
      for (const i of indices) cur.points.add(i);
      cur.last = Math.max(cur.last, indices[indices.length - 1]);
      return;
    }
    const g = { signal: { rule, indices: [], direction, description: ruleLabel(rule) } as RuleSignal, points: new Set(indices), last: indices[indices.length - 1] };
    groups.push(g);
    latest.set(key, g);
    out.push(g.signal);
  };

  // Test 1: beyond 3σ.
  for (let i = 0; i < n; i++) {
    if (values[i] > limits.ucl) out.push({ rule: 'beyond-limits', indices: [i], direction: 'above', description: ruleLabel('beyond-limits') });
    else if (values[i] < limits.lcl) out.push({ rule: 'beyond-limits', indices: [i], direction: 'below', description: ruleLabel('beyond-limits') });
  }
  // Test 2: nine in a row on one side (a point on the centre line breaks the run).
  let run = 0;
  let runSide = 0;
  for (let i = 0; i < n; i++) {
    const s = Math.sign(values[i] - center);
    if (s !== 0 && s === runSide) run++;
    else {
      run = s === 0 ? 0 : 1;
      runSide = s;
    }
    if (run >= 9) push('nine-same-side', Array.from({ length: 9 }, (_, k) => i - 8 + k), runSide > 0 ? 'above' : 'below');
  }
  // Test 3: six points in a row steadily increasing or decreasing (five rises or five falls; a tie breaks it).
  let steps = 0;
  let stepDir = 0;
  for (let i = 1; i < n; i++) {
    const d = Math.sign(values[i] - values[i - 1]);
    if (d !== 0 && d === stepDir) steps++;
    else {
      steps = d === 0 ? 0 : 1;
      stepDir = d;
    }
    if (steps >= 5) push('six-trend', Array.from({ length: 6 }, (_, k) => i - 5 + k), stepDir > 0 ? 'up' : 'down');
  }
  // Tests 5 and 6: m of k in a row beyond a zone on the same side.
  const zoneRule = (rule: RuleId, k: number, m: number, zone: number) => {
    if (!(sigma > 0)) return;
    for (let i = k - 1; i < n; i++) {
      for (const side of [1, -1]) {
        const hits: number[] = [];
        for (let q = i - k + 1; q <= i; q++) if (side * (values[q] - center) > zone * sigma) hits.push(q);
        if (hits.length >= m) push(rule, hits, side > 0 ? 'above' : 'below');
      }
    }
  };
  zoneRule('two-of-three-beyond-2-sigma', 3, 2, 2);
  zoneRule('four-of-five-beyond-1-sigma', 5, 4, 1);
  // Moving-range chart: a jump above D4·MR̄.
  for (let i = 1; i < n; i++) {
    const mr = Math.abs(values[i] - values[i - 1]);
    if (limits.mrBar > 0 && mr > limits.mrUcl) out.push({ rule: 'moving-range', indices: [i - 1, i], direction: values[i] > values[i - 1] ? 'up' : 'down', description: ruleLabel('moving-range') });
  }
  for (const g of groups) g.signal.indices = [...g.points].sort((x, y) => x - y);
  return out.sort((x, y) => x.indices[x.indices.length - 1] - y.indices[y.indices.length - 1] || x.indices[0] - y.indices[0]);
}
