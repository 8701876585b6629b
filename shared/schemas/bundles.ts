import { z } from "zod";
import { LabParams } from "./labs";

/*
 * Dataset bundles (BagIt 1.0 bags in a zip) and their share links. Sizes in bytes, times ISO 8601.
 */

const Id = z.string().min(1).max(64);
const IdArray = z.array(Id).max(1000, "At most 1,000 at once").default([]);

/** POST /api/labs/:labId/bundles. At least one list or the comparison must choose something. */
export const CreateBundleBody = z.object({
  name: z.string().trim().min(1, "Name the bundle").max(120, "Use at most 120 characters"),
  sampleIds: IdArray,
  runIds: IdArray,
  fitIds: IdArray,
  comparisonId: Id.nullable().optional(),
});
export type CreateBundleBody = z.input<typeof CreateBundleBody>;
export type CreateBundleInput = z.infer<typeof CreateBundleBody>;

export const BundleParams = LabParams.extend({ bundleId: Id });
export const ShareLinkParams = BundleParams.extend({ linkId: Id });
/** The token part of a share URL. Anything that does not look like one is answered like an unknown token. */
export const SharedTokenParams = z.object({ token: z.string() });

export const ShareLinkStatusSchema = z.enum(["active", "expired", "revoked", "used-up"]);
export type ShareLinkStatus = z.infer<typeof ShareLinkStatusSchema>;

/** A share link as the lab sees it (never the token: only its SHA-256 is stored). */
export const ShareLinkSchema = z.object({
  id: z.string(),
  bundleId: z.string(),
  status: ShareLinkStatusSchema,
  createdAt: z.string(),
  expiresAt: z.string(),
  maxDownloads: z.number().int().nullable(),
  downloadCount: z.number().int(),
  emailTo: z.string().nullable(),
  revokedAt: z.string().nullable(),
  createdByName: z.string().nullable(),
});
export type ShareLink = z.infer<typeof ShareLinkSchema>;

/** Defaults of a new share link (the issue: 14 days). */
export const SHARE_LINK_DEFAULT_DAYS = 14;

/** POST …/bundles/:bundleId/links */
export const CreateShareLinkBody = z.object({
  expiresInDays: z
    .number({ error: "Give the days until the link expires" })
    .int("Whole days")
    .min(1, "At least 1 day")
    .max(365, "At most 365 days")
    .default(SHARE_LINK_DEFAULT_DAYS),
  maxDownloads: z.number().int("A whole number").min(1, "At least 1 download").max(100_000).nullable().optional(),
  emailTo: z.email("Enter an e-mail address").max(254).nullable().optional(),
});
export type CreateShareLinkBody = z.input<typeof CreateShareLinkBody>;

/** The 201 answer: the link with its URL, shown this once. */
export const CreatedShareLinkSchema = ShareLinkSchema.extend({
  url: z.string(),
  /** True when the e-mail was handed to the mail server; false when none was asked for or sending failed. */
  emailed: z.boolean(),
  /** Why the e-mail could not be sent (the link itself was made and works). */
  emailError: z.string().nullable(),
});
export type CreatedShareLink = z.infer<typeof CreatedShareLinkSchema>;

export const BundleFileSchema = z.object({ path: z.string(), bytes: z.number().int() });

/** A stored bundle. */
export const BundleSchema = z.object({
  id: z.string(),
  name: z.string(),
  /** SHA-256 of the zip as stored; checked again on every download. */
  fileSha256: z.string(),
  sizeBytes: z.number().int(),
  /** SHA-256 of manifest-sha256.txt: equal for equal inputs. */
  payloadManifestSha256: z.string(),
  selection: z.object({
    sampleIds: z.array(z.string()),
    runIds: z.array(z.string()),
    fitIds: z.array(z.string()),
    comparisonId: z.string().nullable(),
    comparisonName: z.string().nullable(),
  }),
  counts: z.object({ samples: z.number().int(), runs: z.number().int(), fits: z.number().int() }),
  /** Payload files (under data/) with their sizes. */
  contents: z.array(BundleFileSchema),
  createdBy: z.object({ id: z.string(), displayName: z.string() }).nullable(),
  createdAt: z.string(),
  downloadUrl: z.string(),
  /** Share links of this bundle; empty for guests, who may not see or make them. */
  links: z.array(ShareLinkSchema),
});
export type Bundle = z.infer<typeof BundleSchema>;
export const BundleListSchema = z.array(BundleSchema);

/** Lines of POST …/bundles with `Accept: application/x-ndjson`: progress, then the bundle or an error. */
export const BundleStreamLineSchema = z.discriminatedUnion("type", [
  z.object({
    type: z.literal("progress"),
    phase: z.enum(["collecting", "hashing", "writing", "storing"]),
    done: z.number().int(),
    total: z.number().int(),
    label: z.string(),
  }),
  z.object({ type: z.literal("result"), bundle: BundleSchema }),
  z.object({ type: z.literal("error"), error: z.object({ code: z.string(), message: z.string() }) }),
]);
export type BundleStreamLine = z.infer<typeof BundleStreamLineSchema>;

export const BagFailureSchema = z.object({ path: z.string(), problem: z.string() });
export type BagFailure = z.infer<typeof BagFailureSchema>;

/** What `thetafold verify-bundle` prints (JSON on stdout). */
export const BagVerifyReportSchema = z.object({
  valid: z.boolean(),
  /** Name of the bag's base folder inside the zip ("" when the bag sits at the top). */
  bagDirectory: z.string().nullable(),
  bagitVersion: z.string().nullable(),
  algorithms: z.array(z.string()),
  payloadFiles: z.number().int(),
  payloadBytes: z.number().int(),
  tagFiles: z.number().int(),
  payloadOxum: z.object({ declared: z.string(), actual: z.string(), matches: z.boolean() }).nullable(),
  failures: z.array(BagFailureSchema),
});
export type BagVerifyReport = z.infer<typeof BagVerifyReportSchema>;
