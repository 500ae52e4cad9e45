/**
 * The desktop app's IPC contract, with a stand-in for the electron module (the real one is never
 * imported): every channel of API_CHANNELS is handled, calls from another sender or with a malformed
 * argument are refused as "invalid-request" before the service sees them, the window is locked down, and
 * the preload exposes exactly the channels. Contract checks; no physics.
 */
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { beforeAll, describe, expect, it, vi } from 'vitest';
import { API_CHANNELS, IPC_PREFIX, type ApiReply } from '../../app/shared/contract.ts';

const h = vi.hoisted(() => {
  const handlers = new Map<string, (event: unknown, ...args: unknown[]) => Promise<unknown>>();
  const appListeners = new Map<string, ((...a: unknown[]) => void)[]>();
  const windows: { options: Record<string, unknown>; loaded: string | null; webContents: { id: number; printToPDF: (o: unknown) => Promise<Buffer> } }[] = [];
  const serviceCalls: { channel: string; arg: unknown }[] = [];
  const exposed: { key: string; api: unknown }[] = [];
  const invoked: { channel: string; arg: unknown }[] = [];
  const session = {
    permissionHandler: null as null | ((wc: unknown, p: string, cb: (ok: boolean) => void) => void),
    beforeRequest: null as null | ((d: { url: string }, cb: (r: { cancel: boolean }) => void) => void),
  };
  return { handlers, appListeners, windows, serviceCalls, exposed, invoked, session, userData: '' };
});

vi.mock('electron', () => {
  let nextId = 1;
  class BrowserWindow {
    options: Record<string, unknown>;
    loaded: string | null = null;
    webContents: { id: number; printToPDF: (o: unknown) => Promise<Buffer> };
    constructor(options: Record<string, unknown>) {
      this.options = options;
      this.webContents = { id: 100 + nextId++, printToPDF: async () => Buffer.from('%PDF-1.4 stand-in') };
      h.windows.push(this);
    }
    once() {}
    on() {}
    show() {}
    destroy() {}
    isMinimized() {
      return false;
    }
    focus() {}
    restore() {}
    async loadFile(f: string) {
      this.loaded = f;
    }
  }
  const app = {
    getAppPath: () => process.cwd(),
    getPath: (k: string) => (k === 'temp' ? tmpdir() : h.userData),
    whenReady: () => Promise.resolve(),
    enableSandbox: vi.fn(),
    requestSingleInstanceLock: () => true,
    on: (ev: string, fn: (...a: unknown[]) => void) => h.appListeners.set(ev, [...(h.appListeners.get(ev) ?? []), fn]),
    quit: vi.fn(),
    isPackaged: false,
  };
  return {
    app,
    BrowserWindow,
    ipcMain: { handle: (ch: string, fn: (event: unknown, ...args: unknown[]) => Promise<unknown>) => h.handlers.set(ch, fn) },
    session: {
      defaultSession: {
        setPermissionRequestHandler: (fn: typeof h.session.permissionHandler) => (h.session.permissionHandler = fn),
        setPermissionCheckHandler: () => {},
        webRequest: { onBeforeRequest: (fn: typeof h.session.beforeRequest) => (h.session.beforeRequest = fn) },
      },
    },
    contextBridge: { exposeInMainWorld: (key: string, api: unknown) => h.exposed.push({ key, api }) },
    ipcRenderer: {
      invoke: async (channel: string, arg: unknown) => {
        h.invoked.push({ channel, arg });
        return { ok: true, value: 'from main' };
      },
    },
  };
});

// A stand-in service: records each call and answers with the channel's name (or an HTML report).
vi.mock('../../app/services/appService.ts', async () => {
  const { API_CHANNELS: channels } = await import('../../app/shared/contract.ts');
  return {
    createAppService: () => {
      const api: Record<string, Record<string, (arg: unknown) => Promise<ApiReply<unknown>>>> = {};
      for (const channel of channels) {
        const [g, m] = channel.split('.');
        (api[g] ??= {})[m] = async (arg: unknown) => {
          h.serviceCalls.push({ channel, arg });
          if (channel === 'logbook.exportReport') return { ok: true, value: { name: 'shadowfront-measurement-1.html', mime: 'text/html', data: new TextEncoder().encode('<html>report</html>') } };
          return { ok: true, value: channel };
        };
      }
      return { ...api, close: async () => {} };
    },
  };
});

