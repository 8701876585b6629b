import { mkdirSync, mkdtempSync, rmSync, utimesSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { MeSchema } from "@shared/schemas/auth";
import { openDb } from "../../server/db/client";
import { labs, users } from "../../server/db/schema";
import { readEnv } from "../../server/env";
import { clientBuildIsStale, startServer } from "../../server/index";

const dirs: string[] = [];
function tempDir(): string {
  const dir = mkdtempSync(path.join(tmpdir(), "thetafold-start-"));
  dirs.push(dir);
  return dir;
}
afterAll(() => {
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

const env = (dataDir: string, extra: Record<string, string> = {}) =>
  readEnv({ PORT: "0", HOST: "127.0.0.1", DATA_DIR: dataDir, DEMO_PASSWORD: "demo password for tests", ...extra });

/** The loopback address of a started server (its printed URL says localhost). */
const loopback = (url: string) => `http://127.0.0.1:${new URL(url).port}`;

describe("startServer", () => {
  it("migrates, seeds the demo lab once, answers /api/health, and the demo sign-in works; a second start does not seed again", async () => {
    const dataDir = tempDir();
    const lines: string[] = [];
    const first = await startServer(env(dataDir), { client: "skip", log: (l) => lines.push(l) });
    try {
      const base = loopback(first.url);
      const health = await fetch(`${base}/api/health`);
      expect(await health.json()).toEqual({ status: "ok" });
      const signIn = await fetch(`${base}/api/auth/sign-in`, {
        method: "POST",
        headers: { "Content-Type": "application/json" },
        body: JSON.stringify({ email: "lead@example.org", password: "demo password for tests" }),
      });
      expect(signIn.status).toBe(200);
      const me = MeSchema.parse(await signIn.json());
      expect(me.user.isSiteAdmin).toBe(true);
      expect(me.memberships[0]?.labName).toMatch(/demo/i);
      const setup = await (await fetch(`${base}/api/setup`)).json();
      expect(setup).toEqual({ needsSetup: false, fakeMail: true });
    } finally {
      await first.close();
    }
    expect(lines.some((l) => l.startsWith("Seeded the demo lab"))).toBe(true);
    for (const email of ["lead@example.org", "researcher@example.org", "guest@example.org"]) {
      expect(lines.some((l) => l.includes(email))).toBe(true);
    }
    expect(lines.some((l) => l.includes("demo password for tests"))).toBe(true);
    expect(lines.some((l) => /outbox/i.test(l))).toBe(true);

    const again: string[] = [];
    const second = await startServer(env(dataDir), { client: "skip", log: (l) => again.push(l) });
    await second.close();
    expect(again.some((l) => l.startsWith("Seeded"))).toBe(false);
    const db = openDb(path.join(dataDir, "thetafold.db"));
    try {
      expect(db.select().from(users).all()).toHaveLength(3);
      expect(db.select().from(labs).all()).toHaveLength(1);
    } finally {
      db.$client.close();
    }
  });

  it("with SEED=none starts empty and says how to make the first account", async () => {
    const dataDir = tempDir();
    const lines: string[] = [];
    const running = await startServer(env(dataDir, { SEED: "none" }), { client: "skip", log: (l) => lines.push(l) });
    try {
      const setup = await (await fetch(`${loopback(running.url)}/api/setup`)).json();
      expect(setup).toEqual({ needsSetup: true, fakeMail: true });
    } finally {
      await running.close();
    }
    expect(lines.some((l) => l.includes("No accounts yet"))).toBe(true);
  });

  it("stops listening after close()", async () => {
    const running = await startServer(env(tempDir()), { client: "skip", log: () => {} });
    const base = loopback(running.url);
    await running.close();
    await expect(fetch(`${base}/api/health`)).rejects.toThrow();
  });
});

describe("clientBuildIsStale", () => {
  it("is true without dist/index.html, false when it is newer than every input, true once an input is newer", () => {
    const root = tempDir();
    mkdirSync(path.join(root, "src", "features"), { recursive: true });
    mkdirSync(path.join(root, "public"));
    writeFileSync(path.join(root, "index.html"), "<!doctype html>");
    writeFileSync(path.join(root, "src", "features", "a.tsx"), "export {}");
    writeFileSync(path.join(root, "public", "favicon.svg"), "<svg/>");
    writeFileSync(path.join(root, "vite.config.ts"), "export default {}");
    expect(clientBuildIsStale(root)).toBe(true);

    const t0 = new Date("2026-01-01T00:00:00Z");
    const t1 = new Date("2026-01-02T00:00:00Z");
    for (const p of ["index.html", "src/features/a.tsx", "src/features", "src", "public/favicon.svg", "public", "vite.config.ts"]) {
      utimesSync(path.join(root, p), t0, t0);
    }
    mkdirSync(path.join(root, "dist"));
    writeFileSync(path.join(root, "dist", "index.html"), "<!doctype html>");
    utimesSync(path.join(root, "dist", "index.html"), t1, t1);
    expect(clientBuildIsStale(root)).toBe(false);

    const t2 = new Date("2026-01-03T00:00:00Z");
    utimesSync(path.join(root, "src", "features", "a.tsx"), t2, t2);
    expect(clientBuildIsStale(root)).toBe(true);
  });
});
