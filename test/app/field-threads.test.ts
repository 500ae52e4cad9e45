/**
 * Sharing model grids with helper threads (app/services/threads/fieldThreads.ts, core/optics/fieldEngine.ts)
 * must not change a single number: the reference here is the same computation in one thread, compared
 * bit for bit. The fit of a fixture frame is also checked against the frame's true coefficients (the
 * fixture is made by the reference model plus the camera noise model, test/fixtures/generate.ts), as the
 * accuracy tests do.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { fileURLToPath } from 'node:url';
import { fastField } from '../../core/optics/fast/rimModel.ts';
import { referenceIntensity } from '../../core/optics/reference/index.ts';
import { joinColumns, rowWork, splitByWork } from '../../core/optics/fieldEngine.ts';
import { FieldThreads, helperCount } from '../../app/services/threads/fieldThreads.ts';
import { makeSetup, linspace } from '../optics/helpers.ts';
import { fitFixture, fixtures, truthOf } from '../fit/helpers.ts';

// The HeNe example bench (632.8 nm, w = 4 mm collimated, 3 mm disc at 0.8 m) with all five default terms.
const setup = makeSetup({});
const aberrations = [
  { j: 3, waves: 0.03 },
  { j: 4, waves: 0.05 },
  { j: 5, waves: 0.1 },
  { j: 7, waves: -0.04 },
  { j: 8, waves: 0.05 },
];
// A grid reaching past the shadow edge (radius 1.5 mm) with a circular mask, as the fit's grids.
const xs = linspace(-1.7e-3, 1.7e-3, 64);
const ys = linspace(-1.65e-3, 1.75e-3, 57);
const mask = new Uint8Array(xs.length * ys.length).map((_, i) => (Math.hypot(xs[i % xs.length], ys[Math.floor(i / xs.length)]) < 1.6e-3 ? 1 : 0));

const engines: FieldThreads[] = [];
afterAll(async () => {
  await Promise.all(engines.map((e) => e.close()));
});

async function readyEngine(options: ConstructorParameters<typeof FieldThreads>[0] = { helpers: 1 }): Promise<FieldThreads> {
  const e = new FieldThreads(options);
  engines.push(e);
  await e.whenReady();
  return e;
}

describe('cutting a grid into parts of equal work', () => {
  it('gives consecutive blocks covering every row, with about equal work', () => {
    const work = rowWork(xs.length, ys.length, mask);
    const blocks = splitByWork(work, 2);
    expect(blocks[0].from).toBe(0);
    expect(blocks[0].to).toBe(blocks[1].from);
    expect(blocks[1].to).toBe(ys.length);
    const sum = (b: { from: number; to: number }) => Array.from(work.subarray(b.from, b.to)).reduce((a, c) => a + c, 0);
    const total = sum({ from: 0, to: ys.length });
    expect(Math.abs(sum(blocks[0]) - total / 2)).toBeLessThanOrEqual(xs.length);
  });

  it('joins column blocks back into the row-major grid', () => {
    const full = Float64Array.from({ length: 12 }, (_, i) => i); // 4 columns × 3 rows
    const part = (from: number, to: number) => ({ block: { from, to }, values: Float64Array.from({ length: (to - from) * 3 }, (_, k) => full[Math.floor(k / (to - from)) * 4 + from + (k % (to - from))]) });
    expect(Array.from(joinColumns([part(0, 1), part(1, 4)], 4, 3))).toEqual(Array.from(full));
  });
});

describe('helper threads', () => {
  it('give the fast model exactly, with its derivatives and a point mask', async () => {
    const engine = await readyEngine();
    const options = { derivativeTerms: [3, 4, 5, 7, 8], centerDerivatives: true, pointMask: mask };
    const local = fastField(setup, aberrations, xs, ys, options);
    const shared = engine.fastField(setup, aberrations, xs, ys, options);
    expect(shared.nPhi).toBe(local.nPhi);
    expect(shared.invalidCount).toBe(local.invalidCount);
    expect(Array.from(shared.re)).toEqual(Array.from(local.re));
    expect(Array.from(shared.im)).toEqual(Array.from(local.im));
    for (let q = 0; q < local.params.length; q++) {
      expect(Array.from(shared.dRe[q])).toEqual(Array.from(local.dRe[q]));
      expect(Array.from(shared.dIm[q])).toEqual(Array.from(local.dIm[q]));
    }
  });

  it('give the reference model exactly (every part planned for the whole grid)', async () => {
    const engine = await readyEngine();
    const local = referenceIntensity(setup, aberrations, xs, ys);
    const shared = engine.referenceIntensity(setup, aberrations, xs, ys);
    expect(Array.from(shared)).toEqual(Array.from(local));
  });

  it('compute a whole reference grid on a helper while this thread goes on, exactly', async () => {
    const engine = await readyEngine();
    const local = referenceIntensity(setup, aberrations, xs, ys);
    const pending = engine.startReferenceIntensity(setup, aberrations, xs, ys);
    // Meanwhile the fast model is computed here (the busy helper is left out), exactly as in one thread.
    const options = { derivativeTerms: [3, 4, 5, 7, 8], centerDerivatives: true, pointMask: mask };
    const fast = engine.fastField(setup, aberrations, xs, ys, options);
    expect(Array.from(fast.re)).toEqual(Array.from(fastField(setup, aberrations, xs, ys, options).re));
    expect(Array.from(pending())).toEqual(Array.from(local));
    // The helper takes parts again afterwards.
    expect(Array.from(engine.referenceIntensity(setup, aberrations, xs, ys))).toEqual(Array.from(local));
  });

  it('stop waiting for a reference grid when the caller cancels', async () => {
    const engine = await readyEngine();
    const pending = engine.startReferenceIntensity(setup, aberrations, xs, ys);
    expect(() => pending(() => false)).toThrow(expect.objectContaining({ name: 'CancelledError' }));
  });

  it('refuse a part that lies outside the points its quadrature was planned for', () => {
    expect(() => referenceIntensity(setup, aberrations, xs, ys, { planXsM: xs.slice(0, 10) })).toThrow(/xsM spans .* outside the planned points/);
  });

  it('leave a whole fit unchanged (fixture interior-0, with the reference-model polish)', async () => {
    const engine = await readyEngine();
    const e = fixtures.find((f) => f.file === 'interior-0.png')!;
    const local = fitFixture(e, { referencePolish: 'always' }).result;
    const shared = fitFixture(e, { referencePolish: 'always', fieldEngine: engine }).result;
    expect(shared.settings.referencePolish).toMatch(/^reference-model polish: 1 round/);
    expect(shared.zernike.terms.map((t) => t.waves)).toEqual(local.zernike.terms.map((t) => t.waves));
    expect(shared.zernike.terms.map((t) => t.sigmaWaves)).toEqual(local.zernike.terms.map((t) => t.sigmaWaves));
    expect(shared.chi2PerDof).toBe(local.chi2PerDof);
    // …and it is right: every coefficient within 3σ of the frame's truth.
    for (const t of shared.zernike.terms) expect(Math.abs(t.waves - truthOf(e, t.j))).toBeLessThan(3 * t.sigmaWaves);
  });

  it('compute a part here when its helper stops without answering, and go on without it', async () => {
    const entry = fileURLToPath(new URL('./fixtures/dying-field-worker.mjs', import.meta.url));
    const engine = await readyEngine({ helpers: 1, workerEntry: entry, minWaitMs: 300 });
    const local = fastField(setup, aberrations, xs, ys, { pointMask: mask });
    const shared = engine.fastField(setup, aberrations, xs, ys, { pointMask: mask });
    expect(Array.from(shared.re)).toEqual(Array.from(local.re));
    expect(engine.workingHelpers).toBe(0);
  });

  it('read SHADOWFRONT_THREADS as the total number of threads', () => {
    expect(helperCount({ SHADOWFRONT_THREADS: '1' })).toBe(0);
    expect(helperCount({ SHADOWFRONT_THREADS: '3' })).toBe(2);
    expect(() => helperCount({ SHADOWFRONT_THREADS: '0' })).toThrow(/SHADOWFRONT_THREADS must be a whole number of threads ≥ 1; got "0"/);
    expect(() => helperCount({ SHADOWFRONT_THREADS: 'two' })).toThrow(/got "two"/);
  });
});
