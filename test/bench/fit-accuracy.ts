/**
 * Accuracy study of the solver on synthetic frames from the REFERENCE model plus camera noise.
 *   npx tsx test/bench/fit-accuracy.ts [--trials 40] [--kinds interior,whole] [--crb-reference 2] [--out file.json]
 * Prints, per kind of frame (shadow interior only / whole shadow with its edge): coverage of 1σ and 3σ,
 * the fraction within the absolute caps (or 3× the trial's Cramér–Rao bound), error spreads, and the
 * solver's σ against the Cramér–Rao bound (fast-model Fisher for every trial; reference-model finite
 * differences for a few). Long: minutes. Not part of `npm test`; its summary goes in closing notes.
 */
import { writeFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import { drawTrial, renderTrial, type Trial, type TrialKind } from '../fixtures/trials.ts';
import { prepareFrames } from '../../core/frames/prepare.ts';
import { measureBeam } from '../../core/fit/measure.ts';
import { cramerRaoBound } from '../../core/fit/crb.ts';
import { referenceIntensity } from '../../core/optics/reference/index.ts';
import { pixelSampleAxes, binSamples } from '../../core/camera/pixels.ts';
import type { FitFrameInput, ModelLayout } from '../../core/fit/frameModel.ts';
import type { FitResult } from '../../core/fit/result.ts';

const { values } = parseArgs({
  options: {
    trials: { type: 'string', default: '40' },
    kinds: { type: 'string', default: 'interior,whole' },
    'crb-reference': { type: 'string', default: '2' },
    out: { type: 'string' },
    first: { type: 'string', default: '0' },
  },
});
const nTrials = Number(values.trials);
const first = Number(values.first);
const kinds = values.kinds!.split(',') as TrialKind[];
const nRefCrb = Number(values['crb-reference']);
const TERMS = [3, 4, 5, 7, 8];
const CAPS: Record<number, number> = { 3: 0.005, 5: 0.005, 7: 0.01, 8: 0.01, 4: 0.03 };

interface Row {
  id: string;
  kind: TrialKind;
  ms: number;
  chi2PerDof: number;
  trusted: boolean;
  termination: string;
  terms: { j: number; truth: number; fit: number; sigma: number; crb: number; refCrb?: number }[];
}

function fitInputFor(trial: Trial, result: FitResult, counts: Float64Array): FitFrameInput {
  const g = result.regions[0];
  return {
    setup: trial.scene,
    counts,
    widthPx: 256,
    heightPx: 256,
    mask: null,
    frameCount: 1,
    darkCount: 0,
    readNoiseCounts: 3,
    gainCountsPerElectron: 1,
    regionCenterPx: g.centerPx,
    regionRadiusPx: g.radiusPx,
  };
}

/** Cramér–Rao bound by central finite differences of the reference model (pixel-integrated), same region. */
function referenceCrb(trial: Trial, input: FitFrameInput, peakCounts: number): number[] {
  const scene = trial.scene;
  const pitch = scene.camera.pixelPitchM;
  const intensityAt = (ab: typeof trial.truth, shift: [number, number]) => {
    const frame = { ...scene.frame, centerM: [scene.frame.centerM[0] - shift[0], scene.frame.centerM[1] - shift[1]] as [number, number] };
    const axes = pixelSampleAxes(frame, pitch, 2);
    return binSamples(referenceIntensity(scene, ab, axes.xsM, axes.ysM), 256, 256, axes);
  };
  const base = intensityAt(trial.truth, [0, 0]);
  const inRegion: number[] = [];
  const [rcx, rcy] = input.regionCenterPx;
  for (let r = 0; r < 256; r++) for (let c = 0; c < 256; c++) if ((c - rcx) ** 2 + (r - rcy) ** 2 <= input.regionRadiusPx ** 2) inRegion.push(r * 256 + c);
  const cols: Float64Array[] = [];
  const h = 1e-3;
  for (const j of TERMS) {
    const plus = intensityAt(trial.truth.map((t) => (t.j === j ? { ...t, waves: t.waves + h } : t)), [0, 0]);
    const minus = intensityAt(trial.truth.map((t) => (t.j === j ? { ...t, waves: t.waves - h } : t)), [0, 0]);
    cols.push(Float64Array.from(inRegion, (k) => (peakCounts * (plus[k] - minus[k])) / (2 * h)));
  }
  const hc = 0.2 * pitch;
  for (const axis of [0, 1]) {
    const s: [number, number] = axis === 0 ? [hc, 0] : [0, hc];
    const plus = intensityAt(trial.truth, s);
    const minus = intensityAt(trial.truth, [-s[0], -s[1]]);
    cols.push(Float64Array.from(inRegion, (k) => (peakCounts * (plus[k] - minus[k])) / (2 * hc)));
  }
  cols.push(Float64Array.from(inRegion, (k) => base[k])); // scale (per unit peakCounts)
  cols.push(Float64Array.from(inRegion, () => 1)); // background
  const np = cols.length;
  const F = new Float64Array(np * np);
  inRegion.forEach((k, i) => {
    const v = peakCounts * base[k] + 9;
    for (let a = 0; a < np; a++) for (let b = 0; b < np; b++) F[a * np + b] += (cols[a][i] * cols[b][i]) / v;
  });
  // invert (Gauss–Jordan; small)
  const A = Array.from({ length: np }, (_, a) => [...Array.from({ length: np }, (__, b) => F[a * np + b]), ...Array.from({ length: np }, (__, b) => (a === b ? 1 : 0))]);
  for (let c = 0; c < np; c++) {
    let piv = c;
    for (let r = c + 1; r < np; r++) if (Math.abs(A[r][c]) > Math.abs(A[piv][c])) piv = r;
    [A[c], A[piv]] = [A[piv], A[c]];
    const d = A[c][c];
    for (let k = 0; k < 2 * np; k++) A[c][k] /= d;
    for (let r = 0; r < np; r++) if (r !== c) {
      const f = A[r][c];
      for (let k = 0; k < 2 * np; k++) A[r][k] -= f * A[c][k];
    }
  }
  return TERMS.map((_, t) => Math.sqrt(A[t][np + t]));
}

const rows: Row[] = [];
for (const kind of kinds) {
  for (let i = first; i < first + nTrials; i++) {
    const trial = drawTrial(kind, i);
    const { counts, peakCounts } = renderTrial(trial);
    const decoded = { data: Float64Array.from(counts), widthPx: 256, heightPx: 256, bitDepth: 16, warnings: [], format: 'png' as const };
    const prepared = prepareFrames([decoded], [], trial.scene.camera, [`${trial.id}.png`]);
    const t0 = performance.now();
    let result: FitResult;
    try {
      result = measureBeam([{ setup: trial.scene, prepared }], { terms: TERMS, readNoiseCounts: 3 });
    } catch (e) {
      process.stdout.write(`${trial.id}: fit failed: ${(e as Error).message}\n`);
      continue;
    }
    const ms = performance.now() - t0;
    const input = fitInputFor(trial, result, prepared.counts);
    const layout: ModelLayout = { terms: TERMS, nFrames: 1, freeDistance: false, freeDiscRadius: false };
    const truthParams = Float64Array.from([...TERMS.map((j) => trial.truth.find((t) => t.j === j)!.waves), trial.trueCenterM[0], trial.trueCenterM[1], peakCounts, 20]);
    const crb = cramerRaoBound([input], layout, truthParams, 1);
    const refCrb = i - first < nRefCrb ? referenceCrb(trial, input, peakCounts) : null;
    const row: Row = {
      id: trial.id,
      kind,
      ms,
      chi2PerDof: result.chi2PerDof,
      trusted: result.trusted,
      termination: result.termination,
      terms: TERMS.map((j, t) => {
        const r = result.zernike.terms.find((x) => x.j === j)!;
        return { j, truth: truthParams[t], fit: r.waves, sigma: r.sigmaWaves, crb: crb.sigma[t], ...(refCrb ? { refCrb: refCrb[t] } : {}) };
      }),
    };
    rows.push(row);
    process.stdout.write(
      `${trial.id.padEnd(12)} ${(ms / 1000).toFixed(1)} s χ²/dof ${result.chi2PerDof.toFixed(2)} ${result.termination}${result.trusted ? '' : ' UNTRUSTED'} | ` +
        row.terms.map((t) => `j${t.j} ${((t.fit - t.truth) / t.sigma).toFixed(1)}σ`).join(' ') +
        (refCrb ? ` | refCRB/fastCRB ${row.terms.map((t) => (t.refCrb! / t.crb).toFixed(2)).join(' ')}` : '') +
        '\n',
    );
  }
}

function summarize(kind: TrialKind): string {
  const rs = rows.filter((r) => r.kind === kind);
  if (!rs.length) return '';
  const all = rs.flatMap((r) => r.terms);
  const frac = (f: (t: Row['terms'][0]) => boolean, set = all) => set.filter(f).length / set.length;
  const trialFrac = (f: (t: Row['terms'][0]) => boolean) => rs.filter((r) => r.terms.every(f)).length / rs.length;
  const lines = [`== ${kind}: ${rs.length} trials, median fit time ${(median(rs.map((r) => r.ms)) / 1000).toFixed(2)} s`];
  lines.push(`coefficients within 1σ: ${(100 * frac((t) => Math.abs(t.fit - t.truth) <= t.sigma)).toFixed(1)} % (calibration target 60–76 %)`);
  lines.push(`coefficients within 3σ: ${(100 * frac((t) => Math.abs(t.fit - t.truth) <= 3 * t.sigma)).toFixed(1)} %; trials with every coefficient within 3σ: ${(100 * trialFrac((t) => Math.abs(t.fit - t.truth) <= 3 * t.sigma)).toFixed(1)} % (target ≥ 97 %)`);
  lines.push(`trials with every |error| ≤ max(cap, 3×CRB): ${(100 * trialFrac((t) => Math.abs(t.fit - t.truth) <= Math.max(CAPS[t.j], 3 * t.crb))).toFixed(1)} % (target ≥ 95 %)`);
  for (const j of TERMS) {
    const ts = rs.map((r) => r.terms.find((t) => t.j === j)!);
    const rmsErr = Math.sqrt(ts.reduce((s, t) => s + (t.fit - t.truth) ** 2, 0) / ts.length);
    const medSigma = median(ts.map((t) => t.sigma));
    const medCrb = median(ts.map((t) => t.crb));
    const ref = ts.filter((t) => t.refCrb !== undefined);
    lines.push(
      `  j=${j}: RMS error ${rmsErr.toExponential(2)} waves, median σ ${medSigma.toExponential(2)}, median CRB ${medCrb.toExponential(2)}, ` +
        `σ/CRB ${(median(ts.map((t) => t.sigma / t.crb))).toFixed(2)}, RMS(error/CRB) ${Math.sqrt(ts.reduce((s, t) => s + ((t.fit - t.truth) / t.crb) ** 2, 0) / ts.length).toFixed(2)}` +
        (ref.length ? `, reference-FD CRB / fast CRB ${ref.map((t) => (t.refCrb! / t.crb).toFixed(2)).join(', ')}; σ/refCRB ${ref.map((t) => (t.sigma / t.refCrb!).toFixed(2)).join(', ')}` : ''),
    );
  }
  lines.push(`untrusted: ${rs.filter((r) => !r.trusted).length}, not converged: ${rs.filter((r) => r.termination !== 'converged').length}`);
  return lines.join('\n');
}
function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}
const summary = kinds.map(summarize).join('\n');
process.stdout.write(`\n${summary}\n`);
if (values.out) writeFileSync(values.out, JSON.stringify({ rows, summary }, null, 1));
