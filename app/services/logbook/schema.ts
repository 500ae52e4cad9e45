/**
 * The logbook's SQLite schema, as numbered migrations applied in order on open. A migration only adds
 * (tables, columns, indexes, views); it never drops or rewrites what an earlier version wrote, so a
 * record written by this version stays readable by later ones. Fit results are stored verbatim as
 * JSON ("shadowfront-result/1"), with a few summary columns for queries.
 */

/** PRAGMA application_id of a Shadowfront logbook: the ASCII bytes "SFLB" (0x53464C42). */
export const APPLICATION_ID = 0x53464c42;
/** Value of meta.app. */
export const APP_MARKER = 'shadowfront-logbook';

export interface Migration {
  version: number;
  description: string;
  sql: string;
}

export const MIGRATIONS: readonly Migration[] = [
  {
    version: 1,
    description: 'assets, discs, setups, measurements with tags, content-addressed frames, results',
    sql: `
CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT NOT NULL) WITHOUT ROWID;
CREATE TABLE assets (
  id INTEGER PRIMARY KEY,
  name TEXT NOT NULL UNIQUE COLLATE NOCASE,
  wavelength_m REAL,
  location TEXT NOT NULL DEFAULT '',
  notes TEXT NOT NULL DEFAULT '',
  created_at TEXT NOT NULL
);
CREATE TABLE discs (
  id INTEGER PRIMARY KEY,
  name TEXT NOT NULL UNIQUE COLLATE NOCASE,
  nominal_diameter_m REAL NOT NULL CHECK (nominal_diameter_m > 0),
  calibration_json TEXT,
  notes TEXT NOT NULL DEFAULT '',
  created_at TEXT NOT NULL
);
CREATE TABLE setups (
  id INTEGER PRIMARY KEY,
  sha256 TEXT NOT NULL UNIQUE,
  setup_json TEXT NOT NULL
);
CREATE TABLE measurements (
  id INTEGER PRIMARY KEY,
  asset_id INTEGER NOT NULL REFERENCES assets(id),
  taken_at TEXT NOT NULL,
  operator TEXT NOT NULL DEFAULT '',
  notes TEXT NOT NULL DEFAULT '',
  setup_id INTEGER REFERENCES setups(id),
  disc_id INTEGER REFERENCES discs(id),
  created_at TEXT NOT NULL
);
CREATE TABLE measurement_tags (
  measurement_id INTEGER NOT NULL REFERENCES measurements(id) ON DELETE CASCADE,
  tag TEXT NOT NULL,
  PRIMARY KEY (measurement_id, tag)
) WITHOUT ROWID;
CREATE TABLE frames (
  sha256 TEXT PRIMARY KEY,
  size_bytes INTEGER NOT NULL,
  added_at TEXT NOT NULL
) WITHOUT ROWID;
CREATE TABLE measurement_frames (
  measurement_id INTEGER NOT NULL REFERENCES measurements(id) ON DELETE CASCADE,
  role TEXT NOT NULL CHECK (role IN ('frame', 'dark')),
  position INTEGER NOT NULL,
  sha256 TEXT NOT NULL REFERENCES frames(sha256),
  name TEXT NOT NULL,
  PRIMARY KEY (measurement_id, role, position)
) WITHOUT ROWID;
CREATE TABLE results (
  id INTEGER PRIMARY KEY,
  measurement_id INTEGER NOT NULL REFERENCES measurements(id) ON DELETE CASCADE,
  added_at TEXT NOT NULL,
  logged_by TEXT NOT NULL,
  software TEXT NOT NULL,
  format TEXT NOT NULL,
  rms_waves REAL NOT NULL,
  sigma_rms_waves REAL,
  strehl REAL NOT NULL,
  sigma_strehl REAL,
  settings_json TEXT NOT NULL,
  result_json TEXT NOT NULL,
  note TEXT NOT NULL DEFAULT ''
);
`,
  },
  {
    version: 2,
    description: 'user limits per asset; indexes; views result_terms and latest_results for SQL tools',
    sql: `
ALTER TABLE assets ADD COLUMN limit_rms_waves REAL;
ALTER TABLE assets ADD COLUMN limit_strehl REAL;
CREATE INDEX measurements_by_asset_time ON measurements(asset_id, taken_at);
CREATE INDEX results_by_measurement ON results(measurement_id);
CREATE INDEX measurement_frames_by_sha ON measurement_frames(sha256);
CREATE INDEX measurement_tags_by_tag ON measurement_tags(tag);
CREATE VIEW result_terms AS
  SELECT r.id AS result_id, r.measurement_id AS measurement_id,
         json_extract(t.value, '$.j') AS j, json_extract(t.value, '$.name') AS name,
         json_extract(t.value, '$.waves') AS waves, json_extract(t.value, '$.sigmaWaves') AS sigma_waves
  FROM results r, json_each(r.result_json, '$.zernike.terms') t;
CREATE VIEW latest_results AS
  SELECT r.* FROM results r
  WHERE r.id = (SELECT max(r2.id) FROM results r2 WHERE r2.measurement_id = r.measurement_id);
`,
  },
];

export const CURRENT_SCHEMA_VERSION = MIGRATIONS[MIGRATIONS.length - 1].version;
