/** Reading and writing fields of a setup JSON object by dotted path with list indices ("beam.center[1]"). */

export type PathPart = string | number;

export function parsePath(path: string): PathPart[] {
  const out: PathPart[] = [];
  for (const seg of path.split('.')) {
    const m = /^([^[\]]*)((?:\[\d+\])*)$/.exec(seg);
    if (!m) {
      out.push(seg);
      continue;
    }
    if (m[1]) out.push(m[1]);
    for (const idx of m[2]!.matchAll(/\[(\d+)\]/g)) out.push(Number(idx[1]));
  }
  return out;
}

export function getAt(obj: unknown, path: string): unknown {
  let cur: unknown = obj;
  for (const p of parsePath(path)) {
    if (cur === null || typeof cur !== 'object') return undefined;
    cur = (cur as Record<string | number, unknown>)[p];
  }
  return cur;
}

function isEmptyObject(v: unknown): boolean {
  return !!v && typeof v === 'object' && !Array.isArray(v) && Object.keys(v).length === 0;
}

/**
 * A copy of `obj` with the field at `path` set to `value`; `undefined` removes the field (and an object
 * left empty by that). Intermediate objects and lists are created as needed.
 */
export function setAt<T extends Record<string, unknown>>(obj: T, path: string, value: unknown): T {
  const parts = parsePath(path);
  const rec = (cur: unknown, i: number): unknown => {
    const key = parts[i]!;
    const base: Record<string | number, unknown> | unknown[] = Array.isArray(cur)
      ? [...cur]
      : cur && typeof cur === 'object'
        ? { ...(cur as Record<string, unknown>) }
        : typeof key === 'number'
          ? []
          : {};
    const b = base as Record<string | number, unknown>;
    if (i === parts.length - 1) {
      if (value === undefined && !Array.isArray(base)) delete b[key];
      else b[key] = value;
    } else {
      const next = rec(b[key], i + 1);
      if (next === undefined || isEmptyObject(next)) {
        if (Array.isArray(base)) b[key] = next;
        else delete b[key];
      } else b[key] = next;
    }
    return base;
  };
  return rec(obj, 0) as T;
}

/** True when a problem's field path is this field or inside it ("beam.center[1]" is inside "beam.center"). */
export function pathMatches(problemPath: string | undefined, fieldPath: string): boolean {
  if (!problemPath) return false;
  return problemPath === fieldPath || problemPath.startsWith(`${fieldPath}.`) || problemPath.startsWith(`${fieldPath}[`);
}
