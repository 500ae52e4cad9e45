/**
 * sql.js (SQLite compiled to WebAssembly), loaded once per process. The same database file format as
 * any other SQLite, with no native build.
 */
import { createRequire } from 'node:module';
import initSqlJs from 'sql.js';
import type { SqlJsStatic } from 'sql.js';

let loading: Promise<SqlJsStatic> | null = null;
let wasmOverride: string | null = null;

/**
 * Where sql-wasm.wasm is, for shells that bundle sql.js (e.g. the Electron main process, which imports
 * it as `sql.js/dist/sql-wasm.wasm?asset`). Call before the first open. Default: resolved from node_modules.
 */
export function setSqlWasmPath(path: string): void {
  wasmOverride = path;
}

export function loadSqlJs(): Promise<SqlJsStatic> {
  if (!loading) {
    const wasm = wasmOverride ?? createRequire(import.meta.url).resolve('sql.js/dist/sql-wasm.wasm');
    loading = initSqlJs({ locateFile: () => wasm });
  }
  return loading;
}

/** The 16-byte header every SQLite 3 database file starts with ("SQLite format 3" and a NUL). */
export const SQLITE_MAGIC = 'SQLite format 3\u0000';

export function hasSqliteHeader(bytes: Uint8Array): boolean {
  if (bytes.length < 16) return false;
  for (let i = 0; i < 16; i++) if (bytes[i] !== SQLITE_MAGIC.charCodeAt(i)) return false;
  return true;
}
