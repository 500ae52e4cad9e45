/**
 * The logbook's storage, on real files in a temporary folder (no mocks): migrations, frames stored
 * once, a second writer refused, damaged and foreign files detected, re-analysis kept beside the
 * original, files that another SQLite program reads.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, afterEach, describe, expect, it } from 'vitest';
import { LogbookProblem, openLogbook, restoreLastGood } from '../../app/services/logbook/logbook.ts';
import type { Logbook } from '../../app/services/logbook/logbook.ts';
import { APPLICATION_ID, CURRENT_SCHEMA_VERSION, MIGRATIONS } from '../../app/services/logbook/schema.ts';
import { defaultLogbookPath, framesDir, lastGoodPath, lockPath, resolveLogbookPath } from '../../app/services/logbook/paths.ts';
import { loadSqlJs } from '../../app/services/logbook/sqlite.ts';
import { sha256Hex } from '../../app/services/logbook/frameStore.ts';
import { removeTempDirs, syntheticResult, tempDir } from './helpers.ts';

const open: Logbook[] = [];
async function lbOpen(path: string, write: boolean, extra: { schemaVersion?: number } = {}): Promise<Logbook> {
  const lb = await openLogbook(path, { write, ...extra });
  open.push(lb);
  return lb;
}
afterEach(() => {
  for (const lb of open.splice(0)) lb.close();
});
afterAll(() => removeTempDirs());

const setupJson = JSON.parse(readFileSync(new URL('../../resources/examples/setup-hene-collimated.json', import.meta.url), 'utf8'));

function addOne(lb: Logbook, asset: string, i: number, extra: Partial<Parameters<Logbook['addMeasurement']>[0]> = {}) {
  return lb.addMeasurement({
    asset,
    takenAt: `2025-03-${String(i).padStart(2, '0')}T09:00:00Z`,
    tags: ['weekly'],
    setup: setupJson,
    result: syntheticResult({ terms: { 3: 0.01 * i, 4: 0.02, 5: -0.01, 7: 0.004, 8: 0.001 } }),
    ...extra,
  });
}

async function expectProblem(p: Promise<unknown>): Promise<LogbookProblem> {
  try {
    await p;
  } catch (err) {
    expect(err).toBeInstanceOf(LogbookProblem);
    return err as LogbookProblem;
  }
  throw new Error('expected a LogbookProblem');
}

describe('where the logbook lives', () => {
  it('follows the XDG Base Directory Specification on Linux, and the usual folders on macOS and Windows', () => {
    // XDG Base Directory Specification 0.8: $XDG_DATA_HOME, or $HOME/.local/share when unset or empty;
    // a relative path in it is invalid and ignored.
    expect(defaultLogbookPath({ XDG_DATA_HOME: '/data/x' }, 'linux', '/home/ana')).toBe('/data/x/shadowfront/logbook.sqlite');
    expect(defaultLogbookPath({}, 'linux', '/home/ana')).toBe('/home/ana/.local/share/shadowfront/logbook.sqlite');
    expect(defaultLogbookPath({ XDG_DATA_HOME: '' }, 'linux', '/home/ana')).toBe('/home/ana/.local/share/shadowfront/logbook.sqlite');
    expect(defaultLogbookPath({ XDG_DATA_HOME: 'rel/dir' }, 'linux', '/home/ana')).toBe('/home/ana/.local/share/shadowfront/logbook.sqlite');
    expect(defaultLogbookPath({}, 'darwin', '/Users/ana')).toBe('/Users/ana/Library/Application Support/shadowfront/logbook.sqlite');
    expect(defaultLogbookPath({ APPDATA: 'C:\\Users\\ana\\AppData\\Roaming' }, 'win32', 'C:\\Users\\ana')).toMatch(/^C:\\Users\\ana\\AppData\\Roaming.shadowfront.logbook\.sqlite$/);
    expect(resolveLogbookPath('/x/a.sqlite', { SHADOWFRONT_DB: '/y/b.sqlite' })).toEqual({ path: '/x/a.sqlite', source: '--db' });
    expect(resolveLogbookPath(undefined, { SHADOWFRONT_DB: '/y/b.sqlite' })).toEqual({ path: '/y/b.sqlite', source: 'SHADOWFRONT_DB' });
  });
});

describe('schema and migrations', { timeout: 30_000 }, () => {
  it('creates a new logbook at the current schema, marked as ours', async () => {
    const db = join(tempDir(), 'sub', 'lb.sqlite');
    const lb = await lbOpen(db, true);
    expect(lb.schemaVersion).toBe(CURRENT_SCHEMA_VERSION);
    expect(Number(lb.query('PRAGMA application_id')[0].application_id)).toBe(APPLICATION_ID);
    expect(lb.query("SELECT value FROM meta WHERE key = 'schema_version'")[0].value).toBe(String(CURRENT_SCHEMA_VERSION));
    expect(Number(lb.query('PRAGMA user_version')[0].user_version)).toBe(CURRENT_SCHEMA_VERSION);
    // The file exists at once, and starts with the SQLite header (SQLite file format §1.3.1: "SQLite format 3\0").
    expect(Buffer.from(readFileSync(db).subarray(0, 16)).toString('latin1')).toBe('SQLite format 3\u0000');
  });

  it('initialises an empty (0-byte) file, as SQLite itself treats one', async () => {
    const db = join(tempDir(), 'empty.sqlite');
    writeFileSync(db, new Uint8Array(0));
    const lb = await lbOpen(db, true);
    expect(lb.schemaVersion).toBe(CURRENT_SCHEMA_VERSION);
    expect(statSync(db).size).toBeGreaterThan(0);
  });

  it('migrates a file of the previous schema version and keeps its records and a backup', async () => {
    expect(MIGRATIONS.map((m) => m.version)).toEqual(Array.from({ length: CURRENT_SCHEMA_VERSION }, (_, i) => i + 1));
    const db = join(tempDir(), 'old.sqlite');
    const v1 = await lbOpen(db, true, { schemaVersion: 1 });
    expect(v1.schemaVersion).toBe(1);
    expect(v1.query("SELECT count(*) AS n FROM pragma_table_info('assets') WHERE name = 'limit_rms_waves'")[0].n).toBe(0);
    // Version 1 has no limit columns: insert the way version 1 did.
    v1.query("INSERT INTO assets (name, wavelength_m, created_at) VALUES ('Old laser', 6.328e-7, '2024-01-01T00:00:00Z')");
    v1.batch(() => undefined);
    v1.close();
    const v1Bytes = readFileSync(db);

    const lb = await lbOpen(db, true);
    expect(lb.schemaVersion).toBe(CURRENT_SCHEMA_VERSION);
    const asset = lb.getAsset('old laser')!;
    expect(asset.wavelengthM).toBe(6.328e-7);
    expect(asset.limitRmsWaves).toBeNull();
    lb.updateAsset(asset.id, { limitRmsWaves: 1 / 14 });
    expect(lb.getAsset(asset.id)!.limitRmsWaves).toBeCloseTo(1 / 14, 15);
    const backup = `${db}.schema-v1.bak`;
    expect(readFileSync(backup).equals(v1Bytes)).toBe(true);
    expect(lb.query("SELECT value FROM meta WHERE key = 'migrated_to_2_at'").length).toBe(1);
  });

  it('reads an older file without changing it when opened for reading', async () => {
    const db = join(tempDir(), 'old.sqlite');
    (await lbOpen(db, true, { schemaVersion: 1 })).close();
    const before = readFileSync(db);
    const lb = await lbOpen(db, false);
    expect(lb.schemaVersion).toBe(CURRENT_SCHEMA_VERSION);
    expect(lb.listAssets()).toEqual([]);
    expect(readFileSync(db).equals(before)).toBe(true);
  });

  it('refuses to change a logbook written by a later version, and still reads it', async () => {
    const db = join(tempDir(), 'newer.sqlite');
    const lb = await lbOpen(db, true);
    lb.addAsset({ name: 'L1' });
    lb.query("UPDATE meta SET value = '99' WHERE key = 'schema_version'");
    lb.batch(() => undefined);
    lb.close();
    const p = await expectProblem(openLogbook(db, { write: true }));
    expect(p.kind).toBe('newer');
    expect(p.message).toMatch(/later version of Shadowfront \(schema 99/);
    const r = await lbOpen(db, false);
    expect(r.listAssets().map((a) => a.name)).toEqual(['L1']);
  });

  it('writes a file that another SQLite program reads (the sqlite3 command-line shell, else Python’s sqlite3)', async () => {
    const db = join(tempDir(), 'lb.sqlite');
    const lb = await lbOpen(db, true);
    lb.addAsset({ name: 'HeNe 1', wavelengthM: 632.8e-9 });
    addOne(lb, 'HeNe 1', 1);
    addOne(lb, 'HeNe 1', 2);
    lb.close();
    const sql = "PRAGMA integrity_check; SELECT count(*) FROM measurements; SELECT j, waves FROM result_terms WHERE result_id = 2 AND j = 3; PRAGMA application_id;";
    let out: string | null = null;
    const cli = spawnSync('sqlite3', ['-readonly', db, sql], { encoding: 'utf8' });
    if (cli.status === 0) out = cli.stdout;
    else {
      const py = spawnSync('python3', ['-c', `import sqlite3,sys\nc=sqlite3.connect(sys.argv[1])\nfor q in sys.argv[2].split(';'):\n  q=q.strip()\n  if q:\n    for r in c.execute(q): print('|'.join(str(x) for x in r))`, db, sql], { encoding: 'utf8' });
      if (py.status === 0) out = py.stdout;
    }
    if (out === null) {
      console.warn('neither sqlite3 nor python3 is installed: skipped the check with another SQLite program');
      return;
    }
    expect(out.trim().split('\n')).toEqual(['ok', '2', '3|0.02', String(APPLICATION_ID)]);
  });
});

describe('raw frames, content-addressed', () => {
  it('stores a frame once, however many records use it, and deletes it only with its last record', async () => {
    const dir = tempDir();
    const db = join(dir, 'lb.sqlite');
    const frame = join(dir, 'frame.png');
    const bytes = new Uint8Array(4096).map((_, i) => (i * 31) % 251);
    writeFileSync(frame, bytes);
    const sha = sha256Hex(bytes);
    // SHA-256 of the bytes, checked with an independent tool when there is one (coreutils sha256sum).
    const sum = spawnSync('sha256sum', [frame], { encoding: 'utf8' });
    if (sum.status === 0) expect(sum.stdout.split(' ')[0]).toBe(sha);

    const lb = await lbOpen(db, true);
    lb.addAsset({ name: 'HeNe 1' });
    const m1 = addOne(lb, 'HeNe 1', 1, { frames: [{ path: frame }] });
    const stored = join(framesDir(db), sha.slice(0, 2), sha);
    expect(readFileSync(stored).equals(Buffer.from(bytes))).toBe(true);
    const mtime = statSync(stored).mtimeMs;
    const m2 = addOne(lb, 'HeNe 1', 2, { frames: [{ path: frame }, { bytes, name: 'same-again.png', role: 'dark' }] });
    expect(m2.frames.map((f) => f.sha256)).toEqual([sha, sha]);
    expect(readdirSync(join(framesDir(db), sha.slice(0, 2)))).toEqual([sha]);
    expect(statSync(stored).mtimeMs).toBe(mtime);
    expect(lb.query('SELECT count(*) AS n FROM frames')[0].n).toBe(1);
    expect(lb.frameReferences(sha)).toBe(3);

    expect(lb.deleteMeasurement(m1.id).removedFrames).toEqual([]);
    expect(existsSync(stored)).toBe(true);
    expect(lb.verifyFrames()).toEqual([]);
    expect(lb.deleteMeasurement(m2.id).removedFrames).toEqual([sha]);
    expect(existsSync(stored)).toBe(false);
    expect(lb.query('SELECT count(*) AS n FROM frames')[0].n).toBe(0);
  });

  it('finds a damaged or missing frame', async () => {
    const dir = tempDir();
    const db = join(dir, 'lb.sqlite');
    const lb = await lbOpen(db, true);
    lb.addAsset({ name: 'HeNe 1' });
    const m = addOne(lb, 'HeNe 1', 1, { frames: [{ bytes: new Uint8Array([1, 2, 3, 4]), name: 'a.npy' }] });
    const sha = m.frames[0].sha256;
    writeFileSync(join(framesDir(db), sha.slice(0, 2), sha), new Uint8Array([9, 9, 9, 9]));
    expect(lb.verifyFrames()).toEqual([{ sha256: sha, state: 'damaged' }]);
    // Storing the same frame again repairs the copy.
    addOne(lb, 'HeNe 1', 2, { frames: [{ bytes: new Uint8Array([1, 2, 3, 4]), name: 'a.npy' }] });
    expect(lb.verifyFrames()).toEqual([]);
  });
});

describe('one writer at a time', { timeout: 60_000 }, () => {
  it('refuses a second writer in the same process, naming the holder; readers may still read', async () => {
    const db = join(tempDir(), 'lb.sqlite');
    const lb = await lbOpen(db, true);
    lb.addAsset({ name: 'HeNe 1' });
    const p = await expectProblem(openLogbook(db, { write: true, command: 'second' }));
    expect(p.kind).toBe('busy');
    expect(p.message).toContain(`pid ${process.pid}`);
    const reader = await lbOpen(db, false);
    expect(reader.listAssets().length).toBe(1);
    lb.close();
    const again = await lbOpen(db, true);
    expect(again.writable).toBe(true);
  });

  it('refuses a writer in another process, with a message that names this one', async () => {
    const db = join(tempDir(), 'lb.sqlite');
    const lb = await lbOpen(db, true);
    lb.addAsset({ name: 'HeNe 1' });
    const bin = new URL('../../app/cli/shadowfront.mjs', import.meta.url).pathname;
    const r = spawnSync(process.execPath, [bin, 'log', 'asset', 'add', 'Second', '--db', db], { encoding: 'utf8', timeout: 60_000 });
    expect(r.status).toBe(1);
    expect(r.stderr).toContain('open for writing by another Shadowfront process');
    expect(r.stderr).toContain(`pid ${process.pid}`);
    expect(lb.listAssets().map((a) => a.name)).toEqual(['HeNe 1']);
  });

  it('takes over the lock of a writer that no longer exists', async () => {
    const db = join(tempDir(), 'lb.sqlite');
    (await lbOpen(db, true)).close();
    const dead = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
    const pid = Number(dead.stdout);
    writeFileSync(lockPath(db), JSON.stringify({ pid, host: (await import('node:os')).hostname(), startedAt: '2025-01-01T00:00:00Z', token: 'x', command: 'killed' }));
    const lb = await lbOpen(db, true);
    expect(JSON.parse(readFileSync(lockPath(db), 'utf8')).pid).toBe(process.pid);
    lb.close();
    expect(existsSync(lockPath(db))).toBe(false);
  });

  it('does not save when its lock was taken away', async () => {
    const db = join(tempDir(), 'lb.sqlite');
    const lb = await lbOpen(db, true);
    writeFileSync(lockPath(db), JSON.stringify({ pid: process.pid, host: 'elsewhere', startedAt: '', token: 'other', command: '' }));
    expect(() => lb.addAsset({ name: 'X' })).toThrow(/taken away/);
    expect(lb.listAssets()).toEqual([]);
  });
});

describe('damaged and foreign files', { timeout: 30_000 }, () => {
  async function goodLogbook(): Promise<string> {
    const db = join(tempDir(), 'lb.sqlite');
    const lb = await lbOpen(db, true);
    lb.addAsset({ name: 'HeNe 1' });
    for (let i = 1; i <= 4; i++) addOne(lb, 'HeNe 1', i);
    lb.close();
    return db;
  }

  async function goodLogbookCopy(bytes: Buffer): Promise<string> {
    const p = join(tempDir(), 'copy.sqlite');
    writeFileSync(p, bytes);
    return p;
  }

  it('explains a file that is not SQLite at all and offers the last good copy', async () => {
    const db = await goodLogbook();
    writeFileSync(db, '{"format": "shadowfront-result/1"}');
    const p = await expectProblem(openLogbook(db, { write: false }));
    expect(p.kind).toBe('foreign');
    expect(p.message).toMatch(/not an SQLite database \(it looks like JSON text\)/);
    expect(p.lastGood).toBe(lastGoodPath(db));
    expect(p.message).toMatch(/last good copy .* 3 measurements/);
    expect(p.message).toContain('shadowfront log restore');
  });

  it('explains an SQLite database of another program', async () => {
    const db = join(tempDir(), 'other.sqlite');
    const SQL = await loadSqlJs();
    const other = new SQL.Database();
    other.run('CREATE TABLE invoices (id INTEGER PRIMARY KEY, total REAL)');
    writeFileSync(db, other.export());
    other.close();
    const p = await expectProblem(openLogbook(db, { write: true }));
    expect(p.kind).toBe('foreign');
    expect(p.message).toMatch(/SQLite database of another program .*invoices/);
    expect(existsSync(lockPath(db))).toBe(false);
    expect(p.lastGood).toBeNull();
  });

  it('detects a truncated logbook and a damaged page, and restores the last good copy', async () => {
    const db = await goodLogbook();
    const bytes = readFileSync(db);
    writeFileSync(db, bytes.subarray(0, Math.floor(bytes.length / 2)));
    const p1 = await expectProblem(openLogbook(db, { write: false }));
    expect(p1.kind).toBe('corrupt');
    expect(p1.message).toMatch(/damaged/);

    // A page of zeros where the b-tree root of the results table was (a lost sector). SQLite keeps no
    // checksums, so damage inside a stored value with the structure intact cannot be seen this way.
    const reader = await lbOpen(await goodLogbookCopy(bytes), false);
    const root = Number(reader.query("SELECT rootpage FROM sqlite_master WHERE name = 'results'")[0].rootpage);
    const pageSize = bytes.readUInt16BE(16);
    const flipped = Buffer.from(bytes);
    flipped.fill(0, (root - 1) * pageSize, root * pageSize);
    writeFileSync(db, flipped);
    const p2 = await expectProblem(openLogbook(db, { write: true }));
    expect(p2.kind).toBe('corrupt');
    expect(p2.lastGood).toBe(lastGoodPath(db));

    const r = await restoreLastGood(db);
    expect(r.measurements).toBe(3);
    expect(readFileSync(r.damagedKeptAs!).equals(flipped)).toBe(true);
    const lb = await lbOpen(db, false);
    expect(lb.listMeasurements().length).toBe(3);
  });

  it('says plainly that a missing logbook is missing when only reading', async () => {
    const p = await expectProblem(openLogbook(join(tempDir(), 'none.sqlite'), { write: false }));
    expect(p.kind).toBe('missing');
  });
});

describe('records and re-analysis', () => {
  it('keeps every result of a measurement with the software that made it; the newest is current', async () => {
    const db = join(tempDir(), 'lb.sqlite');
    const lb = await lbOpen(db, true);
    lb.addAsset({ name: 'HeNe 1', wavelengthM: 632.8e-9 });
    const m = addOne(lb, 'HeNe 1', 1, { operator: 'ana', notes: 'after service', tags: ['after-service', 'Weekly'] });
    expect(m.tags).toEqual(['after-service', 'weekly']);
    const newer = syntheticResult({ terms: { 3: 0.011, 4: 0.02, 5: -0.01, 7: 0.004, 8: 0.001 }, software: 'shadowfront 0.2.0', settings: { solver: 'lm', model: 'reference' } });
    lb.addResult(m.id, newer, 'reference model');
    const back = lb.getMeasurement(m.id)!;
    expect(back.results.map((r) => r.result.software)).toEqual(['shadowfront 0.1.0', 'shadowfront 0.2.0']);
    expect(back.results[1].result.settings).toEqual({ solver: 'lm', model: 'reference' });
    expect(back.results[1].note).toBe('reference model');
    expect(back.latest!.software).toBe('shadowfront 0.2.0');
    expect(back.setup).toEqual(setupJson);
    expect(lb.analysed(m.id).resultId).toBe(back.results[1].id);
    expect(lb.analysed(m.id, back.results[0].id).result.software).toBe('shadowfront 0.1.0');
    // The stored JSON is the result verbatim.
    expect(back.results[1].result).toEqual(JSON.parse(JSON.stringify(newer)));
  });

  it('filters by asset, tag and time; one setup row serves identical setups', async () => {
    const db = join(tempDir(), 'lb.sqlite');
    const lb = await lbOpen(db, true);
    lb.addAsset({ name: 'A' });
    lb.addAsset({ name: 'B' });
    for (let i = 1; i <= 5; i++) addOne(lb, i % 2 ? 'A' : 'B', i, { tags: i === 3 ? ['before-cleaning'] : ['weekly'] });
    expect(lb.listMeasurements({ asset: 'a' }).map((m) => m.id)).toEqual([1, 3, 5]);
    expect(lb.listMeasurements({ tags: ['before-cleaning'] }).map((m) => m.id)).toEqual([3]);
    expect(lb.listMeasurements({ since: '2025-03-02T00:00:00Z', until: '2025-03-04T23:00:00Z' }).map((m) => m.id)).toEqual([2, 3, 4]);
    expect(lb.query('SELECT count(*) AS n FROM setups')[0].n).toBe(1);
  });

  it('refuses inconsistent input with a clear message and stores nothing', async () => {
    const db = join(tempDir(), 'lb.sqlite');
    const lb = await lbOpen(db, true);
    lb.addAsset({ name: 'HeNe 1' });
    expect(() => addOne(lb, 'nope', 1)).toThrow(/no asset named "nope" in this logbook; known assets: "HeNe 1"/);
    expect(() => addOne(lb, 'HeNe 1', 1, { result: { format: 'shadowfront-setup/1' } as never })).toThrow(/field "format"/);
    expect(() => addOne(lb, 'HeNe 1', 1, { tags: ['a;b'] })).toThrow(/tag "a;b"/);
    expect(() => addOne(lb, 'HeNe 1', 1, { takenAt: 'yesterday' })).toThrow(/ISO 8601/);
    expect(lb.listMeasurements()).toEqual([]);
    expect(() => lb.addAsset({ name: 'hene 1' })).toThrow(/already an asset/);
  });
});
