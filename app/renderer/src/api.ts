/**
 * The interface's one way to the services: `window.shadowfront` in the desktop app (exposed by the
 * preload script over IPC), or, in a plain browser (local web mode), an HTTP client over fetch that
 * implements the same ShadowfrontApi: every call is `POST /api/<channel>` with the per-start token from
 * the page address (`#token=…`) in the `x-shadowfront-token` header, the argument and the reply in the
 * wire codec of app/shared/contract.ts. The client is generated from API_CHANNELS, so it has exactly the
 * contract's calls.
 */
import { API_CHANNELS, fromWire, toWire } from '../../shared/contract.ts';
import type { ApiProblem, ApiReply, ShadowfrontApi } from '../../shared/contract.ts';

export const TOKEN_HEADER = 'x-shadowfront-token';

/** The token from a location hash such as "#token=abc" (also "#a=1&token=abc"); '' when absent. */
export function tokenFromHash(hash: string): string {
  const h = hash.startsWith('#') ? hash.slice(1) : hash;
  for (const part of h.split('&')) {
    const [k, ...rest] = part.split('=');
    if (k === 'token') return decodeURIComponent(rest.join('='));
  }
  return '';
}

function problem(kind: string, message: string): ApiReply<never> {
  return { ok: false, problem: { kind, message } };
}

function isReply(v: unknown): v is ApiReply<unknown> {
  if (!v || typeof v !== 'object') return false;
  const o = v as Record<string, unknown>;
  if (o.ok === true) return 'value' in o;
  if (o.ok === false) {
    const p = o.problem as ApiProblem | undefined;
    return !!p && typeof p.message === 'string';
  }
  return false;
}

type FetchLike = (url: string, init: { method: string; headers: Record<string, string>; body: string }) => Promise<{
  ok: boolean;
  status: number;
  text(): Promise<string>;
}>;

/** The HTTP client: one method per channel of API_CHANNELS. */
export function createHttpApi(options: { baseUrl?: string; token: string; fetch?: FetchLike }): ShadowfrontApi {
  const base = (options.baseUrl ?? '').replace(/\/$/, '');
  const doFetch: FetchLike = options.fetch ?? ((url, init) => fetch(url, init));
  const api: Record<string, Record<string, (arg?: unknown) => Promise<ApiReply<unknown>>>> = {};
  for (const channel of API_CHANNELS) {
    const [group, method] = channel.split('.') as [string, string];
    (api[group] ??= {})[method] = async (arg?: unknown): Promise<ApiReply<unknown>> => {
      let res;
      try {
        res = await doFetch(`${base}/api/${channel}`, {
          method: 'POST',
          headers: { 'content-type': 'application/json', [TOKEN_HEADER]: options.token },
          body: toWire(arg === undefined ? null : arg),
        });
      } catch {
        return problem(
          'connection',
          'The Shadowfront service did not answer. It may have been stopped: start it again (npm start) and reload this page.',
        );
      }
      let text = '';
      try {
        text = await res.text();
        const reply = fromWire(text);
        if (isReply(reply)) return reply;
      } catch {
        // not our wire format; fall through to a plain message
      }
      if (res.status === 401 || res.status === 403) {
        return problem(
          'access',
          'The Shadowfront service refused this window: its access token is missing or out of date. Open the address that the service printed when it started.',
        );
      }
      return problem('connection', `The Shadowfront service gave an answer this window cannot read (HTTP ${res.status}) for "${channel}".`);
    };
  }
  return api as unknown as ShadowfrontApi;
}

/** The API for this window: the desktop app's bridge when present, else the local web service. */
export function createApi(): ShadowfrontApi {
  // globalThis is the window in a page; written this way the module also type-checks without the DOM library (tests).
  const g = globalThis as { shadowfront?: ShadowfrontApi; location?: { hash: string } };
  if (g.shadowfront) return g.shadowfront;
  return createHttpApi({ token: tokenFromHash(g.location?.hash ?? '') });
}
