/**
 * The Electron main process of the desktop app. It owns the files, the logbook and the job workers
 * (through app/services/appService.ts, the same service the local web mode uses) and one window:
 * context isolation on, node integration off, sandboxed renderer, web security on, nothing remote:
 * navigation away from our page, new windows, webviews and permission requests are refused, and any
 * request that is not for a local file is cancelled.
 *
 * The interface reaches the service only through the preload's `window.shadowfront` (app/preload) and
 * the IPC handlers (./ipc.ts), which check the sender and the argument (./validate.ts) of every call.
 * A logbook report is printed to PDF here (webContents.printToPDF on a hidden window).
 *
 * Data: app.getPath('userData'); on the first start the bundled synthetic demo logbook is copied there.
 * $SHADOWFRONT_DB names another logbook.
 */
import { app, BrowserWindow, ipcMain, session } from 'electron';
import { randomUUID } from 'node:crypto';
import { existsSync } from 'node:fs';
import { rm, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import type { ApiReply, ExportOutcome } from '../shared/contract.ts';
import { createAppService, type AppService } from '../services/appService.ts';
import { copyDemoLogbook } from '../services/app/demo.ts';
import { setSqlWasmPath } from '../services/logbook/sqlite.ts';
import { logToStderr } from '../services/app/problems.ts';
import { registerApiHandlers } from './ipc.ts';
import { SQL_WASM_PATH } from './sqlWasm.ts';

let mainWindow: BrowserWindow | null = null;
let service: AppService | null = null;

/** The project folder (holds package.json, out/ and resources/). */
function appRoot(): string {
  return app.getAppPath();
}

function rendererFile(): string {
  return join(appRoot(), 'out', 'renderer', 'index.html');
}

/** Only local files (our page, its scripts and pictures), data:/blob: pictures and the developer tools. */
export function isAllowedRequestUrl(url: string): boolean {
  return /^(file|data|blob|devtools|chrome-extension):/i.test(url);
}

function lockDown(): void {
  const ses = session.defaultSession;
  ses.setPermissionRequestHandler((_wc, _permission, callback) => callback(false));
  ses.setPermissionCheckHandler(() => false);
  ses.webRequest.onBeforeRequest((details, callback) => callback({ cancel: !isAllowedRequestUrl(details.url) }));
  app.on('web-contents-created', (_event, contents) => {
    contents.on('will-navigate', (event) => event.preventDefault());
    contents.on('will-redirect', (event) => event.preventDefault());
    contents.on('will-attach-webview', (event) => event.preventDefault());
    contents.setWindowOpenHandler(() => ({ action: 'deny' }));
  });
}

/** Print an HTML report to PDF on a hidden window (no scripts, sandboxed), from a temporary file. */
async function htmlToPdf(html: Uint8Array): Promise<Uint8Array> {
  const file = join(app.getPath('temp'), `shadowfront-report-${randomUUID()}.html`);
  await writeFile(file, html);
  const win = new BrowserWindow({
    show: false,
    webPreferences: { sandbox: true, contextIsolation: true, nodeIntegration: false, javascript: false, webSecurity: true },
  });
  try {
    await win.loadFile(file);
    const pdf = await win.webContents.printToPDF({ printBackground: true, pageSize: 'A4' });
    return new Uint8Array(pdf);
  } finally {
    win.destroy();
    await rm(file, { force: true });
  }
}

async function reportToPdf(reply: ApiReply<unknown>): Promise<ApiReply<unknown>> {
  if (!reply.ok) return reply;
  const out = reply.value as ExportOutcome;
  if (out.mime !== 'text/html') return reply;
  try {
    const data = await htmlToPdf(out.data);
    return { ok: true, value: { name: out.name.replace(/\.html?$/i, '') + '.pdf', mime: 'application/pdf', data } satisfies ExportOutcome };
  } catch (err) {
    logToStderr(err);
    return { ok: false, problem: { kind: 'export', message: `The report could not be printed to PDF (${(err as Error).message}).` } };
  }
}

function createWindow(): BrowserWindow {
  const win = new BrowserWindow({
    width: 1280,
    height: 800,
    minWidth: 1024,
    minHeight: 700,
    show: false,
    title: 'Shadowfront',
    backgroundColor: '#1e1f22',
    webPreferences: {
      preload: join(appRoot(), 'out', 'preload', 'index.cjs'),
      contextIsolation: true,
      nodeIntegration: false,
      nodeIntegrationInWorker: false,
      sandbox: true,
      webSecurity: true,
      allowRunningInsecureContent: false,
      experimentalFeatures: false,
      navigateOnDragDrop: false,
      webviewTag: false,
      spellcheck: false,
    },
  });
  win.once('ready-to-show', () => win.show());
  win.on('closed', () => {
    if (mainWindow === win) mainWindow = null;
  });
  void win.loadFile(rendererFile());
  return win;
}

export async function startMain(): Promise<void> {
  app.enableSandbox();
  if (!app.requestSingleInstanceLock()) {
    app.quit();
    return;
  }
  app.on('second-instance', () => {
    if (mainWindow) {
      if (mainWindow.isMinimized()) mainWindow.restore();
      mainWindow.focus();
    }
  });
  await app.whenReady();
  lockDown();
  setSqlWasmPath(SQL_WASM_PATH);
  const dataDir = app.getPath('userData');
  const resourcesDir = join(appRoot(), 'resources');
  let logbookPath = process.env.SHADOWFRONT_DB;
  let demo = false;
  if (!logbookPath) {
    const dir = join(dataDir, 'logbook');
    const first = !existsSync(join(dir, 'shadowfront-logbook.sqlite'));
    try {
      logbookPath = copyDemoLogbook(resourcesDir, dir);
      demo = first || existsSync(join(dataDir, 'demo-logbook'));
      if (first) await writeFile(join(dataDir, 'demo-logbook'), 'The logbook in ./logbook started as a copy of the bundled synthetic demo.\n');
    } catch (err) {
      logToStderr(err);
      logbookPath = join(dir, 'shadowfront-logbook.sqlite');
    }
  }
  service = createAppService({
    dataDir,
    logbookPath,
    demo,
    shell: 'electron',
    resourcesDir,
    workerEntry: join(appRoot(), 'out', 'main', 'jobWorker.js'),
    prewarm: true,
  });
  registerApiHandlers(
    ipcMain,
    service,
    { webContentsId: () => mainWindow?.webContents.id ?? null, pageUrl: pathToFileURL(rendererFile()).href },
    { transforms: { 'logbook.exportReport': reportToPdf }, log: logToStderr },
  );
  mainWindow = createWindow();
  app.on('activate', () => {
    if (!mainWindow) mainWindow = createWindow();
  });
  app.on('window-all-closed', () => app.quit());
  app.on('will-quit', (event) => {
    if (service) {
      const s = service;
      service = null;
      event.preventDefault();
      void s.close().finally(() => app.quit());
    }
  });
}

void startMain().catch((err) => {
  logToStderr(err);
  app.quit();
});
