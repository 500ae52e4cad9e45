/**
 * The beam-health logbook: an SQLite database (sql.js) held in memory and written back as a whole
 * file on every committed change — temp file, fsync, rename, fsync the folder, keeping the previous
 * state as `<db>.last-good` — plus a content-addressed store of raw frames beside it.
 *
 * Only one process writes at a time (lock file, ./lock.ts); any number may read. A reader reads the
 * file once on open: a writer replaces the file by rename, so a reader always sees a whole state.
 *
 *   const lb = await openLogbook(path, { write: true });
 *   const laser = lb.addAsset({ name: 'HeNe bench 2', wavelengthM: 632.8e-9 });
 *   const m = lb.addMeasurement({ asset: laser.id, tags: ['weekly'], setup, result, frames: [{ path: 'f.png' }] });
 *   lb.addResult(m.id, newerResult);            // a re-analysis; the older result is kept
 *   lb.compareMeasurements(a, b); lb.trend('HeNe bench 2', { limitRmsWaves: 1 / 14 });
 *   lb.close();
 */
import { existsSync, mkdirSync, readdirSync, rmSync, statSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Database, SqlJsStatic, SqlValue } from 'sql.js';
import type { BenchSetup } from '../../../core/setup/types.ts';
import type { FitResult } from '../../../core/fit/result.ts';
import { checkFitResult } from '../../../core/logbook/validate.ts';
import { LogbookDataError } from '../../../core/logbook/errors.ts';
import { compareResults } from '../../../core/logbook/compare.ts';
import type { Comparison } from '../../../core/logbook/compare.ts';
import { buildTrend } from '../../../core/logbook/trend.ts';
import type { Trend, TrendOptions } from '../../../core/logbook/trend.ts';
import type { AnalysedMeasurement, Asset, Disc, FrameRef, FrameRole, MeasurementRecord, MeasurementSummary, StoredResult } from '../../../core/logbook/types.ts';
import { readBytes, readBytesIfExists, readJson, replaceFileKeepingPrevious, writeBytesAtomic } from '../files.ts';
import { acquireLock } from './lock.ts';
import type { LockHandle } from './lock.ts';
import { FrameStore, sha256Hex } from './frameStore.ts';
import { framesDir, lastGoodPath, lockPath } from './paths.ts';
import { LogbookProblem } from './problem.ts';
import { APP_MARKER, APPLICATION_ID, CURRENT_SCHEMA_VERSION, MIGRATIONS } from './schema.ts';
import { hasSqliteHeader, loadSqlJs } from './sqlite.ts';

export { LogbookProblem } from './problem.ts';

let softwareName: string | null = null;
/** "shadowfront <version>" from package.json. */
export function softwareVersion(): string {
  if (!softwareName) {
    const pkg = readJson(fileURLToPath(new URL('../../../package.json', import.meta.url))) as { version?: string };
    softwareName = `shadowfront ${pkg.version ?? '?'}`;
  }
  return softwareName;
}

export interface OpenLogbookOptions {
  /** Open for writing: takes the lock, creates the file when missing, applies migrations to the file. */
  write: boolean;
  /** What this writer is doing, shown to a second writer that is refused. */
  command?: string;
  /** For tests of migrations: stop at this schema version instead of the current one. */
  schemaVersion?: number;
}

export interface NewAsset {
  name: string;
  wavelengthM?: number | null;
  location?: string;
  notes?: string;
  limitRmsWaves?: number | null;
  limitStrehl?: number | null;
}

export interface NewDisc {
  name: string;
  nominalDiameterM: number;
  calibration?: unknown;
  notes?: string;
}

/** A raw frame to store: a file, or bytes with a name (the extension tells the image type). */
export type FrameInput = { path: string; role?: FrameRole; name?: string } | { bytes: Uint8Array; name: string; role?: FrameRole };

export interface NewMeasurement {
  /** Asset name or id; it must exist (see addAsset). */
  asset: string | number;
  /** When it was taken (ISO 8601 string or Date). Default: now. */
  takenAt?: string | Date;
  operator?: string;
  tags?: string[];
  notes?: string;
  /**
   * The bench setup as a "shadowfront-setup/1" JSON object (the file's content, already checked with
   * parseSetup; see ./setupFile.ts), stored verbatim. Identical setups are stored once.
   */
  setup?: unknown;
  /** The same setup in SI units, when at hand: used to check that the result was made with it. */
  setupSI?: BenchSetup | null;
  /** Disc name or id. */
  disc?: string | number | null;
  frames?: FrameInput[];
  result?: FitResult | null;
  /** Names the result's source in error messages (e.g. its file). */
  resultSource?: string;
  resultNote?: string;
}

export interface MeasurementFilter {
  asset?: string | number;
  /** ISO time; measurements at or after it. */
  since?: string;
  /** ISO time; measurements at or before it. */
  until?: string;
  /** Measurements carrying every one of these tags. */
  tags?: string[];
  ids?: number[];
}

type Row = Record<string, SqlValue>;

const TAG_RE = /^[\p{L}\p{N}][\p{L}\p{N}._+\-/ ]{0,39}$/u;

/** Tags are kept lower-case and trimmed; letters, digits, space and . _ + - / only (so a CSV cell can hold them). */
export function normaliseTags(tags: readonly string[]): string[] {
  const out: string[] = [];
  for (const raw of tags) {
    const t = raw.trim().toLowerCase();
    if (!TAG_RE.test(t)) throw new LogbookDataError(`tag "${raw}": use 1 to 40 letters, digits, spaces or . _ + - /, starting with a letter or digit (e.g. "before-cleaning")`);
    if (!out.includes(t)) out.push(t);
  }
  return out;
}

