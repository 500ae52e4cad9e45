/**
 * `shadowfront log` as a technician uses it: two lasers measured for a week, a before/after-cleaning
 * pair compared, the trend flags, a CSV export and reports. Run in-process through the CLI's main()
 * on a real logbook file in a temporary folder.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { main } from '../../app/cli/main.ts';
import { encodeNpy } from '../../core/imageio/npy.ts';
import { SAFETY_POINTS, SAFETY_TITLE } from '../../core/safety.ts';
import { openLogbook } from '../../app/services/logbook/logbook.ts';
import { addMeasurementFromFrames, refitMeasurement } from '../../app/services/logbook/fitBridge.ts';
import { readSetupFile } from '../../app/services/logbook/setupFile.ts';
import type { FitJob } from '../../app/services/logbook/fitBridge.ts';
import { removeTempDirs, syntheticResult, tempDir } from './helpers.ts';

const dir = tempDir('shadowfront-log-cli-');
const db = join(dir, 'logbook.sqlite');
const setup = new URL('../../resources/examples/setup-hene-collimated.json', import.meta.url).pathname;
const setupGreen = join(dir, 'setup-green.json');

async function log(...args: string[]): Promise<{ code: number; out: string; err: string }> {
  return logOn(db, ...args);
}

async function logOn(file: string, ...args: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const o = vi.spyOn(process.stdout, 'write').mockImplementation((s: string | Uint8Array) => ((out += String(s)), true));
  const e = vi.spyOn(process.stderr, 'write').mockImplementation((s: string | Uint8Array) => ((err += String(s)), true));
  try {
    const code = await main(['log', ...args, '--db', file]);
    return { code, out, err };
  } finally {
    o.mockRestore();
    e.mockRestore();
  }
}

function resultFile(name: string, terms: Record<number, number>, wavelengthM = 632.8e-9): string {
  const p = join(dir, name);
  writeFileSync(p, JSON.stringify(syntheticResult({ terms, wavelengthM, sigma: 0.002 })));
  return p;
}

/** A small synthetic frame (NumPy format), different per seed. */
function frameFile(name: string, seed: number): string {
  const w = 32;
  const data = new Float64Array(w * w).map((_, i) => Math.exp(-(((i % w) - 16) ** 2 + (Math.floor(i / w) - 16) ** 2) / (40 + seed)));
  const p = join(dir, name);
  writeFileSync(p, encodeNpy(data, [w, w]));
  return p;
}

let before = 0;
let after = 0;

beforeAll(async () => {
  const g = JSON.parse(readFileSync(setup, 'utf8'));
  writeFileSync(setupGreen, JSON.stringify({ ...g, wavelength: '532 nm' }));
  expect((await log('asset', 'add', 'HeNe bench 2', '--wavelength', '632.8 nm', '--location', 'lab 3', '--limit-rms', 'lambda/14')).code).toBe(0);
  expect((await log('asset', 'add', 'DPSS 532', '--wavelength', '532 nm', '--limit-strehl', '0.8')).code).toBe(0);
  // A week of each. HeNe: steady, except a dirty optic on day 4, cleaned the same morning.
  for (let d = 1; d <= 7; d++) {
    const when = `2025-03-${String(d + 2).padStart(2, '0')}T09:00`;
    const dirty = d === 4;
    const r = await log('add', '--asset', 'HeNe bench 2', '--result', resultFile(`hene-${d}.json`, { 3: dirty ? 0.06 : 0.012 + 0.001 * (d % 2), 4: 0.02, 5: -0.01, 7: 0.004, 8: 0.002 }), '--setup', setup,
      '--tag', 'weekly', ...(dirty ? ['--tag', 'before-cleaning', '--frame', frameFile('before.npy', 1)] : []), '--who', 'ana', '--when', when, '--json');
    expect(r.code, r.err).toBe(0);
    if (dirty) {
      before = JSON.parse(r.out).id;
      const a = await log('add', '--asset', 'HeNe bench 2', '--result', resultFile('hene-4-after.json', { 3: 0.013, 4: 0.02, 5: -0.01, 7: 0.004, 8: 0.002 }), '--setup', setup,
        '--tag', 'after-cleaning', '--frame', frameFile('after.npy', 9), '--note', 'cleaned the fold mirror', '--who', 'ana', '--when', `2025-03-06T10:30`, '--json');
      expect(a.code, a.err).toBe(0);
      after = JSON.parse(a.out).id;
    }
    // DPSS: astigmatism creeping up every day (a drift).
    const g2 = await log('add', '--asset', 'DPSS 532', '--result', resultFile(`dpss-${d}.json`, { 3: 0.03 + 0.012 * d, 4: 0.03, 5: 0.01, 7: 0.005, 8: -0.004 }, 532e-9), '--setup', setupGreen,
      '--tag', 'weekly', '--who', 'ben', '--when', when);
    expect(g2.code, g2.err).toBe(0);
  }
}, 60_000);

