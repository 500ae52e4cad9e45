/**
 * Launches Debian's Chromium for the end-to-end tests through playwright-core (which never downloads a
 * browser here). Flags as measured in the toolchain notes: headless, no sandbox (containers), no GPU, no
 * QUIC, and none of the browser's own background traffic. A fresh profile per run in `profileDir`.
 */
import { existsSync } from 'node:fs';
import { chromium } from 'playwright-core';
import type { BrowserContext } from 'playwright-core';

export const CHROMIUM_PATH = process.env.SHADOWFRONT_CHROMIUM ?? '/usr/bin/chromium';

export const CHROMIUM_ARGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

export function chromiumAvailable(): boolean {
  return existsSync(CHROMIUM_PATH);
}

/** A headless Chromium context with a 1280×800 window (the size the interface must be readable at). */
export async function launchChromium(profileDir: string, viewport = { width: 1280, height: 800 }): Promise<BrowserContext> {
  return chromium.launchPersistentContext(profileDir, {
    executablePath: CHROMIUM_PATH,
    headless: true,
    args: CHROMIUM_ARGS,
    viewport,
    deviceScaleFactor: 1,
  });
}
