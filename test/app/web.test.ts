/**
 * The local web mode's HTTP server (app/web/server.ts): 127.0.0.1 only, a per-start token, the wire
 * codec, a strict Content-Security-Policy, static files without directory traversal, and the same
 * service replies as the desktop app. Contract checks; no physics.
 */
import { mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { request } from 'node:http';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fromWire, toWire, type ApiReply, type SetupCheck } from '../../app/shared/contract.ts';
import { startWebServer, TOKEN_HEADER, type WebServer } from '../../app/web/server.ts';

interface Res {
  status: number;
  headers: Record<string, string | string[] | undefined>;
  body: string;
}

function raw(port: number, options: { method?: string; path: string; headers?: Record<string, string>; body?: string }): Promise<Res> {
  return new Promise((resolve, reject) => {
    const req = request({ host: '127.0.0.1', port, method: options.method ?? 'GET', path: options.path, headers: options.headers }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(chunks).toString('utf8') }));
    });
    req.on('error', reject);
    if (options.body !== undefined) req.write(options.body);
    req.end();
  });
}

describe('local web server', () => {
  let server: WebServer;
  const dir = mkdtempSync(join(tmpdir(), 'shadowfront-web-'));
  const staticDir = join(dir, 'renderer');

  const api = (channel: string, arg?: unknown, headers: Record<string, string> = {}) =>
    raw(server.port, {
      method: 'POST',
      path: `/api/${channel}`,
      headers: { 'content-type': 'application/json', [TOKEN_HEADER]: server.token, ...headers },
      body: arg === undefined ? '' : toWire(arg),
    });

  beforeAll(async () => {
    mkdirSync(join(staticDir, 'assets'), { recursive: true });
    writeFileSync(join(staticDir, 'index.html'), '<!doctype html><title>Shadowfront test page</title><script type="module" src="./assets/app.js"></script>');
    writeFileSync(join(staticDir, 'assets', 'app.js'), 'console.log("app");');
    writeFileSync(join(dir, 'secret.txt'), 'outside the static folder');
    server = await startWebServer({ port: 0, dataDir: join(dir, 'data'), logbookPath: join(dir, 'data', 'logbook.sqlite'), demo: false, staticDir, maxBodyBytes: 4096 });
  }, 120_000);

  afterAll(async () => {
    await server?.close();
  });

  it('listens on 127.0.0.1 and prints the token in the address fragment', () => {
    expect(server.url).toBe(`http://127.0.0.1:${server.port}/#token=${server.token}`);
    expect(server.token.length).toBeGreaterThanOrEqual(24);
  });

  it('serves index.html with the strict Content-Security-Policy, and scripts with a JavaScript type', async () => {
    const page = await raw(server.port, { path: '/', headers: { host: `127.0.0.1:${server.port}` } });
    expect(page.status).toBe(200);
    expect(page.headers['content-type']).toMatch(/^text\/html/);
    expect(page.body).toContain('Shadowfront test page');
    const csp = String(page.headers['content-security-policy']);
    expect(csp).toContain("default-src 'self'");
    expect(csp).toContain("img-src 'self' data: blob:");
    expect(csp).toContain("style-src 'self' 'unsafe-inline'");
    expect(page.headers['x-content-type-options']).toBe('nosniff');
    const js = await raw(server.port, { path: '/assets/app.js', headers: { host: `localhost:${server.port}` } });
    expect(js.status).toBe(200);
    expect(js.headers['content-type']).toMatch(/^text\/javascript/);
  });

  it('does not serve files outside its folder (../, encoded ../, absolute paths)', async () => {
    for (const path of ['/../package.json', '/..%2Fpackage.json', '/%2e%2e/%2e%2e/package.json', '/assets/../../secret.txt', '/..%5csecret.txt', '//etc/passwd']) {
      const r = await raw(server.port, { path, headers: { host: `127.0.0.1:${server.port}` } });
      expect(r.status, path).toBe(404);
      expect(r.body).not.toContain('"name": "shadowfront"');
      expect(r.body).not.toContain('outside the static folder');
    }
  });

  it('refuses a request carrying another host name (DNS rebinding) or a foreign Origin', async () => {
    const r = await raw(server.port, { path: '/', headers: { host: `evil.example:${server.port}` } });
    expect(r.status).toBe(403);
    const a = await api('app.info', undefined, { origin: 'http://evil.example' });
    expect(a.status).toBe(403);
  });

  it('refuses API calls without the token, or with a wrong one (401)', async () => {
    const none = await raw(server.port, { method: 'POST', path: '/api/app.info', body: '' });
    expect(none.status).toBe(401);
    const wrong = await api('app.info', undefined, { [TOKEN_HEADER]: `${server.token}x` });
    expect(wrong.status).toBe(401);
    const reply = fromWire(wrong.body) as ApiReply<unknown>;
    expect(reply.ok).toBe(false);
  });

  it('answers a call with the token, in the wire codec', async () => {
    const r = await api('app.info');
    expect(r.status).toBe(200);
    expect(r.headers['content-type']).toMatch(/^application\/json/);
    const reply = fromWire(r.body) as ApiReply<{ shell: string; logbook: { assets: number } }>;
    expect(reply.ok).toBe(true);
    if (reply.ok) {
      expect(reply.value.shell).toBe('web');
      expect(reply.value.logbook.assets).toBe(0);
    }
    const nullBody = await api('safety.notice', null);
    expect((fromWire(nullBody.body) as ApiReply<unknown>).ok).toBe(true);
  });

  it('answers 404 for an unknown channel, 405 for GET on the API and 413 for an oversized body', async () => {
    expect((await api('setup.nothing', {})).status).toBe(404);
    expect((await raw(server.port, { path: '/api/app.info', headers: { host: `127.0.0.1:${server.port}` } })).status).toBe(405);
    const big = await api('setup.check', { setup: { note: 'x'.repeat(5000) } });
    expect(big.status).toBe(413);
    expect((fromWire(big.body) as ApiReply<unknown> & { ok: false }).problem.message).toMatch(/more than the 4096 bytes/);
  });

  it('setup.check with a bad field gives a problem naming the field and the value', async () => {
    const setup = {
      format: 'shadowfront-setup/1',
      wavelength: '632.8 nm',
      beam: { radius: '4 mm', curvatureRadius: 'collimated' },
      disc: { diameter: '3 mm' },
      camera: { distance: '800 parsecs', pixelPitch: '5.5 um', bitDepth: 12 },
    };
    const r = await api('setup.check', { setup });
    expect(r.status).toBe(200);
    const reply = fromWire(r.body) as ApiReply<SetupCheck>;
    expect(reply.ok).toBe(true);
    if (reply.ok) {
      expect(reply.value.derived).toBeNull();
      expect(reply.value.problem?.kind).toBe('setup-field');
      expect(reply.value.problem?.field).toBe('camera.distance');
      expect(reply.value.problem?.message).toContain('"800 parsecs"');
      expect(reply.value.problem?.message).toContain('camera.distance');
    }
  });

  it('refuses a malformed argument as invalid-request', async () => {
    const r = await api('setup.check', { setup: 'not an object' });
    const reply = fromWire(r.body) as ApiReply<unknown>;
    expect(reply.ok).toBe(false);
    if (!reply.ok) expect(reply.problem.kind).toBe('invalid-request');
    const bad = await raw(server.port, { method: 'POST', path: '/api/setup.check', headers: { [TOKEN_HEADER]: server.token }, body: '{not json' });
    expect(bad.status).toBe(400);
  });
});
