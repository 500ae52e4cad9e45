/**
 * The local web mode: the same interface (the built renderer) in a normal browser, and the same API
 * (app/shared/contract.ts) over HTTP against the same services (app/services/appService.ts).
 *
 * How the token reaches the page: every start makes a random token and prints the address
 *   http://127.0.0.1:<port>/#token=<token>
 * The part after "#" never travels to the server. The renderer reads the token from location.hash
 * (app/renderer/src/api.ts tokenFromHash) and sends it in the header `x-shadowfront-token` with every
 * `POST /api/<channel>`; a call without it, or with another, is refused with 401.
 *
 * Requests: `POST /api/<channel>`, body = toWire(the single argument) or empty (also "null");
 * response = toWire(ApiReply), always HTTP 200 when the call was made (user errors are ApiProblems).
 * Refusals in plain words: 401 no or wrong token, 403 a foreign Host or Origin (a web page elsewhere
 * trying to reach this server), 404 unknown channel or file, 405 other methods, 413 a body over the
 * limit. GET serves the built renderer from `staticDir` (no directory listing, nothing outside it).
 *
 * Security: binds 127.0.0.1 only; Host must be 127.0.0.1:<port> or localhost:<port> (DNS rebinding);
 * a strict Content-Security-Policy; nothing remote is loaded.
 */
import { createHash, randomBytes, timingSafeEqual } from 'node:crypto';
import { createServer, type IncomingMessage, type ServerResponse } from 'node:http';
import { readFile, stat } from 'node:fs/promises';
import { extname, join, resolve, sep } from 'node:path';
import { fileURLToPath } from 'node:url';
import { fromWire, toWire, type ApiReply } from '../shared/contract.ts';
import { callChannel } from '../main/dispatch.ts';
import { isApiChannel } from '../main/validate.ts';
import { createAppService, type AppService, type AppServiceOptions } from '../services/appService.ts';
import { logToStderr, toProblem } from '../services/app/problems.ts';

export const TOKEN_HEADER = 'x-shadowfront-token';
/** Largest request body (frames travel as base64 inside JSON). */
export const MAX_BODY_BYTES = 200 * 1024 * 1024;

export const CONTENT_SECURITY_POLICY =
  "default-src 'self'; img-src 'self' data: blob:; style-src 'self' 'unsafe-inline'; object-src 'none'; base-uri 'none'; form-action 'none'; frame-ancestors 'none'";

const MIME: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json; charset=utf-8',
  '.map': 'application/json; charset=utf-8',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.jpg': 'image/jpeg',
  '.jpeg': 'image/jpeg',
  '.gif': 'image/gif',
  '.webp': 'image/webp',
  '.ico': 'image/x-icon',
  '.woff': 'font/woff',
  '.woff2': 'font/woff2',
  '.ttf': 'font/ttf',
  '.wasm': 'application/wasm',
  '.txt': 'text/plain; charset=utf-8',
};

export interface WebServerOptions {
  /** 0 (default) = any free port. */
  port?: number;
  dataDir: string;
  logbookPath: string;
  demo: boolean;
  /** The built renderer (default: out/renderer of this repository). */
  staticDir?: string;
  /** Largest request body, bytes (default MAX_BODY_BYTES). */
  maxBodyBytes?: number;
  /** Passed on to the app service (tests inject a clock or another worker entry). */
  service?: Partial<Pick<AppServiceOptions, 'now' | 'workerEntry' | 'resourcesDir' | 'log' | 'prewarm'>>;
}

export interface WebServer {
  url: string;
  token: string;
  port: number;
  close(): Promise<void>;
}

export function defaultStaticDir(): string {
  return fileURLToPath(new URL('../../out/renderer/', import.meta.url));
}

function digest(s: string): Buffer {
  return createHash('sha256').update(s, 'utf8').digest();
}

