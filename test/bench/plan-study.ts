/**
 * Study of the bench planner's predicted σ against the solver's scatter over many simulated trials.
 *   npx tsx test/bench/plan-study.ts [--trials 40] [--candidates interior,whole] [--free-distance] [--out file.json]
 *
 * For each candidate the planner predicts the 1σ of every coefficient (Cramér–Rao bound of the fit's model with
 * the camera noise model; Kay 1993, §3). Trials: the expected frame of an ideal beam from Shadowfront's fast model
 * (synthetic, pixel-integrated), with seeded camera noise (Poisson shot noise, read noise 3 counts, offset 20);
 * each is fitted by the solver as a user would (automatic binning, region as the planner states it). The check is
 * that the bound matches the estimator's scatter under the model the fit uses; the issue asks for 30 %.
 * Printed per term: predicted σ, the whole-frame bound at the fit's binning (core/fit/crb.ts), the RMS error over
 * the trials, its ratio to the prediction with the ratio's sampling uncertainty 1/√(2n), the mean error, and the
 * mean σ the fit reported. With --free-distance each trial is also fitted with the camera distance freed, and the
 * defocus scatter is compared with the planner's defocus σ for a freed distance.
 * Long (minutes): not part of `npm test`; its summary goes in closing notes.
 */
import { writeFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import { applyCameraNoise } from '../../core/camera/noise.ts';
import { cramerRaoBound } from '../../core/fit/crb.ts';
import { fitShadow, type FitOptions } from '../../core/fit/fitShadow.ts';
import { simulateIntensity } from '../../core/optics/simulate.ts';
import { parsePlan } from '../../core/plan/parsePlan.ts';
import { boundFromFisher, candidateSetup, planBench, plannedFrame } from '../../core/plan/plan.ts';

const { values } = parseArgs({
  options: {
    trials: { type: 'string', default: '40' },
    candidates: { type: 'string', default: 'interior,whole' },
    'free-distance': { type: 'boolean', default: false },
    out: { type: 'string' },
  },
});
const nTrials = Number(values.trials);

/** Two synthetic benches of our own: the inside of the shadow only, and the whole shadow with its edge fringes. */
const CANDIDATES: Record<string, Record<string, unknown>> = {
  interior: {
    format: 'shadowfront-plan/1',
    laser: { wavelength: '632.8 nm', beamRadius: '3 mm', curvatureRadius: 'collimated' },
    camera: { pixelPitch: '10 um', sensorSize: [128, 128], bitDepth: 12, peakCounts: 3000, readNoise: 3 },
    candidates: { discDiameters: ['2 mm'], cameraDistances: ['0.8 m'] },
  },
  whole: {
    format: 'shadowfront-plan/1',
    laser: { wavelength: '632.8 nm', beamRadius: '3 mm', curvatureRadius: 'collimated' },
    camera: { pixelPitch: '18 um', sensorSize: [336, 336], bitDepth: 12, peakCounts: 3000, readNoise: 3 },
    candidates: { discDiameters: ['1.5 mm'], cameraDistances: ['0.9 m'] },
  },
};

// The frames come from the fast model, so the fit must not polish towards the reference model (the option
// exists where the fit has a reference-model polish; older fits ignore it).
const FAST_ONLY = { referencePolish: 'never' } as unknown as FitOptions;

interface TermRow {
  j: number;
  predicted: number;
  wholeFrame: number;
  rmsError: number;
  meanError: number;
  meanReportedSigma: number;
}

const summary: Record<string, unknown> = {};
const lines: string[] = [];
for (const name of values.candidates!.split(',')) {
  const json = CANDIDATES[name];
  if (!json) throw new Error(`unknown candidate ${name}`);
  const plan = parsePlan(json, name);
  const report = planBench(plan);
  const cand = report.candidates[0];
  const setup = candidateSetup(plan, cand.candidate);
  const frame = plannedFrame(plan, setup);
  const whole = boundFromFisher(cramerRaoBound([frame.input], frame.layout, frame.params, cand.bound!.fitBinning).fisher, frame.layout);
  const scene = { ...setup, aberrations: [], frame: { widthPx: frame.input.widthPx, heightPx: frame.input.heightPx, centerM: [0, 0] as [number, number] }, noise: null };
  const clean = simulateIntensity(scene, { model: 'fast' }).intensity;
  const errors: number[][] = [];
  const reported: number[][] = [];
  const freeErrors: number[] = [];
  const t0 = performance.now();
  for (let i = 0; i < nTrials; i++) {
    const counts = applyCameraNoise(clean, { peakCounts: cand.bound!.countsPerUnitIntensity, readNoise: 3, offset: 20, seed: 52000 + i }, setup.camera);
    const input = { ...frame.input, counts: Float64Array.from(counts) };
    const r = fitShadow([input], { ...FAST_ONLY, terms: plan.terms, initialCentersM: [[0, 0]] });
    errors.push(plan.terms.map((j) => r.zernike.terms.find((t) => t.j === j)!.waves));
    reported.push(plan.terms.map((j) => r.zernike.terms.find((t) => t.j === j)!.sigmaWaves));
    if (values['free-distance']) {
      const rf = fitShadow([input], { ...FAST_ONLY, terms: plan.terms, initialCentersM: [[0, 0]], freeDistance: true });
      freeErrors.push(rf.zernike.terms.find((t) => t.j === 4)!.waves);
    }
    process.stdout.write(`${name} trial ${i + 1}/${nTrials}: ${errors[i].map((e, k) => (e / cand.predicted[k].sigmaWaves).toFixed(2)).join(' ')} (σ units)\n`);
  }
  const seconds = (performance.now() - t0) / 1000;
  const rows: TermRow[] = plan.terms.map((j, k) => {
    const e = errors.map((row) => row[k]);
    return {
      j,
      predicted: cand.predicted[k].sigmaWaves,
      wholeFrame: whole.sigma![k],
      rmsError: Math.sqrt(e.reduce((s, x) => s + x * x, 0) / nTrials),
      meanError: e.reduce((s, x) => s + x, 0) / nTrials,
      meanReportedSigma: reported.reduce((s, row) => s + row[k], 0) / nTrials,
    };
  });
  const pooled = Math.sqrt(errors.flat().reduce((s, x, i) => s + (x / rows[i % rows.length].predicted) ** 2, 0) / (nTrials * rows.length));
  const b = cand.bound!;
  lines.push(
    `== ${name}: ${(cand.candidate.discDiameterM * 1e3).toFixed(2)} mm disc at ${cand.candidate.cameraDistanceM} m, sensor ${plan.camera.sensorPx.join('×')} px of ${(plan.camera.pixelPitchM * 1e6).toFixed(1)} µm; ` +
      `region radius ${b.regionRadiusPx.toFixed(1)} px (${b.holdsWholeShadow ? 'whole shadow and four edge fringes' : 'inside of the shadow'}), binning ${b.binning}, ${b.superPixels} super-pixels, bound by the ${b.method} route; ${nTrials} trials, ${seconds.toFixed(0)} s`,
  );
  lines.push('   j  predicted σ   whole-frame CRB   RMS error   RMS/predicted (±1/√(2n))   mean error/(σ/√n)   mean fit σ/predicted');
  for (const r of rows) {
    lines.push(
      `  ${String(r.j).padStart(2)}  ${r.predicted.toExponential(2).padStart(11)}  ${r.wholeFrame.toExponential(2).padStart(16)}  ${r.rmsError.toExponential(2).padStart(10)}  ` +
        `${(r.rmsError / r.predicted).toFixed(2).padStart(13)} ± ${(1 / Math.sqrt(2 * nTrials)).toFixed(2)}  ${(r.meanError / (r.predicted / Math.sqrt(nTrials))).toFixed(2).padStart(18)}  ${(r.meanReportedSigma / r.predicted).toFixed(2).padStart(20)}`,
    );
  }
  lines.push(`  pooled RMS(error/predicted) over all terms: ${pooled.toFixed(3)} (±${(1 / Math.sqrt(2 * nTrials * rows.length)).toFixed(3)})`);
  if (freeErrors.length) {
    const rmsFree = Math.sqrt(freeErrors.reduce((s, x) => s + x * x, 0) / freeErrors.length);
    lines.push(
      `  distance freed: defocus RMS error ${rmsFree.toExponential(2)} against predicted ${cand.defocusSigmaFreeDistanceWaves!.toExponential(2)} (ratio ${(rmsFree / cand.defocusSigmaFreeDistanceWaves!).toFixed(2)}); predicted |ρ(defocus, distance)| ${cand.defocusDistanceCorrelation!.toFixed(3)}`,
    );
  }
  summary[name] = { candidate: cand, rows, pooled, freeDefocusErrors: freeErrors, seconds };
}
process.stdout.write(`\n${lines.join('\n')}\n`);
if (values.out) writeFileSync(values.out, JSON.stringify({ summary, text: lines.join('\n') }, null, 1));
