/**
 * Build configuration for the desktop app (electron-vite). The app's processes live in app/main,
 * app/preload and app/renderer; until they land this file only declares the layout.
 * The CLI (app/cli) runs from source through tsx and needs no build.
 */
export default {
  main: { build: { outDir: 'out/main' } },
  preload: { build: { outDir: 'out/preload' } },
  renderer: { root: 'app/renderer', build: { outDir: 'out/renderer' } },
};
