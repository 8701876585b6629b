import { createHash } from "node:crypto";
import { createReadStream, createWriteStream } from "node:fs";
import { Transform } from "node:stream";
import { pipeline } from "node:stream/promises";
import { unzipSync } from "fflate";
import type { BagVerifyReport, BagFailure } from "@shared/schemas/bundles";
import { humanSize } from "@shared/format/byte-size";

/*
 * BagIt 1.0 (RFC 8493, https://www.rfc-editor.org/rfc/rfc8493) bags serialised as zip.
 *
 * Writing: every payload file is hashed first (SHA-256), then the tag files are made (bagit.txt,
 * bag-info.txt, manifest-sha256.txt, tagmanifest-sha256.txt) and everything is streamed into a zip with
 * archiver's ZipArchive: one top-level folder named after the bag (RFC 8493 §4.2), files in a fixed order,
 * every entry dated with the same given time and mode 0644, so the same inputs give the same payload and,
 * on the same Bagging-Date, the same zip bytes.
 *
 * Checking reads the zip with fflate (a different library than the writer) and applies RFC 8493 §3:
 * complete (every payload file in every payload manifest, every listed file present) and valid (every
 * checksum matches), plus the Payload-Oxum of bag-info.txt (§2.2.2).
 */

/** bagit.txt exactly as RFC 8493 §2.1.1 gives it for version 1.0, UTF-8 tag files, LF line ends. */
export const BAGIT_TXT = "BagIt-Version: 1.0\nTag-File-Character-Encoding: UTF-8\n";

/** A payload file: bytes in memory, or a file on disk (raw uploads are streamed, never loaded whole). */
export type PayloadSource = { path: string; content: Buffer } | { path: string; filePath: string; expectedSha256?: string };

/** A payload file after hashing. */
export interface HashedEntry {
  /** Path inside the bag, e.g. "data/README.txt" (always starts with "data/"). */
  path: string;
  sha256: string;
  bytes: number;
}

/**
 * Percent-encodes the characters RFC 8493 §2.1.3 requires in manifest file paths: CR, LF and "%".
 * @param p the path inside the bag
 */
export function encodeManifestPath(p: string): string {
  return p.replace(/%/g, "%25").replace(/\n/g, "%0A").replace(/\r/g, "%0D");
}

/** Reverses encodeManifestPath (only %0A, %0D and %25 are decoded, as RFC 8493 §2.1.3 says). */
export function decodeManifestPath(p: string): string {
  return p.replace(/%0A/gi, "\n").replace(/%0D/gi, "\r").replace(/%25/g, "%");
}

/** Byte-order comparison of two paths (the manifest and zip order; independent of locale). */
export function comparePaths(a: string, b: string): number {
  const ba = Buffer.from(a, "utf8");
  const bb = Buffer.from(b, "utf8");
  return Buffer.compare(ba, bb);
}

/**
 * Manifest text, one "checksum path" line per file (RFC 8493 §2.1.3), sorted by path in byte order.
 * @param entries files with their lowercase hex SHA-256
 * @returns the file text, each line ending in LF
 */
export function manifestText(entries: readonly { path: string; sha256: string }[]): string {
  return [...entries]
    .sort((a, b) => comparePaths(a.path, b.path))
    .map((e) => `${e.sha256}  ${encodeManifestPath(e.path)}\n`)
    .join("");
}

/**
 * Payload-Oxum "OctetCount.StreamCount" (RFC 8493 §2.2.2): total payload bytes and number of payload files.
 * @param entries the payload files
 */
export function payloadOxum(entries: readonly { bytes: number }[]): string {
  return `${entries.reduce((a, e) => a + e.bytes, 0)}.${entries.length}`;
}


/**
 * bag-info.txt from label–value pairs in the given order (RFC 8493 §2.2.2). Line breaks inside a value
 * become spaces, so every element is one line.
 * @param fields [label, value] pairs; labels must not contain ":" or white space at either end
 * @throws Error on a bad label
 */
export function bagInfoText(fields: readonly (readonly [string, string])[]): string {
  return fields
    .map(([label, value]) => {
      if (!/^[^:\s](?:[^:]*[^:\s])?$/.test(label)) throw new Error(`bad bag-info label: ${label}`);
      return `${label}: ${value.replace(/[\r\n]+/g, " ").trim()}\n`;
    })
    .join("");
}

function sha256Of(buf: Buffer | Uint8Array): string {
  return createHash("sha256").update(buf).digest("hex");
}

