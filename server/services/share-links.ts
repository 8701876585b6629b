import { createHash, randomBytes, randomUUID } from "node:crypto";
import { and, desc, eq, inArray, isNull, lt, or, sql } from "drizzle-orm";
import type { CreateShareLinkBody, CreatedShareLink, ShareLink, ShareLinkStatus } from "@shared/schemas/bundles";
import type { Mailer } from "../context";
import type { Db } from "../db/client";
import { bundles, labs, shareLinks, users } from "../db/schema";
import { HttpError, notFound } from "../http-error";
import { audit } from "./audit";
import { verifiedBundleFile, type VerifiedBundleFile } from "./bundles";

/*
 * Share links: a random token (32 bytes from the OS CSPRNG, base64url, 43 characters) that lets anyone
 * holding it download one bundle without an account, until it expires, is revoked or reaches its
 * download limit. Only the token's SHA-256 is stored, so a copy of the database does not give working
 * links; the URL is shown once, when the link is made.
 */

/** Bytes of randomness in a token (256 bits; OWASP asks for at least 128). */
export const SHARE_TOKEN_BYTES = 32;

/** The one message for every share link that does not answer, so a caller learns nothing about why. */
export const SHARE_LINK_UNAVAILABLE = "This share link does not work: it may be mistyped, expired, revoked or used up";

const DAY_MS = 86_400_000;

/** SHA-256 (hex) of a token as stored. */
export function hashShareToken(token: string): string {
  return createHash("sha256").update(token, "utf8").digest("hex");
}

type LinkRow = typeof shareLinks.$inferSelect & { createdByName: string | null };

function statusOf(r: typeof shareLinks.$inferSelect, now: number): ShareLinkStatus {
  if (r.revokedAt != null) return "revoked";
  if (r.expiresAt <= now) return "expired";
  if (r.maxDownloads != null && r.downloadCount >= r.maxDownloads) return "used-up";
  return "active";
}

function toLink(r: LinkRow, now = Date.now()): ShareLink {
  return {
    id: r.id,
    bundleId: r.bundleId,
    status: statusOf(r, now),
    createdAt: new Date(r.createdAt).toISOString(),
    expiresAt: new Date(r.expiresAt).toISOString(),
    maxDownloads: r.maxDownloads,
    downloadCount: r.downloadCount,
    emailTo: r.emailTo,
    revokedAt: r.revokedAt == null ? null : new Date(r.revokedAt).toISOString(),
    createdByName: r.createdByName,
  };
}

function selectLinks(db: Db) {
  return db
    .select({
      id: shareLinks.id,
      bundleId: shareLinks.bundleId,
      tokenHash: shareLinks.tokenHash,
      expiresAt: shareLinks.expiresAt,
      maxDownloads: shareLinks.maxDownloads,
      downloadCount: shareLinks.downloadCount,
      emailTo: shareLinks.emailTo,
      revokedAt: shareLinks.revokedAt,
      createdBy: shareLinks.createdBy,
      createdAt: shareLinks.createdAt,
      createdByName: users.displayName,
    })
    .from(shareLinks)
    .leftJoin(users, eq(users.id, shareLinks.createdBy));
}

/**
 * Share links of some bundles, newest first, grouped by bundle.
 * @param db the database
 * @param bundleIds the bundles (the caller has checked they are the lab's)
 */
export function listLinksFor(db: Db, bundleIds: readonly string[]): Map<string, ShareLink[]> {
  const out = new Map<string, ShareLink[]>();
  if (bundleIds.length === 0) return out;
  const now = Date.now();
  for (const r of selectLinks(db)
    .where(inArray(shareLinks.bundleId, [...bundleIds]))
    .orderBy(desc(shareLinks.createdAt), desc(shareLinks.id))
    .all()) {
    const list = out.get(r.bundleId) ?? [];
    list.push(toLink(r, now));
    out.set(r.bundleId, list);
  }
  return out;
}

function bundleOfLab(db: Db, labId: string, bundleId: string) {
  const b = db.select().from(bundles).where(and(eq(bundles.labId, labId), eq(bundles.id, bundleId))).get();
  if (!b) throw notFound("No such bundle in this lab");
  return b;
}

/**
 * Makes a share link for a bundle and, when asked, e-mails it. The link is stored before the mail is
 * tried, so a mail failure loses nothing: the answer says so and still carries the URL.
 * @param deps database, mailer and the public origin for the URL
 * @param labId the lab
 * @param bundleId the bundle
 * @param userId who makes the link
 * @param body expiry in days, optional download limit and recipient
 * @returns the link with its URL (shown this once) and whether the e-mail went out
 * @throws HttpError 404 when the bundle is not this lab's
 */
