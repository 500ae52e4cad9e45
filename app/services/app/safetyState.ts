/**
 * The laser-safety notice and its acknowledgement. The acknowledgement is remembered in
 * `<dataDir>/safety.json` for the current local calendar day only: the notice is never switched off for
 * good (issue: "The tool never disables it permanently").
 */
import { join } from 'node:path';
import { SAFETY_POINTS, SAFETY_TITLE } from '../../../core/safety.ts';
import type { SafetyNotice } from '../../shared/contract.ts';
import { readBytesIfExists, writeBytesAtomic } from '../files.ts';

export const SAFETY_FILE = 'safety.json';

/** The local calendar day of a moment, "YYYY-MM-DD". */
export function localDay(d: Date): string {
  return `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, '0')}-${String(d.getDate()).padStart(2, '0')}`;
}

export class SafetyState {
  private readonly path: string;

  constructor(
    dataDir: string,
    private readonly now: () => Date = () => new Date(),
  ) {
    this.path = join(dataDir, SAFETY_FILE);
  }

  /** The day of the last acknowledgement, or null (a missing or unreadable file counts as none). */
  private acknowledgedDay(): string | null {
    try {
      const bytes = readBytesIfExists(this.path);
      if (!bytes) return null;
      const json = JSON.parse(new TextDecoder().decode(bytes)) as { acknowledgedDay?: unknown };
      return typeof json.acknowledgedDay === 'string' ? json.acknowledgedDay : null;
    } catch {
      return null;
    }
  }

  notice(): SafetyNotice {
    return { title: SAFETY_TITLE, points: [...SAFETY_POINTS], acknowledgedToday: this.acknowledgedDay() === localDay(this.now()) };
  }

  acknowledge(): { acknowledgedAt: string } {
    const at = this.now();
    const record = { format: 'shadowfront-safety/1', acknowledgedDay: localDay(at), acknowledgedAt: at.toISOString(), note: 'remembered for this local day only' };
    writeBytesAtomic(this.path, new TextEncoder().encode(`${JSON.stringify(record, null, 1)}\n`));
    return { acknowledgedAt: record.acknowledgedAt };
  }
}
