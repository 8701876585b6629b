import { mkdtempSync, rmSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import path from "node:path";
import { readEnv } from "../../server/env";
import { startServer } from "../../server/index";

/** A port that was free a moment ago (asked of the OS), so PUBLIC_URL can name it before the server listens. */
function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = createServer();
    probe.once("error", reject);
    probe.listen(0, "127.0.0.1", () => {
      const address = probe.address();
      const port = typeof address === "object" && address ? address.port : 0;
      probe.close(() => resolve(port));
    });
  });
}

export interface E2eServer {
  url: string;
  demoPassword: string;
  /** What the server printed at start (demo sign-ins, mail destination). */
  log: string[];
  close(): Promise<void>;
}

/**
 * The real server, in this process: a fresh temporary DATA_DIR (seeded with the demo lab unless `seed: "none"`), the built-in fake SMTP
 * server, and the client built by vite when dist/ is missing or older than its sources.
 */
export async function startE2eServer(options: { seed?: "demo" | "none" } = {}): Promise<E2eServer> {
  const dataDir = mkdtempSync(path.join(tmpdir(), "thetafold-e2e-"));
  const demoPassword = process.env.DEMO_PASSWORD ?? "e2e-demo-password-2026";
  const port = await freePort();
  const source: NodeJS.ProcessEnv = {
    ...process.env,
    NODE_ENV: "test",
    HOST: "127.0.0.1",
    PORT: String(port),
    PUBLIC_URL: `http://127.0.0.1:${port}`,
    DATA_DIR: dataDir,
    SEED: options.seed ?? "demo",
    DEMO_PASSWORD: demoPassword,
  };
  delete source.SMTP_URL; // always the built-in fake SMTP server: the stories read its outbox
  const log: string[] = [];
  const server = await startServer(readEnv(source), { client: "build", log: (line) => log.push(line) });
  return {
    url: server.url,
    demoPassword,
    log,
    async close() {
      await server.close();
      rmSync(dataDir, { recursive: true, force: true });
    },
  };
}
