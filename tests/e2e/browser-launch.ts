import path from "node:path";
import { chromium, type Browser } from "playwright-core";

/** Debian's chromium; override with CHROMIUM_PATH. Never `npx playwright install` (downloads are blocked). */
export const CHROMIUM_PATH = process.env.CHROMIUM_PATH ?? "/usr/bin/chromium";

/** Launches headless chromium with the flags this machine needs (no sandbox as root, no GPU, no network chatter). */
export function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: CHROMIUM_PATH,
    headless: true,
    args: [
      "--no-sandbox",
      "--disable-gpu",
      "--disable-quic",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
    ],
  });
}

export const RESULTS_DIR = path.resolve(process.cwd(), "test-results");