async function hashFile(filePath: string): Promise<{ sha256: string; bytes: number }> {
  const h = createHash("sha256");
  let bytes = 0;
  for await (const chunk of createReadStream(filePath)) {
    h.update(chunk as Buffer);
    bytes += (chunk as Buffer).byteLength;
  }
  return { sha256: h.digest("hex"), bytes };
}

/** Progress of a bag build: phase, and files (or bytes) done of total. */
export interface BagProgress {
  phase: "hashing" | "writing";
  done: number;
  total: number;
  label: string;
}

/** What writeBagZip produced. */
export interface WrittenBag {
  sha256: string;
  sizeBytes: number;
  payload: HashedEntry[];
  /** Text of manifest-sha256.txt (equal for equal payloads). */
  manifest: string;
  manifestSha256: string;
  oxum: string;
}

/**
 * Writes a BagIt 1.0 bag as a zip file.
 * @param outPath where the zip goes (the caller renames it into the file store)
 * @param bagName the bag's base folder inside the zip (letters, digits, ".", "_", "-")
 * @param payload payload files; paths must start with "data/" and be unique
 * @param bagInfo bag-info.txt elements without Payload-Oxum and Bag-Size (added here, last)
 * @param entryDate the time stamped on every zip entry (fixed for reproducible output)
 * @param onProgress called as files are hashed and written
 * @returns hash and size of the zip, the payload list and the manifest
 * @throws Error when a path is outside data/ or repeated, or a disk file's SHA-256 differs from expectedSha256
 * @see RFC 8493 §2 (structure) and §4.2 (serialisation)
 */
export async function writeBagZip(
  outPath: string,
  bagName: string,
  payload: readonly PayloadSource[],
  bagInfo: readonly (readonly [string, string])[],
  entryDate: Date,
  onProgress: (p: BagProgress) => void = () => {},
): Promise<WrittenBag> {
  if (!/^[A-Za-z0-9._-]{1,100}$/.test(bagName)) throw new Error(`bad bag name: ${bagName}`);
  const seen = new Set<string>();
  for (const p of payload) {
    if (!p.path.startsWith("data/") || p.path.split("/").some((s) => s === "" || s === "." || s === "..")) {
      throw new Error(`payload path outside data/: ${p.path}`);
    }
    if (seen.has(p.path)) throw new Error(`payload path repeated: ${p.path}`);
    seen.add(p.path);
  }
  const ordered = [...payload].sort((a, b) => comparePaths(a.path, b.path));
  const hashed: HashedEntry[] = [];
  for (const [i, p] of ordered.entries()) {
    onProgress({ phase: "hashing", done: i, total: ordered.length, label: p.path });
    if ("content" in p) {
      hashed.push({ path: p.path, sha256: sha256Of(p.content), bytes: p.content.byteLength });
    } else {
      const h = await hashFile(p.filePath);
      if (p.expectedSha256 && h.sha256 !== p.expectedSha256) {
        throw new Error(`stored file ${p.filePath} has SHA-256 ${h.sha256}, expected ${p.expectedSha256}`);
      }
      hashed.push({ path: p.path, ...h });
    }
  }
  onProgress({ phase: "hashing", done: ordered.length, total: ordered.length, label: "" });

  const manifest = manifestText(hashed);
  const oxum = payloadOxum(hashed);
  const tagBase = Buffer.byteLength(BAGIT_TXT) + Buffer.byteLength(manifest);
  const payloadBytes = hashed.reduce((a, e) => a + e.bytes, 0);
  const info = bagInfoText([...bagInfo, ["Payload-Oxum", oxum], ["Bag-Size", humanSize(payloadBytes + tagBase)]]);
  const tagFiles: [string, string][] = [
    ["bagit.txt", BAGIT_TXT],
    ["bag-info.txt", info],
    ["manifest-sha256.txt", manifest],
  ];
  const tagManifest = manifestText(tagFiles.map(([path, text]) => ({ path, sha256: sha256Of(Buffer.from(text, "utf8")) })));
  tagFiles.push(["tagmanifest-sha256.txt", tagManifest]);

  // Loaded on first use: archiver is a large import that only bundle building needs (server start-up stays short).
  const { ZipArchive } = await import("archiver");
  const zip = new ZipArchive({ zlib: { level: 9 } });
  const zipHash = createHash("sha256");
  let zipBytes = 0;
  const tee = new Transform({
    transform(chunk: Buffer, _enc, cb) {
      zipHash.update(chunk);
      zipBytes += chunk.byteLength;
      cb(null, chunk);
    },
  });
  const done = pipeline(zip, tee, createWriteStream(outPath));
  const totalEntries = tagFiles.length + ordered.length;
  let written = 0;
  zip.on("entry", (e) => {
    written += 1;
    onProgress({ phase: "writing", done: written, total: totalEntries, label: e.name });
  });
  const entry = (name: string) => ({ name: `${bagName}/${name}`, date: entryDate, mode: 0o644 });
  for (const [name, text] of tagFiles) zip.append(Buffer.from(text, "utf8"), entry(name));
  for (const p of ordered) {
    if ("content" in p) zip.append(p.content, entry(p.path));
    else zip.append(createReadStream(p.filePath), entry(p.path));
  }
  await zip.finalize();
  await done;
  return {
    sha256: zipHash.digest("hex"),
    sizeBytes: zipBytes,
    payload: hashed,
    manifest,
    manifestSha256: sha256Of(Buffer.from(manifest, "utf8")),
    oxum,
  };
}

