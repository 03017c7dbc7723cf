import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { DEMO_USERS } from '../../server/db/seed.js';

export const CHROMIUM = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';
/** Locally a missing browser skips the browser tests; in CI it is a failure. */
export const browserAvailable = fs.existsSync(CHROMIUM) || process.env.CI === 'true';

export const ARTIFACTS = path.resolve('tests/artifacts');

export const TABLET_LANDSCAPE = { width: 1024, height: 768 };
export const TABLET_PORTRAIT = { width: 768, height: 1024 };

export const demoUser = (role: 'admin' | 'practitioner' | 'coordinator') => DEMO_USERS.find((u) => u.role === role)!;

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const { port } = srv.address() as net.AddressInfo;
      srv.close(() => resolve(port));
    });
  });
}

export interface RunningApp {
  url: string;
  dataDir: string;
  output: () => string;
  stop(): Promise<void>;
  /** Ends the process with SIGKILL (a crash: no shutdown code runs) and keeps its data directory. */
  crash(): Promise<void>;
}

/** Starts the real server (`tsx server/index.ts`) on free ports with a temporary data dir and the demo clinic. */
export async function startServer(env: Record<string, string> = {}, opts: { dataDir?: string } = {}): Promise<RunningApp> {
  const dataDir = opts.dataDir ?? fs.mkdtempSync(path.join(os.tmpdir(), 'twinframe-e2e-'));
  const [port, s3, smtp] = [await freePort(), await freePort(), await freePort()];
  let log = '';
  const child: ChildProcess = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    env: { ...process.env, PORT: String(port), TWINFRAME_DATA_DIR: dataDir, S3_FAKE_PORT: String(s3), SMTP_FAKE_PORT: String(smtp), TWINFRAME_DEMO: '1', TWINFRAME_DEMO_PHOTOS: '0', LOG_LEVEL: 'warn', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout!.on('data', (d) => (log += d));
  child.stderr!.on('data', (d) => (log += d));
  const url = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 180_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`server exited early (${child.exitCode}):\n${log}`);
    try {
      const res = await fetch(`${url}/api/health`);
      if (res.ok) break;
    } catch {
      /* not listening yet */
    }
    if (Date.now() > deadline) throw new Error(`server did not start in time:\n${log}`);
    await new Promise((r) => setTimeout(r, 250));
  }
  return {
    url,
    dataDir,
    output: () => log,
    async crash() {
      if (child.exitCode !== null || child.signalCode) return;
      const exited = new Promise((resolve) => child.once('exit', resolve));
      child.kill('SIGKILL');
      await exited;
    },
    async stop() {
      if (child.exitCode === null) {
        child.kill('SIGTERM');
        await new Promise<void>((resolve) => {
          const t = setTimeout(() => {
            child.kill('SIGKILL');
            resolve();
          }, 5000);
          child.once('exit', () => {
            clearTimeout(t);
            resolve();
          });
        });
      }
      fs.rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

export async function launchBrowser(extraArgs: string[] = []): Promise<Browser> {
  // launch() gives each browser a fresh temporary profile of its own.
  return chromium.launch({
    executablePath: CHROMIUM,
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--no-first-run',
      ...extraArgs,
    ],
  });
}

export async function newTabletPage(browser: Browser, viewport = TABLET_LANDSCAPE): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ viewport, deviceScaleFactor: 1, hasTouch: true, locale: 'en-GB', timezoneId: 'Europe/London' });
  const page = await context.newPage();
  return { context, page };
}

export async function signIn(page: Page, baseUrl: string, email: string, password: string): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

export async function screenshot(page: Page, name: string): Promise<string> {
  fs.mkdirSync(ARTIFACTS, { recursive: true });
  const file = path.join(ARTIFACTS, `${name}.png`);
  await page.screenshot({ path: file, fullPage: false });
  return file;
}

/** A JSON call from inside the signed-in page, with the CSRF token the app would send. */
export async function pageApi<T>(page: Page, method: string, url: string, body?: unknown): Promise<{ status: number; body: T }> {
  return page.evaluate(
    async ({ method, url, body }) => {
      const csrf = (await (await fetch('/api/auth/csrf')).json()).token as string;
      const res = await fetch(url, { method, headers: { 'Content-Type': 'application/json', 'X-CSRF-Token': csrf }, body: body === undefined ? undefined : JSON.stringify(body) });
      return { status: res.status, body: res.status === 204 ? null : await res.json() };
    },
    { method, url, body },
  ) as Promise<{ status: number; body: T }>;
}
