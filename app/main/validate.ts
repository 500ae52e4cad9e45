/**
 * One validator per API channel: the shape of the argument that may cross from the interface to the
 * services (app/shared/contract.ts). Plain code, no packages, no Electron: the Electron main process
 * (IPC) and the local web mode (HTTP) both check every call with it before the service sees it.
 *
 * The checks are about shape and size (types, required fields, list lengths); the meaning of values
 * (a setup's fields, a result's numbers) is checked by the services, which name the field and value.
 * Fields the contract does not know are ignored.
 */
import { API_CHANNELS, type ApiChannel } from '../shared/contract.ts';

/** A check returns null when the value is fine, else what is wrong ("frames[2].name is 7; expected text"). */
export type Check = (v: unknown, path: string) => string | null;

export const LIMITS = {
  /** Frames (or dark frames) in one request. */
  files: 200,
  /** Characters in a name, an id, a tag, a date. */
  shortText: 1000,
  /** Characters in notes or a search text. */
  longText: 100_000,
  tags: 100,
  ids: 10_000,
  /** Disc angles in one disc calibration. */
  discAngles: 36,
} as const;

function describe(v: unknown): string {
  if (v === undefined) return 'missing';
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'a list';
  if (v instanceof Uint8Array) return 'bytes';
  if (typeof v === 'string') return v.length > 40 ? `the text "${v.slice(0, 40)}…"` : `the text "${v}"`;
  if (typeof v === 'object') return 'an object';
  return `${typeof v} ${String(v)}`;
}

const fail = (path: string, v: unknown, expected: string) => `${path || 'the argument'} is ${describe(v)}; expected ${expected}`;

export const isPlainObject = (v: unknown): v is Record<string, unknown> =>
  !!v && typeof v === 'object' && !Array.isArray(v) && !ArrayBuffer.isView(v) && (Object.getPrototypeOf(v) === Object.prototype || Object.getPrototypeOf(v) === null);

export const text =
  (max: number = LIMITS.shortText): Check =>
  (v, p) =>
    typeof v !== 'string' ? fail(p, v, 'text') : v.length > max ? `${p} is ${v.length} characters long; at most ${max} are accepted` : null;

export const finite: Check = (v, p) => (typeof v === 'number' && Number.isFinite(v) ? null : fail(p, v, 'a finite number'));
export const integer: Check = (v, p) => (typeof v === 'number' && Number.isSafeInteger(v) ? null : fail(p, v, 'a whole number'));
export const bool: Check = (v, p) => (typeof v === 'boolean' ? null : fail(p, v, 'true or false'));
/** A name or an id: text, or a whole number. */
export const textOrWholeNumber: Check = (v, p) => (typeof v === 'number' ? integer(v, p) : typeof v === 'string' ? text()(v, p) : fail(p, v, 'text or a whole number'));
export const bytes: Check = (v, p) => (v instanceof Uint8Array ? null : fail(p, v, 'the bytes of a file'));

export const oneOf =
  (...values: string[]): Check =>
  (v, p) =>
    typeof v === 'string' && values.includes(v) ? null : fail(p, v, values.map((x) => `"${x}"`).join(' or '));

export const optional =
  (c: Check): Check =>
  (v, p) =>
    v === undefined ? null : c(v, p);

export const nullable =
  (c: Check): Check =>
  (v, p) =>
    v === null || v === undefined ? null : c(v, p);

export const list =
  (item: Check, max: number): Check =>
  (v, p) => {
    if (!Array.isArray(v)) return fail(p, v, 'a list');
    if (v.length > max) return `${p} holds ${v.length} items; at most ${max} are accepted`;
    for (let i = 0; i < v.length; i++) {
      const e = item(v[i], `${p}[${i}]`);
      if (e) return e;
    }
    return null;
  };

export const tuple =
  (...items: Check[]): Check =>
  (v, p) => {
    if (!Array.isArray(v) || v.length !== items.length) return fail(p, v, `a list of ${items.length} values`);
    for (let i = 0; i < items.length; i++) {
      const e = items[i](v[i], `${p}[${i}]`);
      if (e) return e;
    }
    return null;
  };

/** A plain JSON-like object (its content is checked by the service, e.g. parseSetup). */
export const anyObject: Check = (v, p) => (isPlainObject(v) ? null : fail(p, v, 'an object'));

