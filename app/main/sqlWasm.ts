/**
 * Where sql.js's WebAssembly file is in the built main process: electron-vite copies it beside the bundle
 * and gives its path (`?asset`; sql.js is bundled into main for this, see electron.vite.config.ts).
 * A module of its own so that tests can replace it.
 */
import wasmPath from 'sql.js/dist/sql-wasm.wasm?asset';

export const SQL_WASM_PATH: string = wasmPath;