afterAll(() => {
  vi.restoreAllMocks();
  removeTempDirs();
});

describe('shadowfront log', { timeout: 30_000 }, () => {
  it('lists the week of each laser', async () => {
    const r = await log('list', '--asset', 'hene bench 2');
    expect(r.code).toBe(0);
    expect(r.out.trim().split('\n').length).toBe(2 + 8);
    expect(r.out).toContain('before-cleaning');
    const j = await log('list', '--tag', 'weekly', '--since', '2025-03-05', '--until', '2025-03-06', '--json');
    expect(JSON.parse(j.out).map((m: { assetName: string }) => m.assetName)).toEqual(['HeNe bench 2', 'DPSS 532', 'HeNe bench 2', 'DPSS 532']);
  });

  it('compares before and after cleaning: the astigmatism went down, the rest did not change significantly', async () => {
    const r = await log('compare', String(before), String(after), '--json');
    expect(r.code).toBe(0);
    const c = JSON.parse(r.out);
    const v = Object.fromEntries(c.rows.map((x: { key: string; verdict: string }) => [x.key, x.verdict]));
    expect(v).toEqual({ rms: 'improved', strehl: 'improved', z3: 'improved', z4: 'no significant change', z5: 'no significant change', z7: 'no significant change', z8: 'no significant change' });
    const z3 = c.rows.find((x: { key: string }) => x.key === 'z3');
    // Δ = 0.013 − 0.060 = −0.047, σ = √2 · 0.002 (both 1σ = 0.002), z = Δ/σ.
    expect(z3.delta).toBeCloseTo(-0.047, 12);
    expect(z3.sigma).toBeCloseTo(Math.SQRT2 * 0.002, 12);
    expect(z3.z).toBeCloseTo(-0.047 / (Math.SQRT2 * 0.002), 9);
    const text = await log('compare', String(before), String(after));
    expect(text.out).toMatch(/RMS wavefront error .* improved/);
    expect(text.out).toMatch(/Δ = B − A/);
  });

  it('shows the drift of the DPSS laser and the Strehl floor in the trend', async () => {
    const r = await log('trend', '--asset', 'DPSS 532');
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/\[N3\] oblique astigmatism \(j=3\): drift: 7 points in a row steadily rising/);
    expect(r.out).toMatch(/\[L\] Strehl ratio .* below the floor 0\.8000/);
    const j = JSON.parse((await log('trend', '--asset', 'DPSS 532', '--json', '--baseline', '4')).out);
    expect(j.baselineCount).toBe(4);
    const steady = await log('trend', '--asset', 'HeNe bench 2', '--json');
    const rms = JSON.parse(steady.out).series.find((s: { key: string }) => s.key === 'rms');
    expect(rms.userLimit).toEqual({ kind: 'max', value: 1 / 14 });
  });

  it('exports CSV (RFC 4180) and JSON of a selection', async () => {
    const csvPath = join(dir, 'hene.csv');
    const r = await log('export', '--format', 'csv', '--asset', 'HeNe bench 2', '--out', csvPath);
    expect(r.code).toBe(0);
    const csv = readFileSync(csvPath, 'utf8');
    const lines = csv.split('\r\n');
    expect(lines[lines.length - 1]).toBe('');
    expect(lines.length - 2).toBe(8);
    const header = lines[0].split(',');
    expect(header.slice(0, 3)).toEqual(['measurement_id', 'asset', 'taken_at']);
    expect(header).toContain('z3_waves');
    const row = lines.find((l) => l.startsWith(`${before},`))!.split(',');
    expect(Number(row[header.indexOf('z3_waves')])).toBe(0.06);
    expect(row[header.indexOf('tags')]).toBe('before-cleaning;weekly');
    const jsonPath = join(dir, 'all.json');
    expect((await log('export', '--format', 'json', '--out', jsonPath)).code).toBe(0);
    const j = JSON.parse(readFileSync(jsonPath, 'utf8'));
    expect(j.format).toBe('shadowfront-logbook-export/1');
    expect(j.measurements.length).toBe(15);
    expect(j.assets.map((a: { name: string }) => a.name).sort()).toEqual(['DPSS 532', 'HeNe bench 2']);
  });

  it('writes self-contained HTML reports with the safety reminder, maps, frames and plots', async () => {
    const cmp = join(dir, 'compare.html');
    expect((await log('report', 'compare', String(before), String(after), '--out', cmp)).code).toBe(0);
    const html = readFileSync(cmp, 'utf8');
    expect(html).toContain(SAFETY_TITLE);
    for (const p of SAFETY_POINTS) expect(html).toContain(p.replace(/'/g, '&#39;'));
    expect(html.match(/data:image\/png;base64,/g)!.length).toBeGreaterThanOrEqual(5); // A, B, B − A, and both frames
    expect(html).toContain('improved');
    expect(html).not.toMatch(/<script|src="http/);
    const trend = join(dir, 'trend.html');
    expect((await log('report', 'trend', '--asset', 'DPSS 532', '--out', trend)).code).toBe(0);
    const t = readFileSync(trend, 'utf8');
    expect(t).toContain(SAFETY_TITLE);
    expect(t.match(/<svg /g)!.length).toBeGreaterThanOrEqual(7); // RMS, Strehl and five coefficients
    expect(t).toContain('532 nm'); // the setup used
    const one = join(dir, 'one.html');
    expect((await log('report', 'measurement', String(after), '--out', one)).code).toBe(0);
    expect(readFileSync(one, 'utf8')).toContain('cleaned the fold mirror');
  });

  it('shows a measurement with its stored frame and every result', async () => {
    const r = await log('show', String(after));
    expect(r.code).toBe(0);
    expect(r.out).toContain('frame after.npy');
    expect(r.out).toContain('Result #');
  });

  it('answers mistakes with a clear message and a non-zero exit code', async () => {
    const cases: [string[], number, RegExp][] = [
      [['frobnicate'], 2, /unknown log action "frobnicate"/],
      [['add', '--result', 'x.json'], 2, /missing --asset/],
      [['add', '--asset', 'HeNe bench 2', '--frame', 'f.png'], 2, /needs the bench setup/],
      [['add', '--asset', 'HeNe bench 2'], 2, /give a fit result/],
      [['add', '--asset', 'Nope', '--result', join(dir, 'hene-1.json')], 1, /no asset named "Nope"/],
      [['add', '--asset', 'HeNe bench 2', '--result', setup], 1, /field "format": expected "shadowfront-result\/1"/],
      [['add', '--asset', 'HeNe bench 2', '--result', join(dir, 'hene-1.json'), '--setup', setupGreen], 1, /the setup says 532\.00 nm/],
      [['add', '--asset', 'HeNe bench 2', '--result', join(dir, 'missing.json')], 1, /missing\.json: no such file/],
      [['compare', '1'], 2, /expected two measurement ids/],
      [['show', '999'], 1, /no measurement #999/],
      [['show', 'abc'], 2, /whole number/],
      [['trend'], 2, /missing --asset/],
      [['trend', '--asset', 'HeNe bench 2', '--limit-rms', 'big'], 2, /--limit-rms must be/],
      [['export', '--format', 'xml', '--out', 'x'], 2, /--format must be "csv" or "json"/],
      [['refit', '1'], 1, /has no stored frames/],
      [['delete', '1'], 2, /add --yes/],
      [['list', '--bogus'], 2, /Unknown option '--bogus'/],
    ];
    for (const [args, code, msg] of cases) {
      const r = await log(...args);
      expect(r.code, args.join(' ')).toBe(code);
      expect(r.err, args.join(' ')).toMatch(msg);
    }
    // Nothing above changed the logbook.
    expect(JSON.parse((await log('list', '--json')).out).length).toBe(15);
  });

  it('sets and clears an asset limit', async () => {
    expect((await log('asset', 'set', 'DPSS 532', '--limit-strehl', 'none', '--location', 'bay 1')).code).toBe(0);
    const a = JSON.parse((await log('asset', 'list', '--json')).out).find((x: { name: string }) => x.name === 'DPSS 532');
    expect([a.limitStrehl, a.location, a.wavelengthM]).toEqual([null, 'bay 1', 532e-9]);
    expect((await log('asset', 'set', 'DPSS 532', '--limit-strehl', '0.8')).code).toBe(0);
  });

  it('explains a damaged logbook and puts the last good copy back', async () => {
    const copy = join(dir, 'copy.sqlite');
    writeFileSync(copy, readFileSync(db));
    writeFileSync(`${copy}.last-good`, readFileSync(`${db}.last-good`));
    writeFileSync(copy, 'not a database at all');
    const bad = await logOn(copy, 'list');
    expect(bad.code).toBe(1);
    expect(bad.err).toMatch(/not an SQLite database/);
    expect(bad.err).toContain(`shadowfront log restore --db ${copy}`);
    const r = await logOn(copy, 'restore');
    expect(r.code, r.err).toBe(0);
    expect(r.out).toMatch(/the damaged file is kept as/);
    expect((await logOn(copy, 'list')).code).toBe(0);
    const info = await logOn(copy, 'info', '--json');
    expect(JSON.parse(info.out).schemaVersion).toBe(2);
  });

  it('prints help for every action', async () => {
    for (const a of ['asset', 'disc', 'add', 'list', 'show', 'compare', 'trend', 'export', 'report', 'refit', 'delete', 'info', 'restore']) {
      const r = await log(a, '--help');
      expect(r.code, a).toBe(0);
      expect(r.out, a).toMatch(/^Usage: shadowfront log /);
    }
  });
});

describe('re-analysis through the fit bridge', { timeout: 30_000 }, () => {
  it('fits the stored frames and setup again and keeps the older result', async () => {
    const jobs: FitJob[] = [];
    // A stand-in for the fit service (not for the storage): it checks what it is given and returns a newer result.
    const fakeFit = async (job: FitJob) => {
      jobs.push(job);
      expect(readFileSync(job.framePaths[0]).equals(readFileSync(join(dir, 'after.npy')))).toBe(true);
      expect(JSON.parse(readFileSync(job.setupPath, 'utf8'))).toEqual(JSON.parse(readFileSync(setup, 'utf8')));
      return syntheticResult({ terms: { 3: 0.0128, 4: 0.0201, 5: -0.0099, 7: 0.0041, 8: 0.0019 }, software: 'shadowfront 0.2.0' });
    };
    const { previous, added } = await refitMeasurement(db, after, {}, fakeFit);
    expect(jobs[0].terms).toEqual([3, 4, 5, 7, 8]);
    expect(previous!.result.software).toBe('shadowfront 0.1.0');
    expect(added.result.software).toBe('shadowfront 0.2.0');
    const lb = await openLogbook(db, { write: false });
    const m = lb.requireMeasurement(after);
    lb.close();
    expect(m.results.map((r) => r.result.software)).toEqual(['shadowfront 0.1.0', 'shadowfront 0.2.0']);
    expect(m.results[1].note).toMatch(/re-analysis \(previous result #\d+, shadowfront 0\.1\.0\)/);
  });

  it('adds a measurement from frames: fits them, then stores frames, darks, setup and result together', async () => {
    const f1 = frameFile('new-1.npy', 3);
    const f2 = frameFile('new-2.npy', 4);
    const dark = join(dir, 'dark.npy');
    writeFileSync(dark, encodeNpy(new Float64Array(32 * 32), [32, 32]));
    const fakeFit = async (job: FitJob) => {
      expect(job).toEqual({ framePaths: [f1, f2], darkPaths: [dark], setupPath: setup, terms: [3, 4, 5] });
      return syntheticResult({ terms: { 3: 0.012, 4: 0.02, 5: -0.01 } });
    };
    const { record } = await addMeasurementFromFrames(db, { framePaths: [f1, f2], darkPaths: [dark], setupPath: setup, setup: readSetupFile(setup), terms: [3, 4, 5] }, { asset: 'HeNe bench 2', tags: ['after-service'] }, fakeFit);
    expect(record.frames.map((f) => `${f.role}:${f.position}:${f.name}`)).toEqual(['frame:0:new-1.npy', 'frame:1:new-2.npy', 'dark:0:dark.npy']);
    expect(record.results.length).toBe(1);
    expect(record.setup).toEqual(JSON.parse(readFileSync(setup, 'utf8')));
  });
});
