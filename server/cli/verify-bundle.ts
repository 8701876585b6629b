import { readFileSync, statSync } from "node:fs";
import { NotAZipError, verifyBagZip } from "../services/bagit";
import { processIo, type CommandIo } from "./args";

export const VERIFY_BUNDLE_USAGE = `Usage: thetafold verify-bundle FILE.zip

Checks a zipped BagIt 1.0 bag (RFC 8493), such as a Thetafold dataset bundle: bagit.txt, every line of
every payload and tag manifest, that every payload file is listed, and Payload-Oxum. Prints a JSON
report on stdout naming each file that fails.
Exit status: 0 valid, 1 invalid, 2 bad input (no such file, not a zip).
`;

/** Most bytes read into memory for one check (a bundle is at most a few hundred MB). */
const MAX_ZIP_BYTES = 2 * 1024 ** 3;

/**
 * `thetafold verify-bundle FILE.zip`.
 * @param args the arguments after the command name
 * @param io output sinks: stdout gets the JSON report, stderr usage and read errors (tests capture them)
 * @returns the exit status: 0 valid, 1 invalid, 2 bad input
 */
export async function verifyBundleCommand(args: readonly string[], io: CommandIo = processIo): Promise<number> {
  if (args.includes("--help") || args.includes("-h")) {
    io.stdout(VERIFY_BUNDLE_USAGE);
    return 0;
  }
  const files = args.filter((a) => !a.startsWith("-"));
  const unknown = args.filter((a) => a.startsWith("-"));
  if (files.length !== 1 || unknown.length > 0) {
    io.stderr(`${unknown.length ? `Unknown option ${unknown[0]}\n` : "Give exactly one zip file\n"}${VERIFY_BUNDLE_USAGE}`);
    return 2;
  }
  const file = files[0];
  let bytes: Buffer;
  try {
    const st = statSync(file);
    if (!st.isFile()) throw new Error("not a regular file");
    if (st.size > MAX_ZIP_BYTES) throw new Error(`larger than ${MAX_ZIP_BYTES} bytes`);
    bytes = readFileSync(file);
  } catch (err) {
    io.stderr(`Cannot read ${file}: ${(err as Error).message}\n`);
    return 2;
  }
  try {
    const report = verifyBagZip(bytes);
    io.stdout(`${JSON.stringify({ file, ...report }, null, 2)}\n`);
    return report.valid ? 0 : 1;
  } catch (err) {
    if (err instanceof NotAZipError) {
      io.stderr(`${file}: ${err.message}\n`);
      return 2;
    }
    throw err;
  }
}