/** An ISO 8601 time in UTC from a Date or a string; a string without a zone is local time. */
export function toIsoTime(v: string | Date, what = 'time'): string {
  let d: Date;
  if (v instanceof Date) d = v;
  else {
    const s = v.trim();
    const dateOnly = /^(\d{4})-(\d{2})-(\d{2})$/.exec(s);
    if (dateOnly) d = new Date(Number(dateOnly[1]), Number(dateOnly[2]) - 1, Number(dateOnly[3]));
    else if (/^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:?\d{2})?$/.test(s)) d = new Date(s.replace(' ', 'T'));
    else d = new Date(NaN);
  }
  if (Number.isNaN(d.getTime())) throw new LogbookDataError(`${what} "${String(v)}": expected an ISO 8601 date or time such as 2025-03-04 or 2025-03-04T09:30`);
  return d.toISOString();
}

function str(v: SqlValue | undefined): string {
  return v === null || v === undefined ? '' : String(v);
}

function numOrNull(v: SqlValue | undefined): number | null {
  return typeof v === 'number' ? v : null;
}

/** A validated database, ready to use. */
interface Checked {
  db: Database;
  version: number;
}

function describeStart(bytes: Uint8Array): string {
  const head = new TextDecoder('latin1').decode(bytes.subarray(0, 24));
  if (/^\s*[[{]/.test(head)) return 'it looks like JSON text';
  if (head.startsWith('\u0089PNG')) return 'it is a PNG image';
  if (/^[\x20-\x7e\s]+$/.test(head)) return `it begins with the text "${head.replace(/\s+/g, ' ').trim().slice(0, 20)}"`;
  return `it begins with the bytes ${[...bytes.subarray(0, 8)].map((b) => b.toString(16).padStart(2, '0')).join(' ')}`;
}

/**
 * Check bytes that should hold a logbook: SQLite header, PRAGMA integrity_check, application id,
 * meta table. Returns null with a reason when they do not.
 */
function checkBytes(SQL: SqlJsStatic, bytes: Uint8Array): { ok: Checked } | { reason: string; kind: 'corrupt' | 'foreign' | 'newer' } {
  if (bytes.length === 0) return { ok: { db: new SQL.Database(), version: 0 } };
  if (!hasSqliteHeader(bytes)) {
    return { reason: `this is not a Shadowfront logbook: the file is not an SQLite database (${describeStart(bytes)})`, kind: 'foreign' };
  }
  let db: Database;
  try {
    db = new SQL.Database(bytes);
  } catch (err) {
    return { reason: `the file is damaged: SQLite cannot open it (${(err as Error).message})`, kind: 'corrupt' };
  }
  try {
    const integrity = db.exec('PRAGMA integrity_check');
    const lines = integrity[0]?.values.map((r) => String(r[0])) ?? [];
    if (lines.length !== 1 || lines[0] !== 'ok') {
      db.close();
      return { reason: `the file is damaged: SQLite's integrity check failed (${lines.slice(0, 3).join('; ')}${lines.length > 3 ? '; …' : ''})`, kind: 'corrupt' };
    }
    const appId = Number(db.exec('PRAGMA application_id')[0]?.values[0]?.[0] ?? 0);
    const tables = (db.exec("SELECT name FROM sqlite_master WHERE type = 'table' ORDER BY name")[0]?.values ?? []).map((r) => String(r[0]));
    if (appId !== APPLICATION_ID) {
      if (tables.length === 0) return { ok: { db, version: 0 } };
      db.close();
      return {
        reason: `this is not a Shadowfront logbook: it is an SQLite database of another program (application id ${appId}, tables ${tables.slice(0, 6).join(', ')}${tables.length > 6 ? ', …' : ''})`,
        kind: 'foreign',
      };
    }
    if (!tables.includes('meta')) {
      db.close();
      return { reason: 'the file is damaged: it is marked as a Shadowfront logbook but has no "meta" table', kind: 'corrupt' };
    }
    const rows = db.exec("SELECT key, value FROM meta WHERE key IN ('schema_version', 'app')")[0]?.values ?? [];
    const meta = new Map(rows.map((r) => [String(r[0]), String(r[1])]));
    const version = Number(meta.get('schema_version'));
    if (meta.get('app') !== APP_MARKER || !Number.isInteger(version) || version < 1) {
      db.close();
      return { reason: 'the file is damaged: its "meta" table does not hold a valid schema version', kind: 'corrupt' };
    }
    return { ok: { db, version } };
  } catch (err) {
    try {
      db.close();
    } catch {
      // already unusable
    }
    return { reason: `the file is damaged: ${(err as Error).message}`, kind: 'corrupt' };
  }
}

/** A short description of the last good copy when it is itself a sound logbook, else null. */
async function describeLastGood(dbPath: string): Promise<{ path: string; text: string } | null> {
  const p = lastGoodPath(dbPath);
  const bytes = readBytesIfExists(p);
  if (!bytes || bytes.length === 0) return null;
  const SQL = await loadSqlJs();
  const c = checkBytes(SQL, bytes);
  if (!('ok' in c)) return null;
  let count = 0;
  try {
    count = Number(c.ok.db.exec('SELECT count(*) FROM measurements')[0]?.values[0]?.[0] ?? 0);
  } catch {
    count = 0;
  }
  c.ok.db.close();
  const when = statSync(p).mtime.toISOString();
  return { path: p, text: `The last good copy is ${p} (saved ${when}, ${count} measurement${count === 1 ? '' : 's'})` };
}

/**
 * Open a logbook. With `write: true` the file (and its folder) is created when missing, the lock is
 * taken and older schemas are migrated in the file; otherwise the file must exist and is only read.
 * @throws LogbookProblem: missing, busy (another writer), corrupt or foreign (with the last good copy
 *   when there is one), newer (written by a later Shadowfront; reading is allowed, writing is not)
 */
export async function openLogbook(path: string, options: OpenLogbookOptions = { write: false }): Promise<Logbook> {
  const SQL = await loadSqlJs();
  const dbPath = resolve(path);
  let lock: LockHandle | null = null;
  if (options.write) {
    try {
      mkdirSync(dirname(dbPath), { recursive: true });
    } catch (err) {
      throw new LogbookProblem(dbPath, `cannot create its folder (${(err as Error).message})`, 'missing');
    }
    lock = acquireLock(lockPath(dbPath), dbPath, options.command ?? '');
  }
  try {
    const bytes = readBytesIfExists(dbPath);
    if (bytes === null && !options.write) {
      throw new LogbookProblem(dbPath, 'there is no logbook here yet (adding a first asset or measurement creates it; --db or SHADOWFRONT_DB chooses another file)', 'missing');
    }
    const checked = checkBytes(SQL, bytes ?? new Uint8Array(0));
    if (!('ok' in checked)) {
      const lg = await describeLastGood(dbPath);
      const offer = lg ? ` ${lg.text}; "shadowfront log restore --db ${dbPath}" puts it back and keeps the damaged file beside it.` : ' There is no last good copy to go back to.';
      throw new LogbookProblem(dbPath, `${checked.reason}.${offer}`, checked.kind, lg?.path ?? null);
    }
    const { db, version } = checked.ok;
    const target = options.schemaVersion ?? CURRENT_SCHEMA_VERSION;
    if (version > CURRENT_SCHEMA_VERSION && options.write) {
      db.close();
      throw new LogbookProblem(
        dbPath,
        `this logbook was written by a later version of Shadowfront (schema ${version}; this version knows up to ${CURRENT_SCHEMA_VERSION}). It can be read, not changed: update Shadowfront to add to it.`,
        'newer',
      );
    }
    const lb = new Logbook(SQL, db, dbPath, lock, version);
    lb.upgrade(target, bytes);
    if (options.write) lb.removeLeftoverTemps();
    return lb;
  } catch (err) {
    lock?.release();
    throw err;
  }
}

/**
 * Put the last good copy back after a damaged logbook was found: the damaged file is renamed to
 * `<db>.damaged-<time>` (never deleted) and the copy is written in its place atomically.
 * @returns where the damaged file went (null when there was none)
 */
export async function restoreLastGood(path: string): Promise<{ restoredFrom: string; damagedKeptAs: string | null; measurements: number }> {
  const SQL = await loadSqlJs();
  const dbPath = resolve(path);
  const lock = acquireLock(lockPath(dbPath), dbPath, 'restore');
  try {
    const lg = lastGoodPath(dbPath);
    const bytes = readBytesIfExists(lg);
    if (!bytes) throw new LogbookProblem(dbPath, `there is no last good copy (${lg})`, 'missing');
    const c = checkBytes(SQL, bytes);
    if (!('ok' in c)) throw new LogbookProblem(lg, `the last good copy cannot be used either: ${c.reason}`, c.kind);
    const measurements = Number(c.ok.db.exec('SELECT count(*) FROM measurements')[0]?.values[0]?.[0] ?? 0);
    c.ok.db.close();
    let damagedKeptAs: string | null = null;
    const current = readBytesIfExists(dbPath);
    if (current !== null) {
      damagedKeptAs = `${dbPath}.damaged-${new Date().toISOString().replace(/[:.]/g, '-')}`;
      writeBytesAtomic(damagedKeptAs, current);
    }
    writeBytesAtomic(dbPath, bytes);
    return { restoredFrom: lg, damagedKeptAs, measurements };
  } finally {
    lock.release();
  }
}

export class Logbook {
  readonly frames: FrameStore;
  /** Things the last operations want the user to know (e.g. a wavelength that differs from the asset's). */
  readonly warnings: string[] = [];
  private inTransaction = false;
  private closed = false;

  constructor(
    private readonly SQL: SqlJsStatic,
    private db: Database,
    readonly path: string,
    private readonly lock: LockHandle | null,
    private version: number,
  ) {
    this.frames = new FrameStore(framesDir(path));
    this.db.run('PRAGMA foreign_keys = ON');
  }

  get writable(): boolean {
    return this.lock !== null && !this.closed;
  }

  get schemaVersion(): number {
    return this.version;
  }

  /** Warnings collected so far, emptied. */
  takeWarnings(): string[] {
    return this.warnings.splice(0, this.warnings.length);
  }

  // ------------------------------------------------------------------ low level

  private all(sql: string, params: SqlValue[] = []): Row[] {
    const st = this.db.prepare(sql);
    try {
      st.bind(params);
      const out: Row[] = [];
      while (st.step()) out.push(st.getAsObject());
      return out;
    } finally {
      st.free();
    }
  }

  private one(sql: string, params: SqlValue[] = []): Row | undefined {
    return this.all(sql, params)[0];
  }

  private run(sql: string, params: SqlValue[] = []): number {
    this.db.run(sql, params);
    return Number(this.db.exec('SELECT last_insert_rowid()')[0].values[0][0]);
  }

  private assertOpen(): void {
    if (this.closed) throw new LogbookProblem(this.path, 'the logbook has been closed', 'read-only');
  }

  private assertWritable(): void {
    this.assertOpen();
    if (!this.lock) throw new LogbookProblem(this.path, 'the logbook was opened for reading only', 'read-only');
  }

  /** Apply the migrations up to `target` (in memory; in the file too when writable). Called by openLogbook. */
  upgrade(target: number, originalBytes: Uint8Array | null): void {
    if (this.version >= target) return;
    if (this.lock && originalBytes && originalBytes.length > 0 && this.version >= 1) {
      // A copy of the file as it was before the migration, kept until the user removes it.
      const backup = `${this.path}.schema-v${this.version}.bak`;
      if (!existsSync(backup)) writeBytesAtomic(backup, originalBytes);
    }
    const now = new Date().toISOString();
    this.db.run('BEGIN');
    try {
      for (const m of MIGRATIONS) {
        if (m.version <= this.version || m.version > target) continue;
        this.db.exec(m.sql);
        if (m.version === 1) {
          this.db.run("INSERT INTO meta (key, value) VALUES ('app', ?), ('created_at', ?), ('created_by', ?)", [APP_MARKER, now, softwareVersion()]);
        }
        this.db.run("INSERT OR REPLACE INTO meta (key, value) VALUES ('schema_version', ?)", [String(m.version)]);
        this.db.run(`INSERT OR REPLACE INTO meta (key, value) VALUES ('migrated_to_${m.version}_at', ?)`, [now]);
      }
      this.db.run(`PRAGMA application_id = ${APPLICATION_ID}`);
      this.db.run(`PRAGMA user_version = ${target}`);
      this.db.run('COMMIT');
    } catch (err) {
      this.db.run('ROLLBACK');
      throw err;
    }
    this.version = target;
    if (this.lock) this.persist();
  }

  /** Remove temporary files that writers killed mid-write left beside the database. */
  removeLeftoverTemps(): void {
    const dir = dirname(this.path);
    const base = basename(this.path);
    for (const f of readdirSync(dir)) {
      const m = /^\.(.+)\.(\d+)\.(tmp|prev)$/.exec(f);
      if (!m || !(m[1] === base || m[1] === basename(lastGoodPath(this.path)))) continue;
      if (Number(m[2]) === process.pid) continue;
      rmSync(join(dir, f), { force: true });
    }
  }

  /** Write the whole database to its file (atomically, keeping the previous state as last good). */
  private persist(): void {
    if (this.lock && !this.lock.stillOurs()) {
      throw new LogbookProblem(this.path, `the write lock ${this.lock.path} was taken away by another process; this change was not saved`, 'lock-lost');
    }
    const bytes = this.db.export();
    this.db.run('PRAGMA foreign_keys = ON');
    replaceFileKeepingPrevious(this.path, bytes, lastGoodPath(this.path));
  }

  /** Reload the in-memory database from the file, after a failed save. */
  private reloadFromDisk(): void {
    const bytes = readBytesIfExists(this.path);
    const c = checkBytes(this.SQL, bytes ?? new Uint8Array(0));
    if ('ok' in c) {
      this.db.close();
      this.db = c.ok.db;
      this.db.run('PRAGMA foreign_keys = ON');
    }
  }

  /**
   * Run several changes as one commit: all of them reach the file, or none. Each change method on its
   * own is already one commit; batch() groups them (e.g. many inserts from a script).
   */
  batch<T>(fn: () => T): T {
    this.assertWritable();
    if (this.inTransaction) return fn();
    this.inTransaction = true;
    this.db.run('BEGIN');
    let result: T;
    try {
      result = fn();
      this.db.run('COMMIT');
    } catch (err) {
      this.db.run('ROLLBACK');
      throw err;
    } finally {
      this.inTransaction = false;
    }
    try {
      this.persist();
    } catch (err) {
      this.reloadFromDisk();
      throw err;
    }
    return result;
  }

  // ------------------------------------------------------------------ assets and discs

  private assetFromRow(r: Row): Asset {
    return {
      id: Number(r.id),
      name: str(r.name),
      wavelengthM: numOrNull(r.wavelength_m),
      location: str(r.location),
      notes: str(r.notes),
      limitRmsWaves: numOrNull(r.limit_rms_waves),
      limitStrehl: numOrNull(r.limit_strehl),
      createdAt: str(r.created_at),
    };
  }

  private checkAssetNumbers(a: Partial<NewAsset>): void {
    if (a.wavelengthM !== undefined && a.wavelengthM !== null && !(a.wavelengthM > 0 && a.wavelengthM < 1e-3)) {
      throw new LogbookDataError(`asset wavelength ${a.wavelengthM} m: expected a wavelength in metres, e.g. 632.8e-9`);
    }
    if (a.limitRmsWaves !== undefined && a.limitRmsWaves !== null && !(a.limitRmsWaves > 0)) throw new LogbookDataError(`RMS limit ${a.limitRmsWaves}: expected a positive number of waves, e.g. 0.0714 (λ/14)`);
    if (a.limitStrehl !== undefined && a.limitStrehl !== null && !(a.limitStrehl > 0 && a.limitStrehl <= 1)) throw new LogbookDataError(`Strehl floor ${a.limitStrehl}: expected a number between 0 and 1, e.g. 0.8`);
  }

  addAsset(a: NewAsset): Asset {
    this.assertWritable();
    const name = a.name?.trim();
    if (!name) throw new LogbookDataError('an asset needs a name, e.g. "HeNe bench 2"');
    this.checkAssetNumbers(a);
    if (this.getAsset(name)) throw new LogbookDataError(`there is already an asset named "${name}"`);
    const id = this.batch(() =>
      this.run('INSERT INTO assets (name, wavelength_m, location, notes, limit_rms_waves, limit_strehl, created_at) VALUES (?, ?, ?, ?, ?, ?, ?)', [
        name,
        a.wavelengthM ?? null,
        a.location ?? '',
        a.notes ?? '',
        a.limitRmsWaves ?? null,
        a.limitStrehl ?? null,
        new Date().toISOString(),
      ]),
    );
    return this.getAsset(id)!;
  }

  /** Change an asset's details; fields left undefined keep their value, null clears a limit. */
  updateAsset(asset: string | number, changes: Partial<Omit<NewAsset, 'name'>>): Asset {
    this.assertWritable();
    const cur = this.requireAsset(asset);
    this.checkAssetNumbers(changes);
    const next = { ...cur, ...Object.fromEntries(Object.entries(changes).filter(([, v]) => v !== undefined)) } as Asset;
    this.batch(() =>
      this.run('UPDATE assets SET wavelength_m = ?, location = ?, notes = ?, limit_rms_waves = ?, limit_strehl = ? WHERE id = ?', [
        next.wavelengthM,
        next.location,
        next.notes,
        next.limitRmsWaves,
        next.limitStrehl,
        cur.id,
      ]),
    );
    return this.getAsset(cur.id)!;
  }

  getAsset(asset: string | number): Asset | undefined {
    this.assertOpen();
    const r = typeof asset === 'number' ? this.one('SELECT * FROM assets WHERE id = ?', [asset]) : this.one('SELECT * FROM assets WHERE name = ? COLLATE NOCASE', [asset.trim()]);
    return r ? this.assetFromRow(r) : undefined;
  }

  requireAsset(asset: string | number): Asset {
    const a = this.getAsset(asset);
    if (a) return a;
    const known = this.listAssets().map((x) => `"${x.name}"`);
    throw new LogbookDataError(
      `no asset ${typeof asset === 'number' ? `#${asset}` : `named "${asset}"`} in this logbook; ${known.length ? `known assets: ${known.join(', ')}` : 'it has no assets yet'} (add one with "shadowfront log asset add <name> --wavelength <λ>")`,
    );
  }

  listAssets(): Asset[] {
    this.assertOpen();
    return this.all('SELECT * FROM assets ORDER BY name COLLATE NOCASE').map((r) => this.assetFromRow(r));
  }

  private discFromRow(r: Row): Disc {
    return {
      id: Number(r.id),
      name: str(r.name),
      nominalDiameterM: Number(r.nominal_diameter_m),
      calibration: r.calibration_json === null ? null : JSON.parse(str(r.calibration_json)),
      notes: str(r.notes),
      createdAt: str(r.created_at),
    };
  }

  addDisc(d: NewDisc): Disc {
    this.assertWritable();
    const name = d.name?.trim();
    if (!name) throw new LogbookDataError('a disc needs a name or serial, e.g. "steel ball 3 mm #1"');
    if (!(d.nominalDiameterM > 0 && d.nominalDiameterM < 1)) throw new LogbookDataError(`disc diameter ${d.nominalDiameterM} m: expected a diameter in metres, e.g. 0.003`);
    if (this.getDisc(name)) throw new LogbookDataError(`there is already a disc named "${name}"`);
    const id = this.batch(() =>
      this.run('INSERT INTO discs (name, nominal_diameter_m, calibration_json, notes, created_at) VALUES (?, ?, ?, ?, ?)', [
        name,
        d.nominalDiameterM,
        d.calibration === undefined || d.calibration === null ? null : JSON.stringify(d.calibration),
        d.notes ?? '',
        new Date().toISOString(),
      ]),
    );
    return this.getDisc(id)!;
  }

  getDisc(disc: string | number): Disc | undefined {
    this.assertOpen();
    const r = typeof disc === 'number' ? this.one('SELECT * FROM discs WHERE id = ?', [disc]) : this.one('SELECT * FROM discs WHERE name = ? COLLATE NOCASE', [disc.trim()]);
    return r ? this.discFromRow(r) : undefined;
  }

  /** Replace a disc's calibration JSON (e.g. a new disc profile); the rest of the record is kept. */
  setDiscCalibration(disc: string | number, calibration: unknown): Disc {
    this.assertWritable();
    const cur = this.getDisc(disc);
    if (!cur) throw new LogbookDataError(`no disc ${typeof disc === 'number' ? `#${disc}` : `named "${disc}"`} in this logbook`);
    this.batch(() => this.run('UPDATE discs SET calibration_json = ? WHERE id = ?', [calibration === undefined || calibration === null ? null : JSON.stringify(calibration), cur.id]));
    return this.getDisc(cur.id)!;
  }

  listDiscs(): Disc[] {
    this.assertOpen();
    return this.all('SELECT * FROM discs ORDER BY name COLLATE NOCASE').map((r) => this.discFromRow(r));
  }

  // ------------------------------------------------------------------ measurements and results

  private insertResult(measurementId: number, result: FitResult, note: string): number {
    return this.run(
      'INSERT INTO results (measurement_id, added_at, logged_by, software, format, rms_waves, sigma_rms_waves, strehl, sigma_strehl, settings_json, result_json, note) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)',
      [
        measurementId,
        new Date().toISOString(),
        softwareVersion(),
        result.software,
        result.format,
        result.rmsWaves,
        result.sigmaRmsWaves ?? null,
        result.strehl,
        result.sigmaStrehl ?? null,
        JSON.stringify(result.settings ?? {}),
        JSON.stringify(result),
        note,
      ],
    );
  }

  private checkConsistency(asset: Asset, setup: BenchSetup | null | undefined, result: FitResult | null, source: string): void {
    if (setup && result) {
      if (Math.abs(setup.wavelengthM - result.wavelength_m) > 1e-3 * setup.wavelengthM) {
        throw new LogbookDataError(
          `${source}: the result is at ${(result.wavelength_m * 1e9).toFixed(2)} nm but the setup says ${(setup.wavelengthM * 1e9).toFixed(2)} nm; is this the setup the fit was made with?`,
        );
      }
      if (Math.abs(setup.zernikeRadiusM - result.zernike.radius_m) > 1e-6 * setup.zernikeRadiusM) {
        throw new LogbookDataError(
          `${source}: the result's Zernike radius is ${(result.zernike.radius_m * 1e3).toFixed(4)} mm but the setup's is ${(setup.zernikeRadiusM * 1e3).toFixed(4)} mm; is this the setup the fit was made with?`,
        );
      }
    }
    const wl = result?.wavelength_m ?? setup?.wavelengthM;
    if (asset.wavelengthM && wl && Math.abs(wl - asset.wavelengthM) > 0.01 * asset.wavelengthM) {
      this.warnings.push(`the measurement is at ${(wl * 1e9).toFixed(1)} nm but asset "${asset.name}" is listed at ${(asset.wavelengthM * 1e9).toFixed(1)} nm`);
    }
  }

  /** Log a measurement (with its setup, frames and, when given, its fit result) as one commit. */
  addMeasurement(input: NewMeasurement): MeasurementRecord {
    this.assertWritable();
    const asset = this.requireAsset(input.asset);
    const takenAt = toIsoTime(input.takenAt ?? new Date(), 'measurement time');
    const tags = normaliseTags(input.tags ?? []);
    const result = input.result ? checkFitResult(input.result, input.resultSource ?? 'result') : null;
    this.checkConsistency(asset, input.setupSI, result, input.resultSource ?? 'result');
    let setupJson: string | null = null;
    if (input.setup !== undefined && input.setup !== null) {
      const sj = input.setup as { format?: unknown };
      if (typeof sj !== 'object' || Array.isArray(sj) || sj.format !== 'shadowfront-setup/1') {
        throw new LogbookDataError('the setup must be a "shadowfront-setup/1" JSON object (the content of a setup file)');
      }
      setupJson = JSON.stringify(input.setup);
    }
    const disc = input.disc !== undefined && input.disc !== null ? this.getDisc(input.disc) : null;
    if (input.disc !== undefined && input.disc !== null && !disc) throw new LogbookDataError(`no disc ${typeof input.disc === 'number' ? `#${input.disc}` : `named "${input.disc}"`} in this logbook`);
    const frames = (input.frames ?? []).map((f) => {
      if ('bytes' in f) return { role: f.role ?? 'frame', name: f.name, bytes: f.bytes };
      return { role: f.role ?? 'frame', name: f.name ?? basename(f.path), bytes: readBytes(f.path) };
    });
    for (const f of frames) {
      if (f.role !== 'frame' && f.role !== 'dark') throw new LogbookDataError(`frame "${f.name}": role must be "frame" or "dark", not "${String(f.role)}"`);
      if (f.bytes.length === 0) throw new LogbookDataError(`frame "${f.name}": the file is empty`);
    }
    const now = new Date().toISOString();
    const id = this.batch(() => {
      let setupId: number | null = null;
      if (setupJson) {
        const sha = sha256Hex(new TextEncoder().encode(setupJson));
        const existing = this.one('SELECT id FROM setups WHERE sha256 = ?', [sha]);
        setupId = existing ? Number(existing.id) : this.run('INSERT INTO setups (sha256, setup_json) VALUES (?, ?)', [sha, setupJson]);
      }
      const mid = this.run('INSERT INTO measurements (asset_id, taken_at, operator, notes, setup_id, disc_id, created_at) VALUES (?, ?, ?, ?, ?, ?, ?)', [
        asset.id,
        takenAt,
        input.operator?.trim() ?? '',
        input.notes ?? '',
        setupId,
        disc?.id ?? null,
        now,
      ]);
      for (const t of tags) this.db.run('INSERT INTO measurement_tags (measurement_id, tag) VALUES (?, ?)', [mid, t]);
      const positions: Record<FrameRole, number> = { frame: 0, dark: 0 };
      for (const f of frames) {
        // The frame file is written (atomically) before the commit that refers to it: a crash in
        // between leaves an unreferenced file, never a reference to a missing one.
        const stored = this.frames.put(f.bytes);
        this.db.run('INSERT OR IGNORE INTO frames (sha256, size_bytes, added_at) VALUES (?, ?, ?)', [stored.sha256, stored.sizeBytes, now]);
        this.db.run('INSERT INTO measurement_frames (measurement_id, role, position, sha256, name) VALUES (?, ?, ?, ?, ?)', [mid, f.role, positions[f.role]++, stored.sha256, f.name]);
      }
      if (result) this.insertResult(mid, result, input.resultNote ?? '');
      return mid;
    });
    return this.getMeasurement(id)!;
  }

  /** Add a result to a measurement (a re-analysis). Older results are kept; the newest is the current one. */
  addResult(measurementId: number, result: FitResult, note = '', source = 'result'): StoredResult {
    this.assertWritable();
    const m = this.requireMeasurement(measurementId);
    const checked = checkFitResult(result, source);
    const asset = this.requireAsset(m.assetId);
    if (m.results.length) {
      const prev = m.results[m.results.length - 1].result;
      if (Math.abs(prev.wavelength_m - checked.wavelength_m) > 1e-3 * prev.wavelength_m) {
        throw new LogbookDataError(`${source}: the new result is at ${(checked.wavelength_m * 1e9).toFixed(2)} nm, the measurement's earlier result at ${(prev.wavelength_m * 1e9).toFixed(2)} nm`);
      }
    }
    this.checkConsistency(asset, null, checked, source);
    const id = this.batch(() => this.insertResult(measurementId, checked, note));
    return this.getMeasurement(measurementId)!.results.find((r) => r.id === id)!;
  }

  private summaryFromRow(r: Row): MeasurementSummary {
    return {
      id: Number(r.id),
      assetId: Number(r.asset_id),
      assetName: str(r.asset_name),
      takenAt: str(r.taken_at),
      operator: str(r.operator),
      tags: r.tags ? str(r.tags).split('\u001f').sort() : [],
      notes: str(r.notes),
      resultCount: Number(r.result_count),
      latest:
        r.latest_id === null || r.latest_id === undefined
          ? null
          : {
              resultId: Number(r.latest_id),
              software: str(r.latest_software),
              rmsWaves: Number(r.latest_rms),
              sigmaRmsWaves: numOrNull(r.latest_sigma_rms),
              strehl: Number(r.latest_strehl),
              sigmaStrehl: numOrNull(r.latest_sigma_strehl),
            },
    };
  }

  private summaries(where: string[], params: SqlValue[]): MeasurementSummary[] {
    const sql = `
      SELECT m.id, m.asset_id, a.name AS asset_name, m.taken_at, m.operator, m.notes,
        (SELECT group_concat(tag, char(31)) FROM measurement_tags t WHERE t.measurement_id = m.id) AS tags,
        (SELECT count(*) FROM results r WHERE r.measurement_id = m.id) AS result_count,
        lr.id AS latest_id, lr.software AS latest_software, lr.rms_waves AS latest_rms, lr.sigma_rms_waves AS latest_sigma_rms,
        lr.strehl AS latest_strehl, lr.sigma_strehl AS latest_sigma_strehl
      FROM measurements m
      JOIN assets a ON a.id = m.asset_id
      LEFT JOIN results lr ON lr.id = (SELECT max(r2.id) FROM results r2 WHERE r2.measurement_id = m.id)
      ${where.length ? `WHERE ${where.join(' AND ')}` : ''}
      ORDER BY m.taken_at, m.id`;
    return this.all(sql, params).map((r) => this.summaryFromRow(r));
  }

  /** Measurements matching a filter, oldest first. */
  listMeasurements(filter: MeasurementFilter = {}): MeasurementSummary[] {
    this.assertOpen();
    const where: string[] = [];
    const params: SqlValue[] = [];
    if (filter.asset !== undefined) {
      where.push('m.asset_id = ?');
      params.push(this.requireAsset(filter.asset).id);
    }
    if (filter.since) {
      where.push('m.taken_at >= ?');
      params.push(toIsoTime(filter.since, 'since'));
    }
    if (filter.until) {
      where.push('m.taken_at <= ?');
      params.push(untilIso(filter.until));
    }
    for (const t of normaliseTags(filter.tags ?? [])) {
      where.push('m.id IN (SELECT measurement_id FROM measurement_tags WHERE tag = ?)');
      params.push(t);
    }
    if (filter.ids) {
      if (!filter.ids.length) return [];
      where.push(`m.id IN (${filter.ids.map(() => '?').join(', ')})`);
      params.push(...filter.ids);
    }
    return this.summaries(where, params);
  }

  getMeasurement(id: number): MeasurementRecord | undefined {
    this.assertOpen();
    const [s] = this.summaries(['m.id = ?'], [id]);
    return s ? this.complete([s])[0] : undefined;
  }

  /** Rows of `sql` (which must end in "IN") for the ids, in chunks that stay within SQLite's limit on bound values. */
  private inChunks(sql: string, ids: readonly number[]): Row[] {
    const out: Row[] = [];
    for (let k = 0; k < ids.length; k += 500) {
      const chunk = ids.slice(k, k + 500);
      out.push(...this.all(`${sql} (${chunk.map(() => '?').join(', ')})`, chunk as number[]));
    }
    return out;
  }

  /** Full records from summaries, with a few queries for all of them together. */
  private complete(list: readonly MeasurementSummary[]): MeasurementRecord[] {
    const ids = list.map((m) => m.id);
    const extras = new Map(
      this.inChunks('SELECT m.id, m.disc_id, m.created_at, s.setup_json FROM measurements m LEFT JOIN setups s ON s.id = m.setup_id WHERE m.id IN', ids).map((r) => [Number(r.id), r]),
    );
    const frames = new Map<number, FrameRef[]>();
    for (const r of this.inChunks(
      'SELECT mf.measurement_id, mf.sha256, mf.role, mf.position, mf.name, f.size_bytes FROM measurement_frames mf JOIN frames f ON f.sha256 = mf.sha256 WHERE mf.measurement_id IN',
      ids,
    )) {
      const list = frames.get(Number(r.measurement_id)) ?? [];
      list.push({ sha256: str(r.sha256), role: str(r.role) as FrameRole, position: Number(r.position), name: str(r.name), sizeBytes: Number(r.size_bytes) });
      frames.set(Number(r.measurement_id), list);
    }
    const results = new Map<number, StoredResult[]>();
    for (const r of this.inChunks('SELECT id, measurement_id, added_at, logged_by, note, result_json FROM results WHERE measurement_id IN', ids)) {
      const list = results.get(Number(r.measurement_id)) ?? [];
      list.push({
        id: Number(r.id),
        measurementId: Number(r.measurement_id),
        addedAt: str(r.added_at),
        loggedBy: str(r.logged_by),
        note: str(r.note),
        result: JSON.parse(str(r.result_json)) as FitResult,
      });
      results.set(Number(r.measurement_id), list);
    }
    const roleOrder = (f: FrameRef) => (f.role === 'frame' ? 0 : 1);
    return list.map((s) => {
      const extra = extras.get(s.id)!;
      return {
        ...s,
        setup: extra.setup_json === null ? null : JSON.parse(str(extra.setup_json)),
        discId: numOrNull(extra.disc_id),
        createdAt: str(extra.created_at),
        frames: (frames.get(s.id) ?? []).sort((a, b) => roleOrder(a) - roleOrder(b) || a.position - b.position),
        results: (results.get(s.id) ?? []).sort((a, b) => a.id - b.id),
      };
    });
  }

  requireMeasurement(id: number): MeasurementRecord {
    const m = this.getMeasurement(id);
    if (!m) throw new LogbookDataError(`no measurement #${id} in this logbook (see "shadowfront log list")`);
    return m;
  }

  /** Full records of the measurements matching a filter (for export). */
  records(filter: MeasurementFilter = {}): MeasurementRecord[] {
    return this.complete(this.listMeasurements(filter));
  }

  /** A measurement with one of its results (default: the latest) for comparison and trends. */
  analysed(id: number, resultId?: number): AnalysedMeasurement {
    const m = this.requireMeasurement(id);
    if (!m.results.length) throw new LogbookDataError(`measurement #${id} has no result yet`);
    const r = resultId === undefined ? m.results[m.results.length - 1] : m.results.find((x) => x.id === resultId);
    if (!r) throw new LogbookDataError(`measurement #${id} has no result #${resultId} (it has ${m.results.map((x) => `#${x.id}`).join(', ')})`);
    return { id: m.id, takenAt: m.takenAt, assetName: m.assetName, tags: m.tags, resultId: r.id, result: r.result };
  }

  /** Compare B against A (Δ = B − A) using each one's latest result unless result ids are given. */
  compareMeasurements(a: number, b: number, options: { resultA?: number; resultB?: number; threshold?: number } = {}): Comparison {
    return compareResults(this.analysed(a, options.resultA), this.analysed(b, options.resultB), { threshold: options.threshold });
  }

  /**
   * The trend of one asset. User limits default to the asset's stored limits. Measurements without a
   * result are left out.
   */
  trend(asset: string | number, options: TrendOptions & { since?: string; until?: string; tags?: string[] } = {}): Trend {
    const a = this.requireAsset(asset);
    const list = this.listMeasurements({ asset: a.id, since: options.since, until: options.until, tags: options.tags }).filter((m) => m.latest);
    const json = new Map(this.inChunks('SELECT id, result_json FROM results WHERE id IN', list.map((m) => m.latest!.resultId)).map((r) => [Number(r.id), str(r.result_json)]));
    const ms: AnalysedMeasurement[] = list.map((m) => ({
      id: m.id,
      takenAt: m.takenAt,
      assetName: m.assetName,
      tags: m.tags,
      resultId: m.latest!.resultId,
      result: JSON.parse(json.get(m.latest!.resultId)!) as FitResult,
    }));
    return buildTrend(a.name, ms, {
      baseline: options.baseline,
      limitRmsWaves: options.limitRmsWaves !== undefined ? options.limitRmsWaves : a.limitRmsWaves,
      limitStrehl: options.limitStrehl !== undefined ? options.limitStrehl : a.limitStrehl,
    });
  }

  /** The distinct setups used by the measurements matching a filter, each with the measurements that used it. */
  setupsUsed(filter: MeasurementFilter = {}): { setup: unknown; measurementIds: number[] }[] {
    const ids = this.listMeasurements(filter).map((m) => m.id);
    const bySetup = new Map<string, number[]>();
    for (const r of this.inChunks('SELECT m.id, s.setup_json FROM measurements m JOIN setups s ON s.id = m.setup_id WHERE m.id IN', ids)) {
      const key = str(r.setup_json);
      bySetup.set(key, [...(bySetup.get(key) ?? []), Number(r.id)]);
    }
    return [...bySetup].map(([json, measurementIds]) => ({ setup: JSON.parse(json), measurementIds: measurementIds.sort((a, b) => a - b) }));
  }

  /** Number of measurement records that refer to a frame. */
  frameReferences(sha256: string): number {
    return Number(this.one('SELECT count(*) AS n FROM measurement_frames WHERE sha256 = ?', [sha256])?.n ?? 0);
  }

  /**
   * Delete a measurement with its tags and results. Its frames are deleted only when no other record
   * still refers to them (counted by query after the commit).
   */
  deleteMeasurement(id: number): { removedFrames: string[] } {
    this.assertWritable();
    const m = this.requireMeasurement(id);
    const shas = [...new Set(m.frames.map((f) => f.sha256))];
    this.batch(() => {
      this.db.run('DELETE FROM measurements WHERE id = ?', [id]);
      for (const sha of shas) if (this.frameReferences(sha) === 0) this.db.run('DELETE FROM frames WHERE sha256 = ?', [sha]);
    });
    // Files go only after the commit, and only when still unreferenced: a crash here leaves an
    // unreferenced file, never a record without its frame.
    const removed: string[] = [];
    for (const sha of shas) {
      if (this.frameReferences(sha) === 0) {
        this.frames.remove(sha);
        removed.push(sha);
      }
    }
    return { removedFrames: removed };
  }

  /** Frames in the store that no record refers to (left by an interrupted add), and stray temp files; removed. */
  removeUnreferencedFrames(): { removed: string[] } {
    this.assertWritable();
    const removed: string[] = [];
    for (const sha of this.frames.list()) {
      if (this.frameReferences(sha) === 0) {
        this.frames.remove(sha);
        removed.push(sha);
      }
    }
    for (const t of this.frames.leftoverTemps()) rmSync(t, { force: true });
    return { removed };
  }

  /** Check every referenced frame: present and with the content its SHA-256 name promises. */
  verifyFrames(): { sha256: string; state: 'missing' | 'damaged' }[] {
    this.assertOpen();
    const out: { sha256: string; state: 'missing' | 'damaged' }[] = [];
    for (const r of this.all('SELECT DISTINCT sha256 FROM measurement_frames ORDER BY sha256')) {
      const sha = str(r.sha256);
      const state = this.frames.verify(sha);
      if (state !== 'ok') out.push({ sha256: sha, state });
    }
    return out;
  }

  readFrame(sha256: string): Uint8Array {
    return this.frames.read(sha256);
  }

  /** Sizes and counts, for `log info` and the benchmark. */
  info(): { path: string; schemaVersion: number; writable: boolean; fileBytes: number; assets: number; measurements: number; results: number; frames: number; lastGood: string | null } {
    this.assertOpen();
    const n = (sql: string) => Number(this.db.exec(sql)[0]?.values[0]?.[0] ?? 0);
    const lg = lastGoodPath(this.path);
    return {
      path: this.path,
      schemaVersion: this.version,
      writable: this.writable,
      fileBytes: existsSync(this.path) ? statSync(this.path).size : 0,
      assets: n('SELECT count(*) FROM assets'),
      measurements: n('SELECT count(*) FROM measurements'),
      results: n('SELECT count(*) FROM results'),
      frames: n('SELECT count(*) FROM frames'),
      lastGood: existsSync(lg) ? lg : null,
    };
  }

  /**
   * Run an SQL statement directly (diagnostics and tests). A change made this way reaches the file only
   * with the next commit (e.g. `batch(() => undefined)`); prefer the methods above.
   */
  query(sql: string, params: SqlValue[] = []): Row[] {
    this.assertOpen();
    return this.all(sql, params);
  }

  /** Close the database and release the write lock. */
  close(): void {
    if (this.closed) return;
    this.closed = true;
    try {
      this.db.close();
    } finally {
      this.lock?.release();
    }
  }
}

/** The end of an "until" bound: a date alone means the whole of that (local) day. */
function untilIso(until: string): string {
  const s = until.trim();
  if (/^\d{4}-\d{2}-\d{2}$/.test(s)) {
    const [y, m, d] = s.split('-').map(Number);
    return new Date(new Date(y, m - 1, d + 1).getTime() - 1).toISOString();
  }
  return toIsoTime(s, 'until');
}
