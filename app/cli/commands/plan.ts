import { parseArgs } from 'node:util';
import { safetyText } from '../../../core/safety.ts';
import type { CandidateReport, PlanReport } from '../../../core/plan/types.ts';
import { runPlanFile } from '../../services/planService.ts';
import { progressPrinter, UsageError } from '../output.ts';

export const PLAN_USAGE = `Usage: shadowfront plan <plan.json> [--json]

Plan the bench: for every candidate disc diameter and camera distance of a plan file (format
"shadowfront-plan/1": the laser, the camera, the candidates; see core/plan/README.md), print the
effective distance L', the Fresnel number N_F, the rim zone Δr and its 10 % tolerance, the spot and
shadow size on the sensor, the bright rings, the predicted 1σ of each Zernike coefficient (Cramér–Rao
bound of the fit's model with the camera noise model) and the defocus–distance correlation, then rank
the candidates and recommend one.

Options:
  --json       print exactly one JSON object (format "shadowfront-plan-report/1")
  -h, --help   show this help

Exit status: 0 planned; 1 bad input; 2 bad usage; 3 no candidate is usable.`;

const ASTIGMATISM = [3, 5];
const COMA = [7, 8];

function sigmaOf(c: CandidateReport, js: number[]): number | null {
  const s = c.predicted.filter((p) => js.includes(p.j)).map((p) => p.sigmaWaves);
  return s.length ? Math.max(...s) : null;
}

const sig = (x: number | null) => (x === null ? '—' : x.toExponential(1));
const num = (x: number, digits: number) => Number(x.toPrecision(digits)).toString();

/** The plan report as a readable table, the recommendation and the warnings. */
export function formatPlan(r: PlanReport): string {
  const header = ['#', 'disc', 'distance', "L'", 'N_F', 'Δr', 'tolerance', 'spot', 'rings', 'fits?', 'σ astig', 'σ coma', 'σ defocus', '|ρ(def,L)|', 'rank'];
  const units = ['', 'mm', 'm', 'm', '', 'µm', 'µm', 'px', '', '', 'waves', 'waves', 'waves', '', ''];
  const rows = r.candidates.map((c, i) => {
    const f = c.figures;
    const fits = f.shadowFits === null ? '?' : f.shadowFits ? (c.bound && !c.bound.holdsWholeShadow ? 'yes*' : 'yes') : 'no';
    return [
      String(i + 1),
      num(c.candidate.discDiameterM * 1e3, 3),
      num(c.candidate.cameraDistanceM, 3),
      num(f.effectiveDistanceM, 3),
      num(f.fresnelNumber, 3),
      num(f.zoneWidthM * 1e6, 3),
      num(f.rimToleranceM * 1e6, 2),
      f.spotDiameterPx.toFixed(1),
      String(f.visibleRings),
      fits,
      sig(sigmaOf(c, ASTIGMATISM)),
      sig(sigmaOf(c, COMA)),
      sig(sigmaOf(c, [4])),
      c.defocusDistanceCorrelation === null ? '—' : c.defocusDistanceCorrelation.toFixed(2),
      c.rank === null ? '—' : String(c.rank),
    ];
  });
  const table = [header, units, ...rows];
  const widths = header.map((_, k) => Math.max(...table.map((row) => [...row[k]].length)));
  const line = (row: string[]) => row.map((cell, k) => cell.padStart(widths[k])).join('  ');
  const out: string[] = [];
  const terms = r.terms.join(', ');
  out.push(`Bench plan at ${num(r.wavelengthM * 1e9, 5)} nm — predicted 1σ (Cramér–Rao bound) of terms j = ${terms}, in waves over r = ${num(r.zernikeRadiusM * 1e3, 4)} mm`);
  out.push('');
  out.push(line(header));
  out.push(line(units));
  for (const row of rows) out.push(line(row));
  out.push('');
  out.push('spot: first dark ring diameter; rings: bright rings inside the shadow and on the sensor; fits?: the shadow fits on the');
  out.push('sensor (yes* = but not all of its first four edge fringes); σ astig and σ coma: the larger of the two terms; σ defocus with');
  out.push('the camera distance known; |ρ(def,L)|: defocus–distance correlation when the distance is freed too.');
  out.push('');
  out.push(`Recommendation: ${r.recommendation}`);
  out.push(`Ranking rule: ${r.rankingRule}.`);
  const notes = r.candidates.flatMap((c, i) => c.warnings.map((w) => `  #${i + 1}: ${w}`));
  if (notes.length || r.warnings.length) {
    out.push('');
    out.push('warnings:');
    for (const w of r.warnings) out.push(`  - ${w}`);
    out.push(...notes);
  }
  const coarse = r.candidates.filter((c) => c.bound && c.bound.binning > c.bound.fitBinning).length;
  if (coarse > 0) {
    out.push('');
    out.push(
      `For ${coarse} candidate${coarse === 1 ? '' : 's'} the bound was computed on coarser super-pixels than the fit would use (to keep the plan quick): those σ are on the safe side (larger).`,
    );
  }
  out.push('');
  out.push(safetyText());
  return out.join('\n');
}

export function planCommand(argv: string[]): number {
  const { values, positionals } = parseArgs({
    args: argv,
    allowPositionals: true,
    options: { json: { type: 'boolean', default: false }, help: { type: 'boolean', short: 'h', default: false } },
  });
  if (values.help) {
    process.stdout.write(`${PLAN_USAGE}\n`);
    return 0;
  }
  if (positionals.length !== 1) throw new UsageError(positionals.length === 0 ? 'missing the plan file' : 'expected one plan file');
  const bar = values.json ? () => {} : progressPrinter('planning');
  const report = runPlanFile(positionals[0], (f) => bar(f));
  if (values.json) process.stdout.write(`${JSON.stringify(report)}\n`);
  else process.stdout.write(`${formatPlan(report)}\n`);
  return report.recommended === null ? 3 : 0;
}
