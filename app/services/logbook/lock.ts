/**
 * One writer at a time: an exclusive lock file `<db>.lock`, created with O_EXCL (open flag "wx"),
 * holding the writer's pid, host, start time and a random token. A lock left by a process that no
 * longer exists (killed, crashed) on this host is taken over; a live writer's lock is respected.
 */
import { closeSync, fsyncSync, openSync, readFileSync, renameSync, rmSync, statSync, writeSync } from 'node:fs';
import { hostname } from 'node:os';
import { randomBytes } from 'node:crypto';
import { LogbookProblem } from './problem.ts';

export interface LockInfo {
  pid: number;
  host: string;
  startedAt: string;
  token: string;
  command: string;
}

export interface LockHandle {
  path: string;
  info: LockInfo;
  /** True while the lock file still holds our token. */
  stillOurs(): boolean;
  release(): void;
}

/** Lock files younger than this with no readable content are being written right now. */
const FRESH_EMPTY_LOCK_MS = 2000;

const held = new Set<LockHandle>();
let exitHookInstalled = false;

function installExitHook(): void {
  if (exitHookInstalled) return;
  exitHookInstalled = true;
  process.on('exit', () => {
    for (const h of [...held]) h.release();
  });
}

/** Whether a process with this pid exists on this host (EPERM: it exists but belongs to someone else). */
export function processAlive(pid: number): boolean {
  if (!Number.isInteger(pid) || pid <= 0) return false;
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}

function readLockInfo(path: string): LockInfo | null {
  try {
    const v = JSON.parse(readFileSync(path, 'utf8')) as LockInfo;
    return typeof v.pid === 'number' && typeof v.token === 'string' ? v : null;
  } catch {
    return null;
  }
}

/** The current holder of a lock, if any. */
export function lockHolder(path: string): LockInfo | null {
  return readLockInfo(path);
}

/**
 * Take the lock for `dbPath` or throw a LogbookProblem of kind "busy" naming the other writer.
 */
export function acquireLock(lockFile: string, dbPath: string, command = ''): LockHandle {
  for (let attempt = 0; attempt < 5; attempt++) {
    const info: LockInfo = { pid: process.pid, host: hostname(), startedAt: new Date().toISOString(), token: randomBytes(12).toString('hex'), command };
    let fd: number;
    try {
      fd = openSync(lockFile, 'wx');
    } catch (err) {
      const code = (err as NodeJS.ErrnoException).code;
      if (code !== 'EEXIST') throw new LogbookProblem(lockFile, `could not create the lock file (${(err as Error).message})`, 'busy');
      const other = readLockInfo(lockFile);
      if (!other) {
        let ageMs = Infinity;
        try {
          ageMs = Date.now() - statSync(lockFile).mtimeMs;
        } catch {
          continue; // gone meanwhile: try again
        }
        if (ageMs < FRESH_EMPTY_LOCK_MS) {
          throw new LogbookProblem(dbPath, `another process is just starting to write to this logbook (lock file ${lockFile}); try again in a moment`, 'busy');
        }
      } else {
        const sameHost = other.host === hostname();
        if (!sameHost || processAlive(other.pid)) {
          const who = other.pid === process.pid && sameHost ? `this same process (pid ${other.pid})` : `another Shadowfront process (pid ${other.pid}${sameHost ? '' : ` on host ${other.host}`})`;
          throw new LogbookProblem(
            dbPath,
            `the logbook is open for writing by ${who}, since ${other.startedAt}${other.command ? ` ("${other.command}")` : ''}. ` +
              `Only one program may write to it at a time: wait for that one to finish and try again. ` +
              `If you are sure that process is gone, delete the lock file ${lockFile}.`,
            'busy',
          );
        }
      }
      // Stale: its writer is dead (or it was never completed). Move it aside and try again; O_EXCL decides any race.
      const aside = `${lockFile}.stale-${process.pid}-${randomBytes(4).toString('hex')}`;
      try {
        renameSync(lockFile, aside);
        rmSync(aside, { force: true });
      } catch {
        // Someone else moved it first.
      }
      continue;
    }
    try {
      writeSync(fd, JSON.stringify(info));
      fsyncSync(fd);
    } finally {
      closeSync(fd);
    }
    let released = false;
    const handle: LockHandle = {
      path: lockFile,
      info,
      stillOurs: () => readLockInfo(lockFile)?.token === info.token,
      release: () => {
        if (released) return;
        released = true;
        held.delete(handle);
        if (readLockInfo(lockFile)?.token === info.token) rmSync(lockFile, { force: true });
      },
    };
    held.add(handle);
    installExitHook();
    return handle;
  }
  throw new LogbookProblem(dbPath, `could not take the lock ${lockFile} after several tries; another process keeps taking it`, 'busy');
}
