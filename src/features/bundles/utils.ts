import { humanSize } from "@shared/format/byte-size";
import type { ShareLinkStatus } from "@shared/schemas/bundles";

/** A size in SI units: "12.3 kB". */
export const sizeText = humanSize;

export const LINK_STATUS_WORDS: Record<ShareLinkStatus, string> = {
  active: "Active",
  expired: "Expired",
  revoked: "Revoked",
  "used-up": "Download limit reached",
};

/** Local date and time, e.g. "1 Dec 2026, 14:05". */
export function dateTimeText(iso: string): string {
  return new Date(iso).toLocaleString(undefined, { dateStyle: "medium", timeStyle: "short" });
}

/** What a build step is doing, in words. */
export function phaseWords(phase: "collecting" | "hashing" | "writing" | "storing"): string {
  return {
    collecting: "Collecting samples, runs and fits",
    hashing: "Computing SHA-256 of every file",
    writing: "Writing the zip",
    storing: "Storing the bundle",
  }[phase];
}
