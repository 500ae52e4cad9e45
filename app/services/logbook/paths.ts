/** Where the logbook and its companions live. */
import { homedir } from 'node:os';
import { join, resolve } from 'node:path';

export const LOGBOOK_FILE_NAME = 'logbook.sqlite';

/**
 * The user's data folder + shadowfront/logbook.sqlite: $XDG_DATA_HOME or ~/.local/share on Linux and
 * other Unix systems (XDG Base Directory Specification), ~/Library/Application Support on macOS,
 * %APPDATA% on Windows.
 */
export function defaultLogbookPath(env: NodeJS.ProcessEnv = process.env, platform: NodeJS.Platform = process.platform, home: string = homedir()): string {
  let base: string;
  if (platform === 'win32') base = env.APPDATA || join(home, 'AppData', 'Roaming');
  else if (platform === 'darwin') base = join(home, 'Library', 'Application Support');
  else base = env.XDG_DATA_HOME && env.XDG_DATA_HOME.startsWith('/') ? env.XDG_DATA_HOME : join(home, '.local', 'share');
  return join(base, 'shadowfront', LOGBOOK_FILE_NAME);
}

export type LogbookPathSource = '--db' | 'SHADOWFRONT_DB' | 'default';

/** The logbook to use: --db, else $SHADOWFRONT_DB, else the default location. */
export function resolveLogbookPath(db: string | undefined, env: NodeJS.ProcessEnv = process.env): { path: string; source: LogbookPathSource } {
  if (db) return { path: resolve(db), source: '--db' };
  if (env.SHADOWFRONT_DB) return { path: resolve(env.SHADOWFRONT_DB), source: 'SHADOWFRONT_DB' };
  return { path: defaultLogbookPath(env), source: 'default' };
}

/** The copy of the previous committed state. */
export function lastGoodPath(db: string): string {
  return `${db}.last-good`;
}

/** The lock file held by the one process allowed to write. */
export function lockPath(db: string): string {
  return `${db}.lock`;
}

/** The content-addressed folder of raw frames. */
export function framesDir(db: string): string {
  return `${db}.frames`;
}
