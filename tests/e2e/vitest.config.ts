import { fileURLToPath, URL } from "node:url";
import { defineConfig } from "vitest/config";

const root = fileURLToPath(new URL("../..", import.meta.url));

/** Browser tests: one real server (built client, demo seed, fake SMTP) for the run, Debian chromium driven by playwright-core. */
export default defineConfig({
  root,
  resolve: {
    alias: {
      "@": fileURLToPath(new URL("../../src", import.meta.url)),
      "@shared": fileURLToPath(new URL("../../shared", import.meta.url)),
    },
  },
  test: {
    include: ["tests/e2e/**/*.e2e.ts"],
    environment: "node",
    globalSetup: ["tests/e2e/global-setup.ts"],
    // One server and one database: files run one after another so stories do not trip over each other's data.
    fileParallelism: false,
    // Generous: a shared 2-core machine under load runs a five-page axe scan in about 40 s.
    testTimeout: 120_000,
    // The first run may build the client (about 5 s here, more on a cold CI machine).
    hookTimeout: 180_000,
  },
});
