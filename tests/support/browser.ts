// Harness for browser journeys: Debian's chromium through playwright-core (headless, fresh profile per journey),
// the real app serving the built client on a loopback port, screenshots kept under .artifacts/screenshots/.
import fs from 'node:fs';
import fsp from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import type { AppContext } from '../../server/context.js';
import { startTestServer, type ConfigOverrides } from './app.js';

/** Debian's chromium (the test script installs the package when it is missing). */
export const CHROMIUM_PATH = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';

/**
 * Flags for a quiet, self-contained headless run: no sandbox (tests may run as root in a container),
 * no GPU, and nothing that phones home (background networking, component updates, sync, QUIC).
 */
export const CHROMIUM_ARGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
  '--disable-quic',
];

const ROOT = path.resolve(path.dirname(new URL(import.meta.url).pathname), '../..');
const SCREENSHOT_ROOT = path.join(ROOT, '.artifacts', 'screenshots');

export interface BrowserSession {
  context: BrowserContext;
  page: Page;
  /** Closes the browser and deletes its profile folder. */
  close(): Promise<void>;
}

/**
 * Starts chromium with its own temporary profile (--user-data-dir, through launchPersistentContext, which is
 * how playwright takes that flag), so no cookie or cache leaks between journeys.
 */
export async function launchBrowser(options: { width?: number; height?: number } = {}): Promise<BrowserSession> {
  if (!fs.existsSync(CHROMIUM_PATH)) throw new Error(`chromium not found at ${CHROMIUM_PATH}; install Debian's "chromium" package (npm test does).`);
  const profile = await fsp.mkdtemp(path.join(os.tmpdir(), 'thence-chromium-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM_PATH,
    headless: true,
    args: CHROMIUM_ARGS,
    viewport: { width: options.width ?? 1280, height: options.height ?? 860 },
    locale: 'en-GB',
    timezoneId: 'UTC',
  });
  context.setDefaultTimeout(15_000);
  const page = context.pages()[0] ?? (await context.newPage());
  // Browser-side errors are journey failures waiting to happen: show them in the test output.
  page.on('pageerror', (error) => console.error(`[browser] ${error.message}`));
  // Console errors include Content-Security-Policy refusals, which otherwise fail silently. Failed HTTP answers
  // are left out: journeys provoke 4xx answers on purpose and check what the page shows for them.
  page.on('console', (message) => {
    if (message.type() === 'error' && !message.text().startsWith('Failed to load resource')) console.error(`[browser console] ${message.text()}`);
  });
  return {
    context,
    page,
    close: async () => {
      await context.close().catch(() => undefined);
      await fsp.rm(profile, { recursive: true, force: true });
    },
  };
}

export interface RunningApp {
  /** http://127.0.0.1:PORT, also the app's PUBLIC_URL (so mail links and the OAuth callback point here). */
  url: string;
  ctx: AppContext;
  close(): Promise<void>;
}

/**
 * Serves the real app (createApp on a test context) with the built client from dist/ on 127.0.0.1, ephemeral port,
 * PUBLIC_URL naming that port (startTestServer in ./app.ts); refuses to start when the client is not built.
 */
export async function startApp(overrides: ConfigOverrides = {}): Promise<RunningApp> {
  const dist = path.join(ROOT, overrides.clientDist ?? 'dist');
  if (!fs.existsSync(path.join(dist, 'index.html'))) throw new Error(`The client is not built (${dist}/index.html missing); run \`npx vite build\` first (npm test does).`);
  const server = await startTestServer({ ...overrides, clientDist: dist });
  return { url: server.url, ctx: server.ctx, close: server.close };
}

/** Saves a full-page PNG as .artifacts/screenshots/<journey>/<step>.png and returns its path. */
export async function screenshot(page: Page, journey: string, step: string): Promise<string> {
  const dir = path.join(SCREENSHOT_ROOT, safeName(journey));
  await fsp.mkdir(dir, { recursive: true });
  const file = path.join(dir, `${safeName(step)}.png`);
  // Let web fonts and Element Plus transitions settle, so the picture shows what a person sees.
  await page.evaluate(() => document.fonts.ready).catch(() => undefined);
  await page.waitForTimeout(150);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}

/** Returns a numbered screenshot taker for one journey: shots('form') → 01-form.png, 02-… */
export function journeyShots(page: Page, journey: string): (step: string) => Promise<string> {
  let count = 0;
  return (step) => screenshot(page, journey, `${String(++count).padStart(2, '0')}-${step}`);
}

function safeName(text: string): string {
  return text.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '') || 'step';
}
