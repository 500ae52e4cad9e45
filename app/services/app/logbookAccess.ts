/**
 * The logbook as the interface uses it: read through a read-only copy that is reopened when the file
 * changes (a CLI user may write to it meanwhile), and opened for writing only for the moment of a save,
 * so the write lock is free the rest of the time.
 */
import { accessSync, constants, existsSync, statSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import type { LogbookInfo } from '../../shared/contract.ts';
import { openLogbook, type Logbook } from '../logbook/logbook.ts';

function fileStamp(path: string): string | null {
  try {
    const s = statSync(path);
    return `${s.ino}:${s.size}:${s.mtimeMs}`;
  } catch {
    return null;
  }
}

function canWrite(path: string): boolean {
  try {
    if (existsSync(path)) accessSync(path, constants.W_OK);
    let dir = dirname(path);
    while (!existsSync(dir) && dirname(dir) !== dir) dir = dirname(dir);
    accessSync(dir, constants.W_OK);
    return true;
  } catch {
    return false;
  }
}

export class LogbookAccess {
  readonly path: string;
  private cached: { lb: Logbook; stamp: string } | null = null;
  private writing: Promise<unknown> = Promise.resolve();

  constructor(
    path: string,
    private readonly demo: boolean,
  ) {
    this.path = resolve(path);
  }

  /** The logbook for reading, or null when there is none yet. */
  async reader(): Promise<Logbook | null> {
    const stamp = fileStamp(this.path);
    if (stamp === null) {
      this.drop();
      return null;
    }
    if (this.cached && this.cached.stamp === stamp) return this.cached.lb;
    this.drop();
    const lb = await openLogbook(this.path, { write: false });
    this.cached = { lb, stamp };
    return lb;
  }

  private drop(): void {
    if (this.cached) {
      this.cached.lb.close();
      this.cached = null;
    }
  }

  async info(): Promise<LogbookInfo> {
    const lb = await this.reader();
    const counts = lb ? lb.info() : { assets: 0, measurements: 0 };
    return { path: this.path, writable: canWrite(this.path), assets: counts.assets, measurements: counts.measurements, demo: this.demo };
  }

  /**
   * Open for writing, run `fn`, close (releasing the lock). Writes from this process run one after the
   * other. A second program writing at the same moment makes this fail with a plain "busy" problem.
   */
  async write<T>(command: string, fn: (lb: Logbook) => T): Promise<T> {
    const run = async () => {
      const lb = await openLogbook(this.path, { write: true, command });
      try {
        return fn(lb);
      } finally {
        lb.close();
        this.drop();
      }
    };
    const p = this.writing.then(run, run);
    this.writing = p.catch(() => undefined);
    return p;
  }

  close(): void {
    this.drop();
  }
}
