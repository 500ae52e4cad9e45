/**
 * `shadowfront plan` as a user runs it: exactly one JSON object with --json, a readable table without it,
 * exit codes, and messages that name the file, the field and the value. The plan files are small synthetic
 * benches of our own. Sources: the CLI's own usage text (app/cli/commands/plan.ts) and the JSON format
 * (ECMA-404: a JSON text is one value).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import type { PlanReport } from '../../core/plan/types.ts';
import { examplePlanJson, runPlanJson } from '../../app/services/planService.ts';

const root = fileURLToPath(new URL('../..', import.meta.url));
const bin = join(root, 'app/cli/shadowfront.mjs');
const tmp = mkdtempSync(join(tmpdir(), 'shadowfront-plan-'));

function run(...args: string[]) {
  const r = spawnSync(process.execPath, [bin, ...args], { cwd: root, encoding: 'utf8', timeout: 170_000 });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

const small = {
  format: 'shadowfront-plan/1',
  note: 'synthetic test bench',
  laser: { wavelength: '632.8 nm', beamRadius: '3 mm', curvatureRadius: 'collimated' },
  camera: { pixelPitch: '10 um', sensorSize: [128, 128], bitDepth: 12, peakCounts: 3000, readNoise: 3 },
  candidates: { discDiameters: ['2 mm'], cameraDistances: { from: '0.6 m', to: '0.8 m', steps: 2 } },
};
const smallPath = join(tmp, 'small-plan.json');
writeFileSync(smallPath, JSON.stringify(small));

describe('shadowfront plan', { timeout: 180_000 }, () => {
  it('--json prints exactly one JSON object: the plan report', () => {
    const r = run('plan', smallPath, '--json');
    expect(r.code).toBe(0);
    const lines = r.out.trim().split('\n');
    expect(lines.length).toBe(1);
    const report = JSON.parse(lines[0]) as PlanReport;
    expect(report.format).toBe('shadowfront-plan-report/1');
    expect(report.candidates.length).toBe(2);
    expect(report.candidates.map((c) => c.candidate.cameraDistanceM)).toEqual([0.6, 0.8]);
    for (const c of report.candidates) {
      expect(Object.keys(c.figures).sort()).toEqual(
        [
          'edgeRoughnessM',
          'effectiveDistanceM',
          'fresnelNumber',
          'magnification',
          'rimToleranceM',
          'roughnessIntensityRatio',
          'sensorMinSidePx',
          'shadowDiameterPx',
          'shadowFits',
          'sourceBlurPx',
          'spotDiameterPx',
          'visibleRings',
          'zoneWidthM',
        ].sort(),
      );
      expect(c.predicted.map((p) => p.j)).toEqual([3, 4, 5, 7, 8]);
      expect(c.rank === 1 || c.rank === 2).toBe(true);
    }
    expect(report.recommended === 0 || report.recommended === 1).toBe(true);
    expect(r.err).not.toMatch(/error/i);
  });

  it('prints a table, the recommendation, the warnings and the safety reminder without --json', () => {
    const r = run('plan', smallPath);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/disc\s+distance\s+L'\s+N_F\s+Δr\s+tolerance\s+spot\s+rings\s+fits\?\s+σ astig\s+σ coma\s+σ defocus/);
    expect(r.out).toMatch(/Recommendation: 2 mm disc at 0\.[68] m: astigmatism/);
    expect(r.out).toContain('does not fit on the sensor');
    expect(r.out).toContain('laser safety officer');
  });

  it('names the file, the field and the value of a bad plan (exit 1), and a missing file', () => {
    const bad = join(tmp, 'bad-plan.json');
    writeFileSync(bad, JSON.stringify({ ...small, camera: { ...small.camera, pixelPitch: '10 parsecs' } }));
    const r = run('plan', bad, '--json');
    expect(r.code).toBe(1);
    expect(r.out).toBe('');
    expect(r.err).toContain(`${bad}: field "camera.pixelPitch" is "10 parsecs"`);
    const missing = run('plan', join(tmp, 'nope.json'));
    expect(missing.code).toBe(1);
    expect(missing.err).toContain('no such file');
    const usage = run('plan');
    expect(usage.code).toBe(2);
    expect(usage.err).toContain('Usage: shadowfront plan');
  });
});

describe('planService', { timeout: 60_000 }, () => {
  it('reads the bundled example (synthetic) and plans from JSON with a source name in errors', () => {
    const example = examplePlanJson();
    expect(example.format).toBe('shadowfront-plan/1');
    expect(String(example.note)).toMatch(/^synthetic/);
    expect(() => runPlanJson({ ...small, laser: { ...small.laser, wavelength: 633 } }, 'from the app')).toThrow(/^from the app: field "laser.wavelength" is 633;/);
    const seen: number[] = [];
    const report = runPlanJson(small, 'from the app', (f) => void seen.push(f));
    expect(report.candidates.length).toBe(2);
    expect(seen[seen.length - 1]).toBe(1);
  });
});
