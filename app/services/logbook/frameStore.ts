/**
 * Raw frames kept for re-analysis, in a content-addressed folder beside the database:
 * `<db>.frames/<first two hex digits>/<sha256>`. A frame is stored once, whatever number of
 * measurements refer to it; each file is written atomically (temp file, fsync, rename, fsync folder).
 * Whether a frame may be deleted is decided by the logbook (reference counting by query), not here.
 */
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readdirSync, rmSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { readBytes, syncFolder, writeBytesAtomic } from '../files.ts';

export function sha256Hex(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

export class FrameStore {
  constructor(readonly dir: string) {}

  path(sha256: string): string {
    if (!/^[0-9a-f]{64}$/.test(sha256)) throw new RangeError(`not a SHA-256 digest: "${sha256}"`);
    return join(this.dir, sha256.slice(0, 2), sha256);
  }

  has(sha256: string): boolean {
    return existsSync(this.path(sha256));
  }

  /** Store the bytes (once). `written` is false when an intact copy was already there. */
  put(bytes: Uint8Array): { sha256: string; sizeBytes: number; written: boolean } {
    const sha256 = sha256Hex(bytes);
    const p = this.path(sha256);
    if (existsSync(p)) {
      const intact = statSync(p).size === bytes.length && sha256Hex(readBytes(p)) === sha256;
      if (intact) return { sha256, sizeBytes: bytes.length, written: false };
    }
    const sub = join(this.dir, sha256.slice(0, 2));
    const newFolder = !existsSync(sub);
    mkdirSync(sub, { recursive: true });
    if (newFolder) {
      syncFolder(this.dir);
      syncFolder(join(this.dir, '..'));
    }
    writeBytesAtomic(p, bytes);
    return { sha256, sizeBytes: bytes.length, written: true };
  }

  read(sha256: string): Uint8Array {
    return readBytes(this.path(sha256));
  }

  /** Whether the stored file still has the content its name promises. */
  verify(sha256: string): 'ok' | 'missing' | 'damaged' {
    const p = this.path(sha256);
    if (!existsSync(p)) return 'missing';
    return sha256Hex(readBytes(p)) === sha256 ? 'ok' : 'damaged';
  }

  remove(sha256: string): void {
    rmSync(this.path(sha256), { force: true });
  }

  /** Every digest present in the folder. */
  list(): string[] {
    if (!existsSync(this.dir)) return [];
    const out: string[] = [];
    for (const sub of readdirSync(this.dir)) {
      if (!/^[0-9a-f]{2}$/.test(sub)) continue;
      for (const f of readdirSync(join(this.dir, sub))) if (/^[0-9a-f]{64}$/.test(f)) out.push(f);
    }
    return out.sort();
  }

  /** Temporary files left by writers that were killed mid-write. */
  leftoverTemps(): string[] {
    if (!existsSync(this.dir)) return [];
    const out: string[] = [];
    for (const sub of readdirSync(this.dir)) {
      if (!/^[0-9a-f]{2}$/.test(sub)) continue;
      for (const f of readdirSync(join(this.dir, sub))) if (f.startsWith('.') && f.endsWith('.tmp')) out.push(join(this.dir, sub, f));
    }
    return out;
  }
}
