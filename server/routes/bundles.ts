import { createReadStream } from "node:fs";
import { pipeline } from "node:stream/promises";
import { Router, type Response } from "express";
import { BundleParams, CreateBundleBody, CreateShareLinkBody, ShareLinkParams, type BundleStreamLine } from "@shared/schemas/bundles";
import type { AppContext } from "../context";
import { HttpError } from "../http-error";
import { labGuards } from "../middleware/lab-access";
import { buildBundle, bundleDownload, getBundle, listBundles, planBundle, type VerifiedBundleFile } from "../services/bundles";
import { createShareLink, revokeShareLink } from "../services/share-links";

/**
 * Streams a verified zip with its length and SHA-256 (RFC 9530 Repr-Digest) as an attachment.
 * @param res the response
 * @param file from bundleDownload or claimSharedDownload
 */
export async function sendZip(res: Response, file: VerifiedBundleFile): Promise<void> {
  res.status(200);
  res.setHeader("Content-Type", "application/zip");
  res.setHeader("Content-Length", String(file.sizeBytes));
  res.setHeader("Content-Disposition", `attachment; filename="${file.fileName}"`);
  res.setHeader("Repr-Digest", `sha-256=:${Buffer.from(file.sha256, "hex").toString("base64")}:`);
  res.setHeader("Cache-Control", "private, no-store");
  await pipeline(createReadStream(file.filePath), res);
}

/** Dataset bundles: researchers and leads build them and make share links; guests list and download. */
export function bundlesRouter(ctx: AppContext): Router {
  const router = Router();
  const guard = labGuards(ctx.db);

  router.get("/labs/:labId/bundles", guard.read, (_req, res) => {
    res.json(listBundles(ctx.db, res.locals.labId!, res.locals.role!));
  });

  // A client that asks for NDJSON gets progress lines while the bag is hashed and written, then the
  // bundle. The selection is checked first, so refusals (404, 422) still come as ordinary errors.
  router.post("/labs/:labId/bundles", guard.write, async (req, res) => {
    const body = CreateBundleBody.parse(req.body);
    const plan = planBundle(ctx.db, res.locals.labId!, res.locals.user!.id, body);
    if (!(req.get("accept") ?? "").includes("application/x-ndjson")) {
      res.status(201).json(await buildBundle(ctx, plan));
      return;
    }
    res.status(201).type("application/x-ndjson");
    res.setHeader("Cache-Control", "no-store");
    const write = (line: BundleStreamLine) => res.write(`${JSON.stringify(line)}\n`);
    try {
      let last = 0;
      const bundle = await buildBundle(ctx, plan, (p) => {
        // At most one line per 50 ms while writing, plus every phase change and the last step.
        const now = Date.now();
        if (p.phase === "writing" && p.done < p.total && now - last < 50) return;
        last = now;
        write(p);
      });
      write({ type: "result", bundle });
    } catch (err) {
      const e = err instanceof HttpError ? err : new HttpError(500, "INTERNAL", "Something went wrong on the server; the error was logged");
      if (!(err instanceof HttpError)) console.error(`[error] bundle build ${req.originalUrl}`, err);
      write({ type: "error", error: { code: e.code, message: e.message } });
    }
    res.end();
  });

  router.get("/labs/:labId/bundles/:bundleId", guard.read, (req, res) => {
    const params = BundleParams.parse(req.params);
    res.json(getBundle(ctx.db, params.labId, params.bundleId, res.locals.role!));
  });

  router.get("/labs/:labId/bundles/:bundleId/download", guard.read, async (req, res) => {
    const params = BundleParams.parse(req.params);
    await sendZip(res, await bundleDownload(ctx.db, ctx.dataDir, params.labId, params.bundleId));
  });

  router.post("/labs/:labId/bundles/:bundleId/links", guard.write, async (req, res) => {
    const params = BundleParams.parse(req.params);
    const body = CreateShareLinkBody.parse(req.body ?? {});
    res.status(201).json(await createShareLink(ctx, params.labId, params.bundleId, res.locals.user!.id, body));
  });

  router.delete("/labs/:labId/bundles/:bundleId/links/:linkId", guard.write, (req, res) => {
    const params = ShareLinkParams.parse(req.params);
    revokeShareLink(ctx.db, params.labId, params.bundleId, params.linkId, res.locals.user!.id);
    res.status(204).end();
  });

  return router;
}
