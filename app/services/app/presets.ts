/**
 * Setup presets saved per asset, in `<dataDir>/presets.json` (format "shadowfront-presets/1"), written
 * atomically. A damaged file is never overwritten: saving refuses and names the file, so nothing saved
 * before is lost.
 */
import { randomBytes } from 'node:crypto';
import { join } from 'node:path';
import type { SetupJson, SetupPreset } from '../../shared/contract.ts';
import { parseSetup } from '../../../core/setup/parseSetup.ts';
import { readBytesIfExists, writeBytesAtomic } from '../files.ts';
import { AppProblem } from './problems.ts';

export const PRESETS_FILE = 'presets.json';
export const PRESETS_FORMAT = 'shadowfront-presets/1';

interface PresetsFile {
  format: typeof PRESETS_FORMAT;
  presets: SetupPreset[];
}

function isPreset(p: unknown): p is SetupPreset {
  const o = p as Record<string, unknown>;
  return !!o && typeof o === 'object' && typeof o.id === 'string' && typeof o.asset === 'string' && typeof o.name === 'string' && typeof o.savedAt === 'string' && !!o.setup && typeof o.setup === 'object';
}

export class PresetStore {
  readonly path: string;

  constructor(
    dataDir: string,
    private readonly now: () => Date = () => new Date(),
  ) {
    this.path = join(dataDir, PRESETS_FILE);
  }

  private read(): PresetsFile {
    const bytes = readBytesIfExists(this.path);
    if (!bytes) return { format: PRESETS_FORMAT, presets: [] };
    let json: unknown;
    try {
      json = JSON.parse(new TextDecoder().decode(bytes));
    } catch (err) {
      throw new AppProblem('file', `${this.path}: the presets file is not valid JSON (${(err as Error).message}); it was left as it is. Move it aside to start a new one.`, this.path);
    }
    const f = json as Partial<PresetsFile>;
    if (!f || typeof f !== 'object' || f.format !== PRESETS_FORMAT || !Array.isArray(f.presets)) {
      throw new AppProblem('file', `${this.path}: field "format" should be "${PRESETS_FORMAT}" with a "presets" list; the file was left as it is.`, this.path, 'format');
    }
    const bad = f.presets.findIndex((p) => !isPreset(p));
    if (bad >= 0) throw new AppProblem('file', `${this.path}: field "presets[${bad}]" is not a preset (id, asset, name, setup, savedAt); the file was left as it is.`, this.path, `presets[${bad}]`);
    return f as PresetsFile;
  }

  private write(f: PresetsFile): void {
    writeBytesAtomic(this.path, new TextEncoder().encode(`${JSON.stringify(f, null, 1)}\n`));
  }

  list(asset?: string): SetupPreset[] {
    const all = this.read().presets;
    const wanted = asset?.trim();
    return (wanted ? all.filter((p) => p.asset === wanted) : all).sort((a, b) => a.asset.localeCompare(b.asset) || a.name.localeCompare(b.name));
  }

  /** Save (or replace, by asset and name) a preset; the setup must be valid. */
  save(asset: string, name: string, setup: SetupJson): SetupPreset {
    const a = asset.trim();
    const n = name.trim();
    if (!a) throw new AppProblem('invalid-input', 'A preset needs an asset name (field "asset" is empty).', undefined, 'asset');
    if (!n) throw new AppProblem('invalid-input', 'A preset needs a name (field "name" is empty).', undefined, 'name');
    if (a.length > 120 || n.length > 120) throw new AppProblem('invalid-input', 'Asset and preset names must be at most 120 characters.', undefined, a.length > 120 ? 'asset' : 'name');
    parseSetup(setup, 'bench setup'); // refuses an invalid setup with the field and value named
    const f = this.read();
    const existing = f.presets.find((p) => p.asset === a && p.name === n);
    const preset: SetupPreset = { id: existing?.id ?? randomBytes(8).toString('hex'), asset: a, name: n, setup, savedAt: this.now().toISOString() };
    f.presets = [...f.presets.filter((p) => p !== existing), preset];
    this.write(f);
    return preset;
  }

  delete(id: string): { deleted: boolean } {
    const f = this.read();
    const keep = f.presets.filter((p) => p.id !== id);
    if (keep.length === f.presets.length) return { deleted: false };
    f.presets = keep;
    this.write(f);
    return { deleted: true };
  }
}
