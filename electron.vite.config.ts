/**
 * Build of the desktop app and of the interface (electron-vite): `npm run build` → out/.
 *
 *   out/main/index.js       Electron main process (app/main/index.ts)
 *   out/main/jobWorker.js   the job worker thread (app/services/app/jobWorker.ts)
 *   out/main/fieldWorker.js a helper thread that computes parts of model grids (app/services/threads/fieldWorker.ts)
 *   out/main/serve.js       the local web mode's command (app/cli/commands/serve.ts), which `npm start`
 *                           runs where Electron is missing: bundled, it starts in a fraction of the time
 *                           the sources take through tsx (mathjs is cut down to the unit part)
 *   out/preload/index.cjs   preload script (app/preload/index.ts); CommonJS, as a sandboxed preload must be
 *   out/renderer/           the interface (app/renderer, React); the local web mode serves it too
 *
 * The CLI runs from source through tsx; `shadowfront serve` too (it then needs only out/renderer).
 *
 * Main process notes (see ../shared/notes/toolchain.md):
 *  - sql.js is bundled into main (not externalised) so that `sql.js/dist/sql-wasm.wasm?asset` gives the
 *    copied wasm file's path at run time (app/main/sqlWasm.ts); other packages load from node_modules.
 *  - Modules that find files beside themselves with `new URL(…, import.meta.url)` (package.json, resources/,
 *    the logbook's wasm fallback) would look beside the bundle instead; the plugin below makes such an
 *    `import.meta.url` point at the module's place in the source tree, counted from the bundle's folder
 *    (out/main → the project root). Every main output file is kept directly in out/main for that.
 */
import { relative, resolve, sep } from 'node:path';
import { fileURLToPath } from 'node:url';
import { defineConfig } from 'electron-vite';
import react from '@vitejs/plugin-react';
import type { Plugin } from 'vite';

const root = fileURLToPath(new URL('.', import.meta.url));

function sourceLocations(): Plugin {
  return {
    name: 'shadowfront-source-locations',
    enforce: 'pre',
    transform(code, id) {
      const file = id.split('?')[0];
      if (!file.startsWith(root) || file.includes(`${sep}node_modules${sep}`) || !/\.(ts|mts|js|mjs)$/.test(file)) return null;
      if (!code.includes('import.meta.url')) return null;
      const rel = relative(root, file).split(sep).join('/');
      const where = `new URL(${JSON.stringify(rel)}, new URL('../../', import.meta.url)).href`;
      return { code: code.split('import.meta.url').join(`(${where})`), map: null };
    },
  };
}

export default defineConfig({
  main: {
    plugins: [sourceLocations()],
    // Lets the bundled code pick the bundled job worker (app/services/app/jobs.ts defaultWorkerEntry).
    define: { __SHADOWFRONT_BUNDLED__: 'true' },
    build: {
      outDir: resolve(root, 'out/main'),
      externalizeDeps: { exclude: ['sql.js', 'mathjs'] },
      rollupOptions: {
        input: {
          index: resolve(root, 'app/main/index.ts'),
          jobWorker: resolve(root, 'app/services/app/jobWorker.ts'),
          fieldWorker: resolve(root, 'app/services/threads/fieldWorker.ts'),
          serve: resolve(root, 'app/cli/commands/serve.ts'),
        },
        output: { entryFileNames: '[name].js', chunkFileNames: '[name]-[hash].js' },
      },
    },
  },
  preload: {
    build: {
      outDir: resolve(root, 'out/preload'),
      rollupOptions: {
        input: { index: resolve(root, 'app/preload/index.ts') },
        output: { format: 'cjs', entryFileNames: '[name].cjs' },
      },
    },
  },
  renderer: {
    root: resolve(root, 'app/renderer'),
    base: './',
    plugins: [react()],
    build: {
      outDir: resolve(root, 'out/renderer'),
      emptyOutDir: true,
      rollupOptions: { input: resolve(root, 'app/renderer/index.html') },
    },
  },
});
