/**
 * Durability: a writer killed with SIGKILL (kill -9) at random instants, over and over, leaves a
 * logbook that opens and holds either the state before the commit in flight or the state after it,
 * never a mix; the last good copy opens too; every frame a record refers to is there.
 */
import { spawn } from 'node:child_process';
import { existsSync, readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { openLogbook } from '../../app/services/logbook/logbook.ts';
import { lastGoodPath } from '../../app/services/logbook/paths.ts';
import { removeTempDirs, syntheticResult, tempDir } from './helpers.ts';

const here = dirname(fileURLToPath(import.meta.url));
const writer = join(here, 'crash-writer.ts');
const KILLS = Number(process.env.SHADOWFRONT_CRASH_KILLS ?? 30);
const PREFILL = 120;

interface Writer {
  /** Let it open the logbook and commit; resolves with what it reported when it was killed. */
  runAndKill(delayMs: number): Promise<{ ready: number; lastReported: number; tempLeft: boolean }>;
}

/** Start a writer process now; it loads and then waits to be told to go. */
function startWriter(db: string): Writer {
  const child = spawn(process.execPath, ['--import', 'tsx', writer, db], { stdio: ['pipe', 'pipe', 'pipe'] });
  let out = '';
  let err = '';
  let killed = false;
  let onReady: ((n: number) => void) | null = null;
  let ready = -1;
  child.stdout.on('data', (d: Buffer) => {
    out += d.toString();
    const m = /ready (\d+)/.exec(out);
    if (m && ready < 0) {
      ready = Number(m[1]);
      onReady?.(ready);
    }
  });
  child.stderr.on('data', (d: Buffer) => (err += d.toString()));
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) => child.on('exit', (code, signal) => resolve({ code, signal })));
  return {
    async runAndKill(delayMs) {
      const readyNow = new Promise<number>((resolve) => (onReady = resolve));
      child.stdin.write('go\n');
      const got = await Promise.race([readyNow, exited.then(() => -1)]);
      if (got < 0) throw new Error(`writer ended before it was ready: ${err}`);
      await new Promise((r) => setTimeout(r, delayMs));
      killed = true;
      child.kill('SIGKILL');
      const { code, signal } = await exited;
      if (!killed || signal !== 'SIGKILL') throw new Error(`writer ended by itself (code ${code}): ${err}`);
      const counts = [...out.matchAll(/committed (\d+)/g)].map((m) => Number(m[1]));
      // A temporary file left behind: the kill landed while the writer was writing the new file.
      const tempLeft = readdirSync(dirname(db)).some((f) => f.endsWith('.tmp') || f.endsWith('.prev'));
      return { ready, lastReported: counts.length ? counts[counts.length - 1] : ready, tempLeft };
    },
  };
}

interface LaneStats {
  commits: number;
  midWrite: number;
  newState: number;
}

/** One logbook, killed `kills` times in a row at random instants; every state checked. */
async function lane(kills: number): Promise<LaneStats> {
  const db = join(tempDir('shadowfront-crash-'), 'lb.sqlite');
  let next = startWriter(db);
  // A logbook of a realistic size (about 0.3 MB), so that writing it takes a measurable part of a commit.
  const lb = await openLogbook(db, { write: true });
  lb.addAsset({ name: 'crash' });
  const result = syntheticResult({ terms: { 3: 0.01, 4: 0.02, 5: -0.01, 7: 0.004, 8: 0.001 } });
  lb.batch(() => {
    for (let i = 0; i < PREFILL; i++) lb.addMeasurement({ asset: 'crash', notes: `n=${i + 1}`, tags: ['crash'], result });
  });
  lb.close();

  let expected = PREFILL;
  const stats: LaneStats = { commits: 0, midWrite: 0, newState: 0 };
  for (let k = 0; k < kills; k++) {
    const current = next;
    const running = current.runAndKill(Math.random() * 200);
    // The next writer loads while this one runs; it touches the logbook only when told to go.
    if (k < kills - 1) next = startWriter(db);
    const run = await running;
    expect(run.ready).toBe(expected + 1); // after its warm-up commit
    if (run.tempLeft) stats.midWrite++;
    const reader = await openLogbook(db, { write: false }); // throws if the file were damaged
    const list = reader.listMeasurements();
    const n = list.length;
    // Old state: what the writer last reported (at least its warm-up commit); new: one more (committed, killed before it could say so).
    expect([run.lastReported, run.lastReported + 1]).toContain(n);
    if (n === run.lastReported + 1) stats.newState++;
    // Nothing half-done: ids 1..n, each with its note, tags and result, and every referenced frame present and intact.
    expect(list.map((m) => m.id)).toEqual(Array.from({ length: n }, (_, i) => i + 1));
    expect(list.every((m, i) => m.notes === `n=${i + 1}` && m.resultCount === 1 && m.tags.includes('crash'))).toBe(true);
    expect(reader.verifyFrames()).toEqual([]);
    reader.close();
    // The last good copy opens, and is the state before the latest commit (every run commits at least once),
    // or the same as the file when the kill fell between keeping the old file as last good and the rename.
    const lgCount = await countIn(lastGoodPath(db));
    expect([n - 1, n]).toContain(lgCount);
    stats.commits += n - expected;
    expected = n;
  }
  // The next writer takes over the dead writer's lock and cleans up its temporary files.
  const last = await openLogbook(db, { write: true });
  expect(last.listMeasurements().length).toBe(expected);
  last.close();
  expect(readdirSync(dirname(db)).filter((f) => f.endsWith('.tmp') || f.endsWith('.prev'))).toEqual([]);
  expect(existsSync(`${db}.lock`)).toBe(false);
  return stats;
}

async function countIn(path: string): Promise<number> {
  const lb = await openLogbook(path, { write: false });
  try {
    return lb.listMeasurements().length;
  } finally {
    lb.close();
  }
}

afterAll(() => removeTempDirs());

describe('kill -9 at random instants', () => {
  it(`leaves the old or the new state, never a damaged file (${KILLS} kills)`, { timeout: 300_000 }, async () => {
    // Two logbooks side by side, to use both cores; KILLS kills in all.
    const lanes = await Promise.all([lane(Math.ceil(KILLS / 2)), lane(Math.floor(KILLS / 2))]);
    const sum = (k: keyof LaneStats) => lanes.reduce((s, l) => s + l[k], 0);
    console.log(
      `kill -9 test: ${KILLS} kills at random instants; ${sum('commits')} commits survived (one warm-up per writer included); ${sum('midWrite')} kills left a temporary file (killed while writing); ` +
        `${sum('newState')} found the new state before the writer could report it`,
    );
  });
});