vi.mock('../../app/main/sqlWasm.ts', () => ({ SQL_WASM_PATH: '/stand-in/sql-wasm.wasm' }));

type Reply = ApiReply<unknown>;

describe('Electron main process (stand-in electron module)', () => {
  let pageUrl = '';
  let good: { sender: { id: number; mainFrame: { url: string } }; senderFrame: { url: string } };
  const call = (channel: string, event: unknown, ...args: unknown[]) => h.handlers.get(IPC_PREFIX + channel)!(event, ...args) as Promise<Reply>;

  beforeAll(async () => {
    h.userData = mkdtempSync(join(tmpdir(), 'shadowfront-ipc-'));
    await import('../../app/main/index.ts');
    await vi.waitFor(() => expect(h.windows.length).toBeGreaterThan(0), { timeout: 60_000 });
    pageUrl = pathToFileURL(join(process.cwd(), 'out', 'renderer', 'index.html')).href;
    const frame = { url: `${pageUrl}#/setup` };
    good = { sender: { id: h.windows[0].webContents.id, mainFrame: frame }, senderFrame: frame };
  }, 120_000);

  it('registers a handler for every channel of API_CHANNELS, and no other', () => {
    expect([...h.handlers.keys()].sort()).toEqual(API_CHANNELS.map((c) => IPC_PREFIX + c).sort());
  });

  it('opens one 1280 × 800 window with context isolation, no node integration, a sandbox and web security, on the built page', () => {
    const w = h.windows[0];
    expect(w.options.width).toBe(1280);
    expect(w.options.height).toBe(800);
    const wp = w.options.webPreferences as Record<string, unknown>;
    expect(wp.contextIsolation).toBe(true);
    expect(wp.nodeIntegration).toBe(false);
    expect(wp.sandbox).toBe(true);
    expect(wp.webSecurity).toBe(true);
    expect(String(wp.preload)).toMatch(/out[\\/]preload[\\/]index\.cjs$/);
    expect(w.loaded).toBe(join(process.cwd(), 'out', 'renderer', 'index.html'));
  });

  it('answers a call from our window with the service reply', async () => {
    const r = await call('setup.example', good, { which: 'demo' });
    expect(r).toEqual({ ok: true, value: 'setup.example' });
    expect(h.serviceCalls.at(-1)).toEqual({ channel: 'setup.example', arg: { which: 'demo' } });
  });

  it('refuses a call from another web contents, a sub-frame or another page, without calling the service', async () => {
    const before = h.serviceCalls.length;
    const otherWindow = { sender: { id: good.sender.id + 1000, mainFrame: good.senderFrame }, senderFrame: good.senderFrame };
    const subFrame = { sender: good.sender, senderFrame: { url: pageUrl } };
    const otherPage = (() => {
      const f = { url: 'https://example.com/' };
      return { sender: { id: good.sender.id, mainFrame: f }, senderFrame: f };
    })();
    for (const ev of [otherWindow, subFrame, otherPage, { sender: good.sender, senderFrame: null }]) {
      const r = await call('app.info', ev);
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.problem.kind).toBe('invalid-request');
    }
    expect(h.serviceCalls.length).toBe(before);
  });

  it('refuses malformed arguments with an invalid-request problem naming the field', async () => {
    const before = h.serviceCalls.length;
    const cases: [string, unknown, RegExp][] = [
      ['setup.check', { setup: 5 }, /setup is number 5; expected an object/],
      ['setup.check', undefined, /expected an object/],
      ['setup.example', { which: 'other' }, /which is the text "other"; expected "demo" or "blank"/],
      ['frames.preview', { frames: [{ name: 'a.png', data: 'AAAA' }], darks: [], setup: {} }, /frames\[0\]\.data is the text "AAAA"; expected the bytes of a file/],
      ['jobs.status', { id: 7 }, /id is number 7; expected text/],
      ['logbook.measurement', { id: 1.5 }, /id is number 1.5; expected a whole number/],
      ['logbook.compare', { a: 1 }, /b is missing; expected a whole number/],
      ['app.info', { surprise: true }, /expected no argument/],
      ['jobs.startSimulate', { setup: {}, aberrationsWaves: { '4': 'lots' } }, /aberrationsWaves\.4 is the text "lots"; expected a finite number/],
    ];
    for (const [channel, arg, message] of cases) {
      const r = await call(channel, good, arg);
      expect(r.ok, channel).toBe(false);
      if (!r.ok) {
        expect(r.problem.kind).toBe('invalid-request');
        expect(r.problem.message).toMatch(message);
      }
    }
    const two = await call('setup.example', good, { which: 'demo' }, 'extra');
    expect(two.ok).toBe(false);
    expect(h.serviceCalls.length).toBe(before);
  });

  it('prints a logbook report to PDF in the desktop app', async () => {
    const r = await call('logbook.exportReport', good, { kind: 'measurement', ids: [1] });
    expect(r.ok).toBe(true);
    if (r.ok) {
      const v = r.value as { name: string; mime: string; data: Uint8Array };
      expect(v.mime).toBe('application/pdf');
      expect(v.name).toBe('shadowfront-measurement-1.pdf');
      expect(new TextDecoder().decode(v.data)).toMatch(/^%PDF/);
    }
  });

  it('loads nothing remote and grants no permission', () => {
    const decide = (url: string) => {
      let cancel: boolean | null = null;
      h.session.beforeRequest!({ url }, (r) => (cancel = r.cancel));
      return cancel;
    };
    expect(decide('https://example.com/x.js')).toBe(true);
    expect(decide('http://127.0.0.1:8080/')).toBe(true);
    expect(decide(`${pageUrl}`)).toBe(false);
    expect(decide('data:image/png;base64,AAAA')).toBe(false);
    let granted: boolean | null = null;
    h.session.permissionHandler!(null, 'media', (ok) => (granted = ok));
    expect(granted).toBe(false);
  });

  it('blocks navigation, new windows and webviews in every web contents', () => {
    const created = h.appListeners.get('web-contents-created') ?? [];
    expect(created.length).toBe(1);
    const events = new Map<string, (e: { preventDefault: () => void }) => void>();
    let openHandler: (() => { action: string }) | null = null;
    created[0]({}, { on: (ev: string, fn: (e: { preventDefault: () => void }) => void) => events.set(ev, fn), setWindowOpenHandler: (fn: () => { action: string }) => (openHandler = fn) });
    for (const ev of ['will-navigate', 'will-redirect', 'will-attach-webview']) {
      const e = { prevented: false, preventDefault() { this.prevented = true; } };
      events.get(ev)!(e);
      expect(e.prevented, ev).toBe(true);
    }
    expect(openHandler!()).toEqual({ action: 'deny' });
  });
});

describe('preload (stand-in electron module)', () => {
  it('exposes exactly the channels as window.shadowfront, each invoking its IPC channel', async () => {
    await import('../../app/preload/index.ts');
    expect(h.exposed.length).toBe(1);
    expect(h.exposed[0].key).toBe('shadowfront');
    const api = h.exposed[0].api as Record<string, Record<string, (arg?: unknown) => Promise<unknown>>>;
    const names = Object.entries(api).flatMap(([g, methods]) => Object.keys(methods).map((m) => `${g}.${m}`));
    expect(names.sort()).toEqual([...API_CHANNELS].sort());
    for (const [g, methods] of Object.entries(api)) for (const fn of Object.values(methods)) expect(typeof fn, g).toBe('function');
    const arg = { setup: { format: 'shadowfront-setup/1' } };
    await expect(api.setup.check(arg)).resolves.toEqual({ ok: true, value: 'from main' });
    expect(h.invoked.at(-1)).toEqual({ channel: `${IPC_PREFIX}setup.check`, arg });
    await api.app.info();
    expect(h.invoked.at(-1)).toEqual({ channel: `${IPC_PREFIX}app.info`, arg: undefined });
    expect(Object.isFrozen(api)).toBe(true);
  });
});
