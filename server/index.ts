import { mkdirSync, readdirSync, statSync } from "node:fs";
import http from "node:http";
import type { AddressInfo } from "node:net";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { inArray } from "drizzle-orm";
import { createApp } from "./app";
import { openDb } from "./db/client";
import { runMigrations } from "./db/migrate";
import { DEMO_PEOPLE, seedDemo } from "./db/seed";
import { users } from "./db/schema";
import { readEnv, type Env } from "./env";
import { createMailer } from "./mail/mailer";
import { countUsers } from "./services/users";
import { sweepOrphanFiles } from "./services/orphans";
import { seedLargeForDemo } from "./db/seed-large";

/** The repository root (this file is server/index.ts). */
const ROOT = fileURLToPath(new URL("..", import.meta.url));

export interface StartOptions {
  /** "build" (default): build the client when dist/ is missing or stale and serve it; "skip": API only (tests, `npm run dev`). */
  client?: "build" | "skip";
  /** Where the start-up lines go (default console.log). */
  log?: (line: string) => void;
  /** Repository root holding src/, index.html, public/, vite.config.ts and dist/ (default: the one this file is in). */
  root?: string;
}

export interface RunningServer {
  /** The address to open, e.g. http://localhost:3000 (PUBLIC_URL when set). */
  url: string;
  close(): Promise<void>;
}

function newestMtimeMs(target: string): number {
  let st;
  try {
    st = statSync(target);
  } catch {
    return 0;
  }
  if (!st.isDirectory()) return st.mtimeMs;
  let newest = st.mtimeMs;
  for (const name of readdirSync(target)) newest = Math.max(newest, newestMtimeMs(path.join(target, name)));
  return newest;
}

/**
 * Whether the built client is missing or older than any of its inputs (src/, index.html, public/, vite.config.ts).
 * @param root repository root
 */
export function clientBuildIsStale(root: string): boolean {
  const built = newestMtimeMs(path.join(root, "dist", "index.html"));
  if (built === 0) return true;
  const inputs = ["src", "index.html", "public", "vite.config.ts"].map((p) => newestMtimeMs(path.join(root, p)));
  return Math.max(...inputs) > built;
}

function listen(server: http.Server, port: number, host: string): Promise<AddressInfo> {
  return new Promise((resolve, reject) => {
    server.once("error", reject);
    server.listen(port, host, () => {
      server.off("error", reject);
      resolve(server.address() as AddressInfo);
    });
  });
}

/**
 * Starts Thetafold: builds the client if needed, opens DATA_DIR/thetafold.db, applies migrations, seeds the
 * demo lab into an empty database (unless SEED=none), starts the mailer (the built-in fake SMTP outbox when
 * SMTP_URL is unset), and listens on HOST:PORT (PORT 0 picks a free port).
 * @param env checked environment (default: process.env through readEnv)
 * @param options client build/serve, log sink, repository root
 * @returns the URL and a close() that stops the listener, the mailer and the database
 */
export async function startServer(env: Env = readEnv(), options: StartOptions = {}): Promise<RunningServer> {
  const log = options.log ?? ((line: string) => console.log(line));
  const root = options.root ?? ROOT;
  let clientDir: string | undefined;
  if ((options.client ?? "build") === "build") {
    if (clientBuildIsStale(root)) {
      log("Building the client (dist/ is missing or older than its sources)…");
      const { build } = await import("vite");
      await build({ root, logLevel: "warn" });
    }
    clientDir = path.join(root, "dist");
  }

  const dataDir = path.resolve(env.DATA_DIR);
  mkdirSync(path.join(dataDir, "files"), { recursive: true });
  const db = openDb(path.join(dataDir, "thetafold.db"));
  const cleanup: (() => Promise<void> | void)[] = [
    () => {
      db.$client.close();
    },
  ];
  try {
    runMigrations(db);
    sweepOrphanFiles(db, dataDir, log);
    if (env.SEED !== "none" && countUsers(db) === 0) {
      const demo = await seedDemo(db, { password: env.DEMO_PASSWORD });
      log(`Seeded the demo lab into ${path.join(dataDir, "thetafold.db")}`);
      if (env.SEED === "large") log(seedLargeForDemo(db, dataDir, demo.userIds));
    }
    const mailer = await createMailer({ smtpUrl: env.SMTP_URL, from: env.MAIL_FROM, db });
    cleanup.unshift(() => mailer.close());

    // Listen first, so that with PORT=0 the real port is known before the app (and its Origin check) is made.
    const server = http.createServer();
    const address = await listen(server, env.PORT, env.HOST);
    cleanup.unshift(
      () =>
        new Promise<void>((resolve) => {
          server.close(() => resolve());
          server.closeAllConnections();
        }),
    );
    const url = (env.PUBLIC_URL ?? `http://localhost:${address.port}`).replace(/\/+$/, "");
    const app = createApp({
      db,
      dataDir,
      mailer,
      publicUrl: url,
      secureCookies: url.startsWith("https:"),
      clientDir,
      // Without PUBLIC_URL the app is reached as localhost or 127.0.0.1; both are this same origin in practice.
      extraOrigins: env.PUBLIC_URL ? [] : [`http://127.0.0.1:${address.port}`],
    });
    server.on("request", app);

    log(
      clientDir
        ? `Thetafold is running at ${url}`
        : `Thetafold API is listening on http://${env.HOST}:${address.port} (no client served; public URL ${url})`,
    );
    const demo = db
      .select({ email: users.email })
      .from(users)
      .where(inArray(users.email, DEMO_PEOPLE.map((p) => p.email)))
      .all();
    if (demo.length > 0) {
      log(`Demo sign-ins (password "${env.DEMO_PASSWORD}" unless it was changed since):`);
      for (const p of DEMO_PEOPLE.filter((p) => demo.some((d) => d.email === p.email))) {
        log(`  ${p.email.padEnd(24)} ${p.role}${p.isSiteAdmin ? ", site administrator" : ""}`);
      }
    } else if (countUsers(db) === 0) {
      log(`No accounts yet: open ${url} to create the first one (it becomes site administrator).`);
    }
    log(
      mailer.fake
        ? `Mail goes to ${mailer.description}; site administrators read it on the Outbox page.`
        : `Mail goes to the ${mailer.description}.`,
    );

    let closed: Promise<void> | undefined;
    return {
      url,
      close() {
        closed ??= (async () => {
          for (const step of cleanup) await step();
        })();
        return closed;
      },
    };
  } catch (err) {
    for (const step of cleanup) await step();
    throw err;
  }
}

const runDirectly = process.argv[1] !== undefined && import.meta.url === pathToFileURL(path.resolve(process.argv[1])).href;

if (runDirectly) {
  const apiOnly = process.argv.includes("--api-only");
  startServer(readEnv(), { client: apiOnly ? "skip" : "build" }).then(
    (running) => {
      let stopping = false;
      const stop = (signal: NodeJS.Signals) => {
        if (stopping) return;
        stopping = true;
        console.log(`${signal}: shutting down`);
        running.close().then(
          () => process.exit(0),
          (err: unknown) => {
            console.error(err);
            process.exit(1);
          },
        );
      };
      process.on("SIGINT", stop);
      process.on("SIGTERM", stop);
    },
    (err: unknown) => {
      console.error(err instanceof Error ? err.message : err);
      process.exit(1);
    },
  );
}