export async function createShareLink(
  deps: { db: Db; mailer: Mailer; publicUrl: string },
  labId: string,
  bundleId: string,
  userId: string,
  body: { expiresInDays: number; maxDownloads?: number | null; emailTo?: string | null },
): Promise<CreatedShareLink> {
  const { db } = deps;
  const bundle = bundleOfLab(db, labId, bundleId);
  const token = randomBytes(SHARE_TOKEN_BYTES).toString("base64url");
  const id = randomUUID();
  const now = Date.now();
  const expiresAt = now + body.expiresInDays * DAY_MS;
  db.transaction((tx) => {
    tx.insert(shareLinks)
      .values({
        id,
        bundleId,
        tokenHash: hashShareToken(token),
        expiresAt,
        maxDownloads: body.maxDownloads ?? null,
        emailTo: body.emailTo ?? null,
        createdBy: userId,
        createdAt: now,
      })
      .run();
    audit(tx as unknown as Db, {
      labId,
      userId,
      action: "share_link.created",
      target: bundle.name,
      details: { bundleId, linkId: id, expiresAt: new Date(expiresAt).toISOString(), maxDownloads: body.maxDownloads ?? null, emailTo: body.emailTo ?? null },
    });
  });
  const url = `${deps.publicUrl.replace(/\/+$/, "")}/api/shared/${token}`;
  let emailed = false;
  let emailError: string | null = null;
  if (body.emailTo) {
    const lab = db.select({ name: labs.name }).from(labs).where(eq(labs.id, labId)).get();
    const sender = db.select({ displayName: users.displayName, email: users.email }).from(users).where(eq(users.id, userId)).get();
    const limit = body.maxDownloads ? `It can be used for ${body.maxDownloads} download${body.maxDownloads > 1 ? "s" : ""}.` : "";
    try {
      await deps.mailer.send({
        to: body.emailTo,
        subject: `Dataset bundle shared with you: ${bundle.name}`,
        text:
          `${sender?.displayName ?? "A member"} (${sender?.email ?? ""}) of ${lab?.name ?? "a lab"} shares the dataset bundle "${bundle.name}" with you.\n\n` +
          `Download it (no account needed):\n${url}\n\n` +
          `The link works until ${new Date(expiresAt).toUTCString()}. ${limit}\n\n` +
          "The zip is a BagIt bag: its manifest lists the SHA-256 of every file, and data/README.txt explains the tables, units and methods.\n" +
          "These are research data, not certified property data for engineering design.\n",
      });
      emailed = true;
    } catch (err) {
      emailError = "The link was made, but the e-mail could not be sent; copy the link and send it yourself";
      console.error(`[mail] share link ${id} to ${body.emailTo} failed`, err);
    }
  }
  const row = selectLinks(db).where(eq(shareLinks.id, id)).get()!;
  return { ...toLink(row), url, emailed, emailError };
}

/**
 * Revokes a share link; from then on it answers 410. Revoking twice is harmless.
 * @throws HttpError 404 when the link is not one of this lab's bundle's links
 */
export function revokeShareLink(db: Db, labId: string, bundleId: string, linkId: string, userId: string): void {
  const bundle = bundleOfLab(db, labId, bundleId);
  const link = db.select().from(shareLinks).where(and(eq(shareLinks.id, linkId), eq(shareLinks.bundleId, bundleId))).get();
  if (!link) throw notFound("No such share link for this bundle");
  if (link.revokedAt != null) return;
  db.transaction((tx) => {
    tx.update(shareLinks).set({ revokedAt: Date.now() }).where(eq(shareLinks.id, linkId)).run();
    audit(tx as unknown as Db, { labId, userId, action: "share_link.revoked", target: bundle.name, details: { bundleId, linkId } });
  });
}

/**
 * Resolves a share token to its bundle's zip, checks the zip's hash and counts the download.
 * The count is taken in one conditional UPDATE, so two requests racing for the last allowed download
 * cannot both win.
 * @param db the database
 * @param dataDir DATA_DIR
 * @param token the token from the URL
 * @returns the verified file to stream
 * @throws HttpError 404 for an unknown token, 410 for an expired, revoked or used-up one (one message
 *   for all); 500 when the stored zip fails its hash check (the download is then not counted)
 */
export async function claimSharedDownload(db: Db, dataDir: string, token: string): Promise<VerifiedBundleFile> {
  const unknown = () => new HttpError(404, "NOT_FOUND", SHARE_LINK_UNAVAILABLE);
  const gone = () => new HttpError(410, "GONE", SHARE_LINK_UNAVAILABLE);
  if (!/^[A-Za-z0-9_-]{20,200}$/.test(token)) throw unknown();
  const link = db.select().from(shareLinks).where(eq(shareLinks.tokenHash, hashShareToken(token))).get();
  if (!link) throw unknown();
  const now = Date.now();
  if (statusOf(link, now) !== "active") throw gone();
  const bundle = db.select().from(bundles).where(eq(bundles.id, link.bundleId)).get();
  if (!bundle) throw unknown();
  const file = await verifiedBundleFile(db, dataDir, bundle, "share-link");
  const claimed = db
    .update(shareLinks)
    .set({ downloadCount: sql`${shareLinks.downloadCount} + 1` })
    .where(
      and(
        eq(shareLinks.id, link.id),
        isNull(shareLinks.revokedAt),
        sql`${shareLinks.expiresAt} > ${now}`,
        or(isNull(shareLinks.maxDownloads), lt(shareLinks.downloadCount, shareLinks.maxDownloads)),
      ),
    )
    .run();
  if (claimed.changes === 0) throw gone();
  audit(db, {
    labId: bundle.labId,
    userId: null,
    action: "share_link.downloaded",
    target: bundle.name,
    details: { bundleId: bundle.id, linkId: link.id, download: link.downloadCount + 1 },
  });
  return file;
}
