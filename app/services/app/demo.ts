/**
 * The bundled synthetic demo (resources/demo, made by Shadowfront's own simulator): its setup and frames
 * for the interface. Read-only: nothing here writes into resources/.
 */
import { copyFileSync, cpSync, existsSync, mkdirSync } from 'node:fs';
import { basename, join } from 'node:path';
import type { FileBlob, SetupJson } from '../../shared/contract.ts';
import { readBytes, readJson, FileProblem } from '../files.ts';

interface ScenarioMeasurement {
  label: string;
  setup: string;
  frames: string[];
  darks?: string[];
  takenAt?: string;
}

interface Scenario {
  format: string;
  asset?: { name?: string };
  measurements: ScenarioMeasurement[];
  featured?: { before?: number; after?: number };
}

/** A setup object from a setup file, or the setup part of a scene file. */
export function setupPart(json: unknown): SetupJson {
  const o = { ...(json as Record<string, unknown>) };
  if (o.format === 'shadowfront-scene/1') {
    delete o.aberrations;
    delete o.frame;
    delete o.noise;
    o.format = 'shadowfront-setup/1';
  }
  return o;
}

function readScenario(demoDir: string): Scenario | null {
  const path = join(demoDir, 'scenario.json');
  let json: unknown;
  try {
    json = readJson(path);
  } catch (err) {
    if (err instanceof FileProblem && err.reason === 'no such file') return null;
    throw err;
  }
  const s = json as Partial<Scenario>;
  if (!s || s.format !== 'shadowfront-demo/1' || !Array.isArray(s.measurements)) {
    throw new FileProblem(path, 'field "format" should be "shadowfront-demo/1" with a "measurements" list');
  }
  return s as Scenario;
}

/** The demo bench setup (the scenario's setup, else the single-frame demo's scene). */
export function demoSetup(resourcesDir: string): SetupJson {
  const demoDir = join(resourcesDir, 'demo');
  const scenario = readScenario(demoDir);
  const first = scenario?.measurements[scenario.featured?.before ?? 0] ?? scenario?.measurements[0];
  if (first) return setupPart(readJson(join(demoDir, first.setup)));
  return setupPart(readJson(join(demoDir, 'scene-demo.json')));
}

/** A blank example setup (resources/examples/setup-hene-collimated.json). */
export function blankSetup(resourcesDir: string): SetupJson {
  return setupPart(readJson(join(resourcesDir, 'examples', 'setup-hene-collimated.json')));
}

function withSynthetic(label: string): string {
  return /synthetic/i.test(label) ? label : `${label} — synthetic`;
}

function blob(path: string): FileBlob {
  return { name: basename(path), data: readBytes(path) };
}

/**
 * The demo frame sets: the featured "before" and "after" cleaning measurements first, then the other
 * weeks, then the single 512 × 512 frame of `shadowfront demo`. Every label says "synthetic".
 */
export function demoFiles(resourcesDir: string): { setup: SetupJson; frames: FileBlob[]; label: string }[] {
  const demoDir = join(resourcesDir, 'demo');
  const scenario = readScenario(demoDir);
  const out: { setup: SetupJson; frames: FileBlob[]; label: string }[] = [];
  if (scenario) {
    const order = scenario.measurements.map((_, i) => i);
    const featured = [scenario.featured?.before, scenario.featured?.after].filter((i): i is number => Number.isInteger(i) && i! >= 0 && i! < order.length);
    for (const i of [...featured, ...order.filter((k) => !featured.includes(k))]) {
      const m = scenario.measurements[i];
      const date = m.takenAt ? ` (${m.takenAt.slice(0, 10)})` : '';
      out.push({
        setup: setupPart(readJson(join(demoDir, m.setup))),
        frames: m.frames.map((f) => blob(join(demoDir, f))),
        label: withSynthetic(`${m.label}${date}${scenario.asset?.name ? ` — ${scenario.asset.name}` : ''}`),
      });
    }
  }
  const single = join(demoDir, 'frame-demo.png');
  try {
    out.push({ setup: setupPart(readJson(join(demoDir, 'scene-demo.json'))), frames: [blob(single)], label: 'single 512 × 512 frame of the whole shadow — synthetic' });
  } catch (err) {
    if (!out.length) throw err;
  }
  return out;
}

/** The bundled demo logbook's file name (resources/demo/logbook/). */
export const DEMO_LOGBOOK_FILE = 'shadowfront-logbook.sqlite';

/**
 * Copy the bundled demo logbook (the database and its frames folder) into `targetDir`, so that the
 * bundled files are never changed. Returns the copy's path. An existing copy is kept unless `replace`.
 */
export function copyDemoLogbook(resourcesDir: string, targetDir: string, options: { replace?: boolean } = {}): string {
  const from = join(resourcesDir, 'demo', 'logbook', DEMO_LOGBOOK_FILE);
  const to = join(targetDir, DEMO_LOGBOOK_FILE);
  if (!existsSync(from)) throw new FileProblem(from, 'the bundled demo logbook is missing (regenerate it with "npx tsx test/fixtures/make-demo-scenario.ts")');
  if (existsSync(to) && !options.replace) return to;
  try {
    mkdirSync(targetDir, { recursive: true });
    if (existsSync(`${from}.frames`)) cpSync(`${from}.frames`, `${to}.frames`, { recursive: true, force: true });
    copyFileSync(from, to);
  } catch (err) {
    throw new FileProblem(to, `could not copy the demo logbook here (${(err as Error).message})`);
  }
  return to;
}
