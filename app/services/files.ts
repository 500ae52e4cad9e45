/**
 * Node-only file input and output for the shells (CLI, desktop main process, local web mode).
 * Everything else in Shadowfront is pure and lives in core/.
 */
import { mkdirSync, readFileSync, renameSync, writeFileSync, openSync, fsyncSync, closeSync, existsSync, rmSync, linkSync, copyFileSync } from 'node:fs';
import { basename, dirname, resolve } from 'node:path';

/** A problem with a file the user named: carries the file and a plain-words reason. */
export class FileProblem extends Error {
  constructor(
    readonly file: string,
    readonly reason: string,
  ) {
    super(`${file}: ${reason}`);
    this.name = 'FileProblem';
  }
}

function describeFsError(err: unknown): string {
  const code = (err as NodeJS.ErrnoException)?.code;
  switch (code) {
    case 'ENOENT':
      return 'no such file';
    case 'EACCES':
    case 'EPERM':
      return 'permission denied';
    case 'EISDIR':
      return 'is a folder, not a file';
    case 'ENOSPC':
      return 'the disk is full';
    default:
      return (err as Error)?.message ?? String(err);
  }
}

export function readBytes(path: string): Uint8Array {
  try {
    return new Uint8Array(readFileSync(path));
  } catch (err) {
    throw new FileProblem(path, describeFsError(err));
  }
}

/** Read and JSON-decode a file; a syntax error names the file and the position. */
export function readJson(path: string): unknown {
  const bytes = readBytes(path);
  const text = new TextDecoder('utf-8').decode(bytes);
  try {
    return JSON.parse(text);
  } catch (err) {
    throw new FileProblem(path, `not valid JSON (${(err as Error).message})`);
  }
}

/**
 * Write a file atomically: a temporary file in the same folder, fsync, rename over the target,
 * fsync the folder. A crash leaves either the old file or the new one, never half of it.
 */
export function writeBytesAtomic(path: string, bytes: Uint8Array): void {
  const target = resolve(path);
  const dir = dirname(target);
  const tmp = resolve(dir, `.${basename(target)}.${process.pid}.tmp`);
  try {
    mkdirSync(dir, { recursive: true });
    writeFileSync(tmp, bytes);
    const fd = openSync(tmp, 'r');
    try {
      fsyncSync(fd);
    } finally {
      closeSync(fd);
    }
    renameSync(tmp, target);
    syncFolder(dir);
  } catch (err) {
    throw new FileProblem(path, `could not write: ${describeFsError(err)}`);
  }
}

// ---------------------------------------------------------------------------------------------
// Additions for the logbook (app/services/logbook): folder sync, replace-and-keep-previous, reads
// that tolerate a missing file. The functions above keep their behaviour.

/** fsync a folder so that a rename or a new name in it survives a power cut. Silently skipped where the file system cannot do it. */
export function syncFolder(dir: string): void {
  try {
    const dfd = openSync(dir, 'r');
    try {
      fsyncSync(dfd);
    } finally {
      closeSync(dfd);
    }
  } catch {
    // Some file systems (and Windows) cannot open or fsync a folder; the rename itself is still atomic.
  }
}

/** The bytes of a file, or null when it does not exist. Other problems throw a FileProblem. */
export function readBytesIfExists(path: string): Uint8Array | null {
  try {
    return new Uint8Array(readFileSync(path));
  } catch (err) {
    if ((err as NodeJS.ErrnoException)?.code === 'ENOENT') return null;
    throw new FileProblem(path, describeFsError(err));
  }
}

/** Name of the temporary file used while replacing `path` (same folder, so the rename is atomic). */
export function tempNameFor(path: string, tag = 'tmp'): string {
  const target = resolve(path);
  return resolve(dirname(target), `.${basename(target)}.${process.pid}.${tag}`);
}

/**
 * Replace `path` with `bytes` atomically and keep what it held before as `previousPath`:
 *   1. write the new bytes to a temporary file in the same folder and fsync it;
 *   2. give the current file a second name, `previousPath` (a hard link made under a temporary
 *      name and renamed into place, or a synced copy where hard links are not supported);
 *   3. rename the temporary file over `path`; 4. fsync the folder.
 * A process killed at any instant leaves `path` holding either the old bytes or the new ones,
 * never a mix, and `previousPath` holding a complete earlier state. When `path` does not exist yet,
 * `previousPath` is left alone.
 */
export function replaceFileKeepingPrevious(path: string, bytes: Uint8Array, previousPath: string): void {
  const target = resolve(path);
  const dir = dirname(target);
  const tmp = tempNameFor(target, 'tmp');
  const prevTmp = tempNameFor(previousPath, 'prev');
  try {
    mkdirSync(dir, { recursive: true });
    writeFileSync(tmp, bytes);
    const fd = openSync(tmp, 'r');
    try {
      fsyncSync(fd);
    } finally {
      closeSync(fd);
    }
    if (existsSync(target)) {
      rmSync(prevTmp, { force: true });
      try {
        linkSync(target, prevTmp);
      } catch {
        copyFileSync(target, prevTmp);
        const pfd = openSync(prevTmp, 'r');
        try {
          fsyncSync(pfd);
        } finally {
          closeSync(pfd);
        }
      }
      renameSync(prevTmp, resolve(previousPath));
    }
    renameSync(tmp, target);
  } catch (err) {
    rmSync(tmp, { force: true });
    throw new FileProblem(path, `could not write: ${describeFsError(err)}`);
  }
  syncFolder(dir);
}
