/**
 * Node-only file input and output for the shells (CLI, desktop main process, local web mode).
 * Everything else in Shadowfront is pure and lives in core/.
 */
import { mkdirSync, readFileSync, renameSync, writeFileSync, openSync, fsyncSync, closeSync } from 'node:fs';
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
    try {
      const dfd = openSync(dir, 'r');
      try {
        fsyncSync(dfd);
      } finally {
        closeSync(dfd);
      }
    } catch {
      // Some file systems cannot fsync a folder; the rename is still atomic.
    }
  } catch (err) {
    throw new FileProblem(path, `could not write: ${describeFsError(err)}`);
  }
}
