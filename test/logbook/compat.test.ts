/**
 * Records written by this version stay readable: a logbook made by Shadowfront 0.1.0 (schema 2), kept as
 * an SQL text dump (fixtures/logbook-schema-2.sql, made with the sqlite3 shell's .dump), is rebuilt and
 * opened by the current code.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { openLogbook } from '../../app/services/logbook/logbook.ts';
import { loadSqlJs } from '../../app/services/logbook/sqlite.ts';
import { removeTempDirs, tempDir } from './helpers.ts';

afterAll(() => removeTempDirs());

describe('a logbook of schema 2 (Shadowfront 0.1.0)', () => {
  it('opens with every record, result history, tag, disc and frame reference intact', async () => {
    const SQL = await loadSqlJs();
    const built = new SQL.Database();
    built.exec(readFileSync(new URL('./fixtures/logbook-schema-2.sql', import.meta.url), 'utf8'));
    const db = join(tempDir(), 'old.sqlite');
    writeFileSync(db, built.export());
    built.close();

    const lb = await openLogbook(db, { write: false });
    try {
      expect(lb.listAssets().map((a) => [a.name, a.wavelengthM, a.location, a.limitRmsWaves])).toEqual([['HeNe bench 2', 6.328e-7, 'lab 3', 1 / 14]]);
      expect(lb.listDiscs()[0].calibration).toEqual({ diameter_m: 0.0030012, sigma_m: 5e-7 });
      const m = lb.requireMeasurement(1);
      expect([m.takenAt, m.operator, m.notes, m.tags]).toEqual(['2025-03-04T09:30:00.000Z', 'ana', 'fixture', ['before-cleaning', 'weekly']]);
      expect((m.setup as { wavelength: string }).wavelength).toBe('632.8 nm');
      // SHA-256 of the 11 bytes "frame bytes", from coreutils: printf 'frame bytes' | sha256sum
      expect(m.frames.map((f) => [f.name, f.sizeBytes, f.sha256])).toEqual([['f.npy', 11, 'f9dea2843a6dfb6dafd2a97c8f1848754d9266b82980f2f7fae9fb599266fd0f']]);
      expect(m.results.map((r) => [r.result.format, r.result.software, r.note])).toEqual([
        ['shadowfront-result/1', 'shadowfront 0.1.0', ''],
        ['shadowfront-result/1', 'shadowfront 0.1.1', 're-analysis'],
      ]);
      expect(m.results[1].result.zernike.terms.find((t) => t.j === 3)!.waves).toBe(0.059);
    } finally {
      lb.close();
    }
  });
});