/** Thrown when the input cannot be read as a zip at all (CLI exit code 2). */
export class NotAZipError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "NotAZipError";
  }
}

const ALGORITHMS: Record<string, string> = { md5: "md5", sha1: "sha1", sha256: "sha256", sha512: "sha512" };

interface ParsedManifest {
  file: string;
  algorithm: string;
  entries: { path: string; checksum: string }[];
}

function parseManifest(file: string, algorithm: string, text: string, failures: BagFailure[]): ParsedManifest {
  const entries: { path: string; checksum: string }[] = [];
  text.split(/\r\n|\n|\r/).forEach((line, i) => {
    if (line === "") return;
    const m = /^([0-9A-Fa-f]+)[ \t]+(.+)$/.exec(line);
    if (!m) {
      failures.push({ path: file, problem: `line ${i + 1} is not "checksum path"` });
      return;
    }
    entries.push({ checksum: m[1].toLowerCase(), path: decodeManifestPath(m[2]) });
  });
  return { file, algorithm, entries };
}

function unsafePath(p: string): boolean {
  return p.startsWith("/") || /^[A-Za-z]:/.test(p) || p.split("/").some((s) => s === ".." || s === ".") || p.includes("\\");
}

/**
 * Checks a zipped BagIt bag by RFC 8493: bagit.txt, every payload and tag manifest line, completeness of
 * the payload manifests, and Payload-Oxum. Reads the zip with fflate.
 * @param zipBytes the whole zip file
 * @returns the report; `valid` is true only when nothing failed
 * @throws NotAZipError when the bytes are not a readable zip
 * @see RFC 8493 §3 (complete and valid bags), §2.1.3 (manifests), §2.2.1 (tag manifests), §2.2.2 (Payload-Oxum)
 */