export const object =
  (fields: Record<string, Check>): Check =>
  (v, p) => {
    if (!isPlainObject(v)) return fail(p, v, 'an object');
    for (const [k, c] of Object.entries(fields)) {
      const e = c(v[k], p ? `${p}.${k}` : k);
      if (e) return e;
    }
    return null;
  };

export const record =
  (value: Check, max: number): Check =>
  (v, p) => {
    if (!isPlainObject(v)) return fail(p, v, 'an object');
    const keys = Object.keys(v);
    if (keys.length > max) return `${p} holds ${keys.length} entries; at most ${max} are accepted`;
    for (const k of keys) {
      const e = value(v[k], `${p}.${k}`);
      if (e) return e;
    }
    return null;
  };

/** No argument: undefined or null. */
export const nothing: Check = (v, p) => (v === undefined || v === null ? null : fail(p, v, 'no argument'));

const fileBlob = object({ name: text(), data: bytes });
const files = list(fileBlob, LIMITS.files);
const region = nullable(object({ centerPx: tuple(finite, finite), radiusPx: finite }));
const frameSet = { frames: files, darks: files, setup: anyObject, region: optional(region) };
const query = {
  asset: optional(text()),
  since: optional(text()),
  until: optional(text()),
  tags: optional(list(text(), LIMITS.tags)),
  text: optional(text(LIMITS.longText)),
};
const id = object({ id: text() });

/** The validator of every channel's argument. */
export const VALIDATORS: Record<ApiChannel, Check> = {
  'app.info': nothing,
  'safety.notice': nothing,
  'safety.acknowledge': nothing,
  'setup.check': object({ setup: anyObject }),
  'setup.example': object({ which: oneOf('demo', 'blank') }),
  'setup.listPresets': nullable(object({ asset: optional(text()) })),
  'setup.savePreset': object({ asset: text(), name: text(), setup: anyObject }),
  'setup.deletePreset': id,
  'frames.preview': object(frameSet),
  'frames.demoFiles': nothing,
  'jobs.startFit': object({
    ...frameSet,
    terms: optional(list(integer, 50)),
    asset: optional(text()),
    disc: optional(textOrWholeNumber),
    discAngleDeg: optional(finite),
  }),
  'jobs.startSimulate': object({
    setup: anyObject,
    aberrationsWaves: record(finite, 500),
    disc: optional(object({ ellipticity: optional(finite), axisRad: optional(finite), edgeRoughnessM: optional(finite) })),
    widthPx: optional(integer),
    heightPx: optional(integer),
    model: optional(oneOf('fast', 'reference')),
  }),
  'jobs.startPlan': object({ plan: anyObject }),
  'jobs.startDiscCalibration': object({
    setup: anyObject,
    sets: list(object({ angle: text(), frames: files, darks: optional(files) }), LIMITS.discAngles),
    beam: oneOf('fit', 'ideal'),
    harmonics: optional(bool),
    terms: optional(list(integer, 50)),
  }),
  'jobs.status': id,
  'jobs.cancel': id,
  'logbook.info': nothing,
  'logbook.assets': nothing,
  'logbook.discs': nothing,
  'logbook.saveDiscProfile': object({ name: text(), profile: anyObject, replace: optional(bool), notes: optional(text(LIMITS.longText)) }),
  'logbook.measurements': nullable(object(query)),
  'logbook.measurement': object({ id: integer }),
  'logbook.save': object({
    asset: text(),
    takenAt: optional(text()),
    operator: optional(text()),
    tags: list(text(), LIMITS.tags),
    notes: text(LIMITS.longText),
    setup: anyObject,
    frames: files,
    darks: files,
    result: anyObject,
  }),
  'logbook.compare': object({ a: integer, b: integer }),
  'logbook.trend': object({ asset: text(), since: optional(text()), until: optional(text()), tags: optional(list(text(), LIMITS.tags)) }),
  'logbook.exportCsv': nullable(object(query)),
  'logbook.exportReport': object({ ...query, kind: oneOf('measurement', 'trend', 'comparison'), ids: optional(list(integer, LIMITS.ids)) }),
  'plan.run': object({ plan: anyObject }),
  'plan.example': nothing,
};

export function isApiChannel(name: unknown): name is ApiChannel {
  return typeof name === 'string' && (API_CHANNELS as readonly string[]).includes(name);
}

/** What is wrong with a call's argument, or null when it may go to the service. */
export function checkArgument(channel: ApiChannel, arg: unknown): string | null {
  return VALIDATORS[channel](arg, '');
}
