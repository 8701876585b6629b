import { spawn } from "node:child_process";
import { fileURLToPath } from "node:url";
import { createServer } from "vite";
import { readEnv } from "./env";

/*
 * `npm run dev`: the API (server/index.ts --api-only under `node --watch`, restarting on any server change)
 * and Vite's dev server with hot reload, whose /api proxy (vite.config.ts) points at the API's PORT.
 * Open the Vite address: e-mailed links and the Origin check use it as the public URL.
 */

const ROOT = fileURLToPath(new URL("..", import.meta.url));
const VITE_PORT = 5173;

const env = readEnv();
const publicUrl = env.PUBLIC_URL ?? `http://localhost:${VITE_PORT}`;

const api = spawn(process.execPath, ["--watch", "--import", "tsx", "server/index.ts", "--api-only"], {
  cwd: ROOT,
  stdio: "inherit",
  env: { ...process.env, PUBLIC_URL: publicUrl },
});

const vite = await createServer({ root: ROOT, server: { port: VITE_PORT, strictPort: true } });
await vite.listen();
console.log(`Vite dev server: ${publicUrl} (API on http://127.0.0.1:${env.PORT}, proxied under /api)`);

let stopping = false;
async function stop(code: number): Promise<void> {
  if (stopping) return;
  stopping = true;
  api.kill("SIGTERM");
  await vite.close();
  process.exit(code);
}
process.on("SIGINT", () => void stop(0));
process.on("SIGTERM", () => void stop(0));
api.on("exit", (code) => {
  if (!stopping) {
    console.error(`The API process ended (exit code ${code}); stopping the dev server.`);
    void stop(code ?? 1);
  }
});