export function verifyBagZip(zipBytes: Uint8Array): BagVerifyReport {
  let files: Record<string, Uint8Array>;
  try {
    files = unzipSync(zipBytes);
  } catch (err) {
    throw new NotAZipError(`not a readable zip file: ${(err as Error).message}`);
  }
  const failures: BagFailure[] = [];
  const names = Object.keys(files).filter((n) => !n.endsWith("/"));
  const candidates = names.filter((n) => n === "bagit.txt" || /^[^/]+\/bagit\.txt$/.test(n));
  const report: BagVerifyReport = {
    valid: false,
    bagDirectory: null,
    bagitVersion: null,
    algorithms: [],
    payloadFiles: 0,
    payloadBytes: 0,
    tagFiles: 0,
    payloadOxum: null,
    failures,
  };
  if (candidates.length !== 1) {
    failures.push({
      path: "bagit.txt",
      problem: candidates.length === 0 ? "no bagit.txt at the top of the zip or in its one top-level folder" : "more than one bag in the zip",
    });
    return report;
  }
  const base = candidates[0] === "bagit.txt" ? "" : candidates[0].slice(0, -"bagit.txt".length);
  report.bagDirectory = base === "" ? "" : base.slice(0, -1);
  const outside = names.filter((n) => !n.startsWith(base));
  for (const n of outside) failures.push({ path: n, problem: "file outside the bag's base folder" });
  const inBag = new Map<string, Uint8Array>();
  for (const n of names) if (n.startsWith(base)) inBag.set(n.slice(base.length), files[n]);
  const text = (p: string) => new TextDecoder("utf-8", { fatal: false }).decode(inBag.get(p));

  const bagit = text("bagit.txt");
  const version = /^BagIt-Version: ([0-9]+\.[0-9]+)\r?\n/.exec(bagit);
  const encoding = /\nTag-File-Character-Encoding: (\S+)\r?\n?$/.exec(bagit);
  if (!version || !encoding) {
    failures.push({ path: "bagit.txt", problem: "must hold exactly the lines BagIt-Version and Tag-File-Character-Encoding, in that order" });
  } else {
    report.bagitVersion = version[1];
    if (version[1] !== "1.0") failures.push({ path: "bagit.txt", problem: `BagIt-Version ${version[1]}; this checker knows 1.0` });
    if (encoding[1].toUpperCase() !== "UTF-8") failures.push({ path: "bagit.txt", problem: `tag files in ${encoding[1]}; expected UTF-8` });
  }

  const payloadPaths = [...inBag.keys()].filter((p) => p.startsWith("data/")).sort(comparePaths);
  if (!Object.keys(files).some((n) => n.startsWith(`${base}data/`))) {
    failures.push({ path: "data/", problem: "the payload folder data/ is missing" });
  }
  report.payloadFiles = payloadPaths.length;
  report.payloadBytes = payloadPaths.reduce((a, p) => a + inBag.get(p)!.byteLength, 0);

  const manifests: ParsedManifest[] = [];
  const tagManifests: ParsedManifest[] = [];
  for (const p of [...inBag.keys()].sort(comparePaths)) {
    const m = /^(tag)?manifest-([a-z0-9]+)\.txt$/.exec(p);
    if (!m) continue;
    if (!ALGORITHMS[m[2]]) {
      failures.push({ path: p, problem: `unknown checksum algorithm "${m[2]}"` });
      continue;
    }
    (m[1] ? tagManifests : manifests).push(parseManifest(p, m[2], text(p), failures));
  }
  report.algorithms = [...new Set(manifests.map((m) => m.algorithm))];
  report.tagFiles = [...inBag.keys()].filter((p) => !p.startsWith("data/")).length;
  if (manifests.length === 0) failures.push({ path: "manifest-sha256.txt", problem: "no payload manifest" });

  const digest = (alg: string, p: string) => createHash(ALGORITHMS[alg]).update(inBag.get(p)!).digest("hex");
  for (const m of manifests) {
    const listed = new Set<string>();
    for (const e of m.entries) {
      if (unsafePath(e.path) || !e.path.startsWith("data/")) {
        failures.push({ path: e.path, problem: `${m.file} lists a path outside data/` });
        continue;
      }
      if (listed.has(e.path)) failures.push({ path: e.path, problem: `listed twice in ${m.file}` });
      listed.add(e.path);
      if (!inBag.has(e.path)) failures.push({ path: e.path, problem: `listed in ${m.file} but missing from the bag` });
      else if (digest(m.algorithm, e.path) !== e.checksum) failures.push({ path: e.path, problem: `checksum does not match ${m.file}` });
    }
    for (const p of payloadPaths) if (!listed.has(p)) failures.push({ path: p, problem: `payload file not listed in ${m.file}` });
  }
  for (const m of tagManifests) {
    for (const e of m.entries) {
      if (unsafePath(e.path) || e.path.startsWith("data/")) {
        failures.push({ path: e.path, problem: `${m.file} lists a path that is not a tag file` });
        continue;
      }
      if (!inBag.has(e.path)) failures.push({ path: e.path, problem: `listed in ${m.file} but missing from the bag` });
      else if (digest(m.algorithm, e.path) !== e.checksum) failures.push({ path: e.path, problem: `checksum does not match ${m.file}` });
    }
  }

  if (inBag.has("fetch.txt") && text("fetch.txt").trim() !== "") {
    failures.push({ path: "fetch.txt", problem: "the bag fetches files from elsewhere; this checker needs every file inside the zip" });
  }

  if (inBag.has("bag-info.txt")) {
    const ox = /^Payload-Oxum:[ \t]*([0-9]+)\.([0-9]+)[ \t]*$/m.exec(text("bag-info.txt"));
    if (ox) {
      const declared = `${ox[1]}.${ox[2]}`;
      const actual = `${report.payloadBytes}.${report.payloadFiles}`;
      report.payloadOxum = { declared, actual, matches: declared === actual };
      if (declared !== actual) failures.push({ path: "bag-info.txt", problem: `Payload-Oxum ${declared} does not match the payload (${actual})` });
    }
  }
  report.valid = failures.length === 0;
  return report;
}
