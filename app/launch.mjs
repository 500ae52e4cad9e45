#!/usr/bin/env node
// `npm start`: build the app when out/ is missing or older than the sources, then start the desktop app
// (Electron) where its binary is available; otherwise say so in one line and start the local web mode on
// a working copy of the bundled synthetic demo logbook ("shadowfront serve --demo"), printing its address.
//
// Options: --web  start the local web mode even where Electron is available;  --port <n>  its port.
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, readFileSync, readdirSync, statSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = dirname(dirname(fileURLToPath(import.meta.url)));
const args = process.argv.slice(2);

/** The newest modification time under the given files and folders (node_modules and out skipped). */
function newestSource(paths) {
  let newest = 0;
  const visit = (p) => {
    let s;
    try {
      s = statSync(p);
    } catch {
      return;
    }
    if (s.isDirectory()) {
      for (const name of readdirSync(p)) if (name !== 'node_modules' && !name.startsWith('.')) visit(join(p, name));
    } else if (s.mtimeMs > newest) newest = s.mtimeMs;
  };
  for (const p of paths) visit(join(root, p));
  return newest;
}

function oldestOutput(files) {
  let oldest = Infinity;
  for (const f of files) {
    const p = join(root, f);
    if (!existsSync(p)) return 0;
    oldest = Math.min(oldest, statSync(p).mtimeMs);
  }
  return oldest;
}

function buildIfNeeded() {
  const outputs = ['out/main/index.js', 'out/main/jobWorker.js', 'out/main/serve.js', 'out/preload/index.cjs', 'out/renderer/index.html'];
  const sources = ['app/main', 'app/preload', 'app/renderer', 'app/shared', 'app/services', 'app/web', 'app/cli', 'core', 'electron.vite.config.ts', 'package.json'];
  if (oldestOutput(outputs) > newestSource(sources)) return;
  process.stdout.write('Building Shadowfront (electron-vite build)…\n');
  const bin = join(root, 'node_modules', 'electron-vite', 'bin', 'electron-vite.js');
  const r = spawnSync(process.execPath, [bin, 'build'], { cwd: root, stdio: 'inherit' });
  if (r.status !== 0) {
    process.stderr.write('shadowfront: the build failed (see above); fix it and run "npm start" again.\n');
    process.exit(r.status ?? 1);
  }
}

/**
 * The Electron executable, or null when it is not available. Electron's package fetches its binary on
 * first use (require('electron')); that is tried once in a child process, quietly, and not under CI or
 * with SHADOWFRONT_NO_ELECTRON_FETCH=1, where it cannot work.
 */
async function electronBinary() {
  const req = createRequire(import.meta.url);
  let pkgDir;
  try {
    pkgDir = dirname(req.resolve('electron/package.json'));
  } catch {
    return null;
  }
  const pathFile = join(pkgDir, 'path.txt');
  if (existsSync(pathFile) && !process.env.ELECTRON_OVERRIDE_DIST_PATH) {
    const exe = join(pkgDir, 'dist', readFileSync(pathFile, 'utf8').trim());
    if (existsSync(exe)) return exe;
  }
  if (process.env.CI || process.env.SHADOWFRONT_NO_ELECTRON_FETCH) return null;
  return new Promise((done) => {
    const child = spawn(process.execPath, ['-e', "process.stdout.write(require('electron'))"], { cwd: root, stdio: ['ignore', 'pipe', 'pipe'] });
    let out = '';
    child.stdout.on('data', (c) => (out += c));
    child.stderr.resume();
    const slow = setTimeout(() => process.stdout.write("Fetching Electron's binary for its first start (once)…\n"), 5000);
    const limit = setTimeout(() => child.kill(), 300000);
    child.on('exit', (code) => {
      clearTimeout(slow);
      clearTimeout(limit);
      done(code === 0 && out && existsSync(out) ? out : null);
    });
  });
}

buildIfNeeded();
const electron = args.includes('--web') ? null : await electronBinary();
if (electron) {
  const child = spawn(electron, [root], { cwd: root, stdio: 'inherit' });
  const forward = (sig) => child.kill(sig);
  process.on('SIGINT', forward);
  process.on('SIGTERM', forward);
  child.on('exit', (code, signal) => process.exit(code ?? (signal ? 0 : 1)));
} else {
  if (!args.includes('--web')) process.stdout.write('Electron is not available here, so Shadowfront starts in its local web mode instead (open the address below in a browser).\n');
  const portAt = args.indexOf('--port');
  const serveArgs = ['--demo', ...(portAt >= 0 && args[portAt + 1] ? ['--port', args[portAt + 1]] : [])];
  // The built command (out/main/serve.js, made by the build above) starts much faster than the sources.
  const built = join(root, 'out', 'main', 'serve.js');
  if (existsSync(built)) {
    const { serveCommand } = await import(pathToFileURL(built).href);
    process.exitCode = await serveCommand(serveArgs);
  } else {
    const { register } = await import('tsx/esm/api');
    register();
    const { main } = await import('./cli/main.ts');
    process.exitCode = await main(['serve', ...serveArgs]);
  }
}
