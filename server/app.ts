import path from "node:path";
import express from "express";
import helmet from "helmet";
import { createLucia } from "./auth/lucia";
import type { AppContext, AppDeps } from "./context";
import { errorHandler } from "./error-handler";
import { HttpError } from "./http-error";
import { originCheck } from "./middleware/origin-check";
import { sessionMiddleware } from "./middleware/session";
import { healthRouter } from "./routes/health";
import { auditRouter } from "./routes/audit";
import { authRouter } from "./routes/auth";
import { invitationsRouter } from "./routes/invitations";
import { labsRouter } from "./routes/labs";
import { meRouter } from "./routes/me";
import { outboxRouter } from "./routes/outbox";
import { setupRouter } from "./routes/setup";
import { compareRouter } from "./routes/compare";
import { comparisonsRouter } from "./routes/comparisons";
import { batchesRouter } from "./routes/batches";
import { importPresetsRouter } from "./routes/import-presets";
import { runsRouter } from "./routes/runs";
import { fitsRouter } from "./routes/fits";
import { samplesRouter } from "./routes/samples";
import { bundlesRouter } from "./routes/bundles";
import { sharedRouter } from "./routes/shared";

/** Builds the Express app without listening (tests import it with an in-memory database). */
export function createApp(deps: AppDeps): express.Express {
  const ctx: AppContext = { ...deps, lucia: createLucia(deps.db, deps.secureCookies ?? false) };
  const app = express();
  app.disable("x-powered-by");
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: { "img-src": ["'self'", "data:", "blob:"], "upgrade-insecure-requests": null },
      },
    }),
  );
  app.use(originCheck([deps.publicUrl, ...(deps.extraOrigins ?? [])]));
  app.use(express.json({ limit: "1mb" }));
  app.use(sessionMiddleware(ctx.lucia));

  app.use("/api", healthRouter());
  // Feature routers, one line each (keep this list in the order of the API reference in DEVELOPERS.md).
  app.use("/api", setupRouter(ctx));
  app.use("/api", authRouter(ctx));
  app.use("/api", meRouter(ctx));
  app.use("/api", labsRouter(ctx));
  app.use("/api", invitationsRouter(ctx));
  app.use("/api", auditRouter(ctx));
  app.use("/api", outboxRouter(ctx));
  app.use("/api", batchesRouter(ctx));
  app.use("/api", samplesRouter(ctx));
  app.use("/api", runsRouter(ctx));
  app.use("/api", fitsRouter(ctx));
  app.use("/api", importPresetsRouter(ctx));
  app.use("/api", compareRouter(ctx));
  app.use("/api", comparisonsRouter(ctx));
  app.use("/api", bundlesRouter(ctx));
  app.use("/api", sharedRouter(ctx));

  app.use("/api", () => {
    throw new HttpError(404, "NOT_FOUND", "No such API route");
  });

  if (deps.clientDir) {
    const dir = deps.clientDir;
    app.use(express.static(dir, { index: false, maxAge: "1h" }));
    app.get("/{*splat}", (_req, res) => {
      res.sendFile(path.join(dir, "index.html"));
    });
  }
  app.use(errorHandler);
  return app;
}
