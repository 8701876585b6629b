import { readFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { decodeBytes } from "@shared/ingest/read-delimited";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../../../fixtures/ingest");

/** A fixture export decoded the way the upload route will decode it. */
export function fixtureText(folder: string, file: string): string {
  return decodeBytes(readFileSync(path.join(ROOT, folder, file))).text;
}

/** A fixture's data.json. */
export function fixtureData<T = Record<string, unknown>>(folder: string): T {
  return JSON.parse(readFileSync(path.join(ROOT, folder, "data.json"), "utf8")) as T;
}
