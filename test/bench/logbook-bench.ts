/**
 * Logbook benchmark: insert time with 10 000 records, and the database size per record (frames are kept
 * apart, so they are not in the file). Run: npx tsx test/bench/logbook-bench.ts
 * Figures only, no assertions (DEVELOPERS.md: no timing assertions).
 *
 * The records are synthetic but shaped like a real "shadowfront fit --json" result: five terms
 * (3, 4, 5, 7, 8), full-precision numbers, a 5 × 5 correlation matrix, solver settings and four
 * warnings, about 2.9 kB of JSON, plus tags, notes and the setup (stored once for identical setups).
 */
import { readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { openLogbook } from '../../app/services/logbook/logbook.ts';
import type { Logbook } from '../../app/services/logbook/logbook.ts';
import { measurementsCsv } from '../../core/logbook/export.ts';
import type { FitResult } from '../../core/fit/result.ts';
import { removeTempDirs, syntheticResult, tempDir } from '../logbook/helpers.ts';

const setup = JSON.parse(readFileSync(new URL('../../resources/examples/setup-hene-collimated.json', import.meta.url), 'utf8'));

let seed = 12345;
function rand(): number {
  // Park–Miller minimal standard generator, for repeatable filler values.
  seed = (seed * 16807) % 2147483647;
  return seed / 2147483647;
}

function realisticResult(i: number): FitResult {
  const r = syntheticResult({ terms: { 3: 0.01 + 0.01 * rand(), 4: 0.05 * rand(), 5: 0.1 + 0.01 * rand(), 7: 0.005 * rand(), 8: 0.05 * rand() }, sigma: 0.002 + 0.001 * rand() });
  for (const t of r.zernike.terms) {
    t.sigmaWaves = 0.001 + 0.02 * rand();
    t.nm = t.waves * 632.8;
    t.sigmaNm = t.sigmaWaves * 632.8;
  }
  r.zernike.basis = 'ANSI Z80.28 / ISO 24157 Zernike polynomials, unit RMS over the normalisation radius';
  r.zernike.correlation = r.zernike.terms.map((_, a) => r.zernike.terms.map((__, b) => (a === b ? 1 : 2 * rand() - 1)));
  r.center_m = [1e-5 * rand(), 1e-5 * rand()];
  r.centers_m = [r.center_m];
  r.chi2PerDof = 1 + 0.1 * rand();
  r.elapsedMs = Math.round(3000 + 2000 * rand());
  r.settings = { terms: [3, 4, 5, 7, 8], binning: 6, coarseBinning: 6, freeDistance: false, freeDiscRadius: false, rimSamples: [96], noiseModel: [{ readNoiseCounts: 26 + rand(), gainCountsPerElectron: 1, frames: 1, darks: 0 }] };
  r.warnings = [
    `frame-${i}.png: the file holds 16-bit samples and the setup says a 12-bit camera; all counts are within 4095, so they are read as 12-bit data`,
    `frame-${i}.png: no dark frames: the background (73.0 counts) is taken from the darkest part of the frame border; record dark frames (laser blocked) for a better estimate`,
    'the disc shape is not calibrated: astigmatism may include disc ellipticity (measure with the disc turned by 90° to separate them)',
    'the region holds only the inside of the shadow: defocus and coma are weakly determined without the shadow edge',
  ];
  return r;
}

function record(lb: Logbook, i: number): void {
  const day = new Date(Date.UTC(2020, 0, 1) + i * 3_600_000 * 6).toISOString();
  lb.addMeasurement({ asset: i % 2 ? 'HeNe bench 2' : 'DPSS 532', takenAt: day, operator: 'ana', tags: i % 10 === 0 ? ['weekly', 'after-cleaning'] : ['weekly'], notes: `routine check ${i}`, setup, result: realisticResult(i) });
}

function ms(t0: number): number {
  return performance.now() - t0;
}

function median(v: number[]): number {
  const s = [...v].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

async function fresh(name: string): Promise<Logbook> {
  const lb = await openLogbook(join(tempDir('shadowfront-bench-'), name), { write: true });
  lb.addAsset({ name: 'HeNe bench 2', wavelengthM: 632.8e-9 });
  lb.addAsset({ name: 'DPSS 532', wavelengthM: 532e-9 });
  return lb;
}

const N = 10_000;
const lines: string[] = [];
const say = (s: string) => {
  lines.push(s);
  console.log(s);
};

say(`logbook benchmark, Node ${process.version}, ${new Date().toISOString()}`);

// 1. 10 000 records in one commit (a script importing a history).
{
  const lb = await fresh('batch.sqlite');
  const emptyBytes = statSync(lb.path).size;
  const t0 = performance.now();
  lb.batch(() => {
    for (let i = 0; i < N; i++) record(lb, i);
  });
  const t = ms(t0);
  const bytes = statSync(lb.path).size;
  say(`insert ${N} records in one commit: ${(t / 1000).toFixed(2)} s (${((t / N) * 1000).toFixed(0)} µs per record)`);
  say(`database file with ${N} records: ${(bytes / 1e6).toFixed(2)} MB; ${((bytes - emptyBytes) / N).toFixed(0)} bytes per record (frames excluded; result JSON ≈ ${JSON.stringify(realisticResult(0)).length} bytes)`);

  // 2. One more record, each its own commit, on top of 10 000 (the everyday case).
  const each: number[] = [];
  for (let k = 0; k < 20; k++) {
    const t1 = performance.now();
    record(lb, N + k);
    each.push(ms(t1));
  }
  say(`add one record as its own commit at ${N} records: median ${median(each).toFixed(0)} ms (min ${Math.min(...each).toFixed(0)}, max ${Math.max(...each).toFixed(0)}) — the whole file is rewritten and synced each time`);
  const path = lb.path;
  lb.close();

  // 3. Reading it back.
  let t2 = performance.now();
  const r = await openLogbook(path, { write: false });
  say(`open for reading (read, integrity check, schema check): ${ms(t2).toFixed(0)} ms`);
  t2 = performance.now();
  const list = r.listMeasurements({ asset: 'HeNe bench 2' });
  say(`list ${list.length} measurements of one asset: ${ms(t2).toFixed(0)} ms`);
  t2 = performance.now();
  const trend = r.trend('HeNe bench 2', { limitRmsWaves: 1 / 14 });
  say(`trend of ${trend.series[0].points.length} measurements (7 series, limits, run rules): ${ms(t2).toFixed(0)} ms`);
  t2 = performance.now();
  const csv = measurementsCsv(r.records({ asset: 'DPSS 532' }));
  say(`CSV export of ${list.length} measurements: ${ms(t2).toFixed(0)} ms, ${(csv.length / 1e6).toFixed(2)} MB`);
  t2 = performance.now();
  r.compareMeasurements(1, 3);
  say(`compare two measurements: ${ms(t2).toFixed(1)} ms`);
  r.close();
}

// 4. 1 000 records, each its own commit, from an empty logbook.
{
  const lb = await fresh('each.sqlite');
  const M = 1000;
  const t0 = performance.now();
  for (let i = 0; i < M; i++) record(lb, i);
  const t = ms(t0);
  say(`insert ${M} records one commit each, from empty: ${(t / 1000).toFixed(1)} s (${(t / M).toFixed(1)} ms per record on average; file ${(statSync(lb.path).size / 1e6).toFixed(2)} MB)`);
  lb.close();
}

removeTempDirs();