/** Constant-time comparison of the token sent with the one of this start. */
export function tokenMatches(sent: unknown, token: string): boolean {
  if (typeof sent !== 'string' || sent.length === 0) return false;
  return timingSafeEqual(digest(sent), digest(token));
}

const COMMON_HEADERS = {
  'x-content-type-options': 'nosniff',
  'referrer-policy': 'no-referrer',
  'x-frame-options': 'DENY',
  'cross-origin-opener-policy': 'same-origin',
  'cross-origin-resource-policy': 'same-origin',
};

function sendJson(res: ServerResponse, status: number, reply: ApiReply<unknown>): void {
  const body = toWire(reply);
  res.writeHead(status, { ...COMMON_HEADERS, 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store', 'content-length': Buffer.byteLength(body) });
  res.end(body);
}

function refuse(res: ServerResponse, status: number, kind: string, message: string): void {
  sendJson(res, status, { ok: false, problem: { kind, message } });
}

function sendText(res: ServerResponse, status: number, text: string): void {
  res.writeHead(status, { ...COMMON_HEADERS, 'content-type': 'text/plain; charset=utf-8', 'cache-control': 'no-store', 'content-security-policy': CONTENT_SECURITY_POLICY });
  res.end(text);
}

/** Read the body up to `limit` bytes; null when it is larger (the rest is discarded). */
function readBody(req: IncomingMessage, limit: number): Promise<Buffer | null> {
  return new Promise((resolveBody, reject) => {
    const chunks: Buffer[] = [];
    let size = 0;
    let over = false;
    req.on('data', (c: Buffer) => {
      if (over) return;
      size += c.length;
      if (size > limit) {
        over = true;
        chunks.length = 0;
        return;
      }
      chunks.push(c);
    });
    req.on('end', () => resolveBody(over ? null : Buffer.concat(chunks)));
    req.on('error', reject);
  });
}

export async function startWebServer(options: WebServerOptions): Promise<WebServer> {
  const token = randomBytes(24).toString('base64url');
  const staticRoot = resolve(options.staticDir ?? defaultStaticDir());
  const service: AppService = createAppService({
    dataDir: options.dataDir,
    logbookPath: options.logbookPath,
    demo: options.demo,
    shell: 'web',
    ...options.service,
  });
  const log = options.service?.log ?? logToStderr;
  const maxBody = options.maxBodyBytes ?? MAX_BODY_BYTES;
  const mb = (n: number) => (n >= 1048576 ? `${(n / 1048576).toFixed(0)} MB` : `${n} bytes`);
  let port = 0;

  const hostAllowed = (host: string | undefined) => host === `127.0.0.1:${port}` || host === `localhost:${port}`;
  const originAllowed = (origin: string | undefined) => origin === undefined || origin === `http://127.0.0.1:${port}` || origin === `http://localhost:${port}`;

  async function handleApi(req: IncomingMessage, res: ServerResponse, channel: string): Promise<void> {
    if (!tokenMatches(req.headers[TOKEN_HEADER], token)) {
      refuse(res, 401, 'access', 'This window has no valid access token. Open the address the service printed when it started (it ends in #token=…).');
      req.resume();
      return;
    }
    if (!isApiChannel(channel)) {
      refuse(res, 404, 'invalid-request', `There is no call "${channel.slice(0, 100)}" in this version of Shadowfront.`);
      req.resume();
      return;
    }
    const declared = Number(req.headers['content-length']);
    if (Number.isFinite(declared) && declared > maxBody) {
      refuse(res, 413, 'too-large', `The request is ${mb(declared)}, more than the ${mb(maxBody)} this service accepts. Use fewer or smaller frames.`);
      req.resume();
      return;
    }
    const body = await readBody(req, maxBody);
    if (body === null) {
      refuse(res, 413, 'too-large', `The request is more than the ${mb(maxBody)} this service accepts. Use fewer or smaller frames.`);
      return;
    }
    let arg: unknown;
    const textBody = body.toString('utf8').trim();
    try {
      arg = textBody === '' ? undefined : fromWire(textBody);
    } catch {
      refuse(res, 400, 'invalid-request', `The request "${channel}" was refused: its body is not valid JSON.`);
      return;
    }
    let reply: ApiReply<unknown>;
    try {
      reply = await callChannel(service, channel, arg);
    } catch (err) {
      reply = { ok: false, problem: toProblem(err, log) };
    }
    sendJson(res, 200, reply);
  }

  async function handleStatic(req: IncomingMessage, res: ServerResponse, pathname: string): Promise<void> {
    let rel: string;
    try {
      rel = decodeURIComponent(pathname);
    } catch {
      sendText(res, 400, 'Bad address.');
      return;
    }
    if (rel.includes('\0')) {
      sendText(res, 400, 'Bad address.');
      return;
    }
    if (rel === '/' || rel === '') rel = '/index.html';
    const file = resolve(staticRoot, `.${rel.startsWith('/') ? rel : `/${rel}`}`);
    if (file !== staticRoot && !file.startsWith(staticRoot + sep)) {
      sendText(res, 404, 'Not found.');
      return;
    }
    let data: Buffer;
    try {
      const s = await stat(file);
      if (!s.isFile()) throw new Error('not a file');
      data = await readFile(file);
    } catch {
      if (rel === '/index.html') {
        sendText(res, 503, `The interface has not been built yet (no ${join(staticRoot, 'index.html')}). Run "npm run build", or start with "npm start", which builds it.`);
      } else sendText(res, 404, 'Not found.');
      return;
    }
    res.writeHead(200, {
      ...COMMON_HEADERS,
      'content-type': MIME[extname(file).toLowerCase()] ?? 'application/octet-stream',
      'content-length': data.length,
      'cache-control': 'no-cache',
      'content-security-policy': CONTENT_SECURITY_POLICY,
    });
    res.end(req.method === 'HEAD' ? undefined : data);
  }

  const server = createServer((req, res) => {
    const run = async () => {
      if (!hostAllowed(req.headers.host) || !originAllowed(req.headers.origin)) {
        sendText(res, 403, 'This Shadowfront service only answers pages it served itself, at 127.0.0.1.');
        req.resume();
        return;
      }
      const url = new URL(req.url ?? '/', `http://127.0.0.1:${port}`);
      if (url.pathname.startsWith('/api/')) {
        if (req.method !== 'POST') {
          res.setHeader('allow', 'POST');
          refuse(res, 405, 'invalid-request', 'Calls to the service use POST.');
          req.resume();
          return;
        }
        await handleApi(req, res, url.pathname.slice('/api/'.length));
        return;
      }
      if (req.method !== 'GET' && req.method !== 'HEAD') {
        res.setHeader('allow', 'GET, HEAD');
        sendText(res, 405, 'Only GET and HEAD are answered here.');
        req.resume();
        return;
      }
      await handleStatic(req, res, url.pathname);
    };
    run().catch((err) => {
      log(err);
      if (!res.headersSent) refuse(res, 500, 'internal', 'Something went wrong inside Shadowfront. Nothing already saved was changed.');
      else res.destroy();
    });
  });
  server.requestTimeout = 0; // large uploads on slow machines
  await new Promise<void>((ok, bad) => {
    server.once('error', bad);
    server.listen(options.port ?? 0, '127.0.0.1', () => {
      server.off('error', bad);
      ok();
    });
  });
  const address = server.address();
  port = typeof address === 'object' && address ? address.port : 0;
  let closing: Promise<void> | null = null;
  return {
    url: `http://127.0.0.1:${port}/#token=${token}`,
    token,
    port,
    close() {
      closing ??= (async () => {
        await new Promise<void>((ok) => {
          server.close(() => ok());
          server.closeAllConnections();
        });
        await service.close();
      })();
      return closing;
    },
  };
}
