import { spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { strFromU8, strToU8, unzipSync, zipSync } from "fflate";
import { describe, expect, it } from "vitest";
import { BagVerifyReportSchema } from "@shared/schemas/bundles";
import { main } from "../../server/cli/main";
import { humanSize } from "@shared/format/byte-size";
import { verifyBundleCommand } from "../../server/cli/verify-bundle";
import {
  BAGIT_TXT,
  bagInfoText,
  decodeManifestPath,
  encodeManifestPath,
  manifestText,
  NotAZipError,
  payloadOxum,
  verifyBagZip,
  writeBagZip,
} from "../../server/services/bagit";

const sha256 = (b: Uint8Array | string) => createHash("sha256").update(b).digest("hex");
const dir = () => mkdtempSync(path.join(tmpdir(), "thetafold-bagit-"));

async function smallBag(payload: { path: string; text: string }[] = [
  { path: "data/a.txt", text: "alpha\n" },
  { path: "data/sub/b.csv", text: "T_K,cp\n2,0.1\n" },
]) {
  const out = path.join(dir(), "bag.zip");
  const w = await writeBagZip(
    out,
    "test-bag",
    payload.map((p) => ({ path: p.path, content: Buffer.from(p.text, "utf8") })),
    [["Source-Organization", "Synthetic Test Lab"]],
    new Date("2026-03-01T12:00:00Z"),
  );
  return { out, w, bytes: readFileSync(out) };
}

function capture() {
  const o = { out: "", err: "" };
  return { o, io: { stdout: (t: string) => (o.out += t), stderr: (t: string) => (o.err += t) } };
}

describe("BagIt text helpers (RFC 8493)", () => {
  it("writes bagit.txt as §2.1.1 gives it for version 1.0", () => {
    expect(BAGIT_TXT).toBe("BagIt-Version: 1.0\nTag-File-Character-Encoding: UTF-8\n");
  });

  it("percent-encodes only CR, LF and % in manifest paths (§2.1.3) and decodes them back", () => {
    expect(encodeManifestPath("data/100%\nfile\r.txt")).toBe("data/100%25%0Afile%0D.txt");
    expect(decodeManifestPath("data/100%25%0Afile%0D.txt")).toBe("data/100%\nfile\r.txt");
    expect(encodeManifestPath("data/plain name.txt")).toBe("data/plain name.txt");
    expect(decodeManifestPath("data/%41.txt")).toBe("data/%41.txt");
  });

  it("writes one 'checksum path' line per file, sorted by path in byte order (§2.1.3)", () => {
    const text = manifestText([
      { path: "data/b.txt", sha256: "b".repeat(64) },
      { path: "data/B.txt", sha256: "c".repeat(64) },
      { path: "data/a.txt", sha256: "a".repeat(64) },
    ]);
    expect(text).toBe(`${"c".repeat(64)}  data/B.txt\n${"a".repeat(64)}  data/a.txt\n${"b".repeat(64)}  data/b.txt\n`);
  });

  it("gives Payload-Oxum as octets.streams (§2.2.2)", () => {
    expect(payloadOxum([{ bytes: 10 }, { bytes: 32 }, { bytes: 0 }])).toBe("42.3");
    expect(payloadOxum([])).toBe("0.0");
  });

  it("writes bag-info.txt as 'Label: value' lines and refuses bad labels (§2.2.2)", () => {
    expect(bagInfoText([["Source-Organization", "Lab"], ["External-Description", "two\nlines"]])).toBe(
      "Source-Organization: Lab\nExternal-Description: two lines\n",
    );
    expect(() => bagInfoText([["Bad:Label", "x"]])).toThrow(/bad bag-info label/);
    expect(() => bagInfoText([[" Leading", "x"]])).toThrow();
  });

  it("states sizes in SI units", () => {
    expect(humanSize(999)).toBe("999 B");
    expect(humanSize(1500)).toBe("1.5 kB");
    expect(humanSize(2_500_000)).toBe("2.5 MB");
  });
});

describe("writeBagZip and verifyBagZip", () => {
  it("writes a bag in one base folder that checks, with every entry on the given date", async () => {
    const { bytes, w } = await smallBag();
    const files = unzipSync(bytes);
    expect(Object.keys(files).sort()).toEqual([
      "test-bag/bag-info.txt",
      "test-bag/bagit.txt",
      "test-bag/data/a.txt",
      "test-bag/data/sub/b.csv",
      "test-bag/manifest-sha256.txt",
      "test-bag/tagmanifest-sha256.txt",
    ]);
    expect(strFromU8(files["test-bag/manifest-sha256.txt"])).toBe(
      `${sha256("alpha\n")}  data/a.txt\n${sha256("T_K,cp\n2,0.1\n")}  data/sub/b.csv\n`,
    );
    expect(strFromU8(files["test-bag/bag-info.txt"])).toMatch(/^Payload-Oxum: 19\.2$/m);
    expect(w.oxum).toBe("19.2");
    expect(sha256(bytes)).toBe(w.sha256);
    const r = BagVerifyReportSchema.parse(verifyBagZip(bytes));
    expect(r).toMatchObject({ valid: true, bagDirectory: "test-bag", bagitVersion: "1.0", algorithms: ["sha256"], payloadFiles: 2, payloadBytes: 19, tagFiles: 4 });
  });

  it("gives the same bytes for the same inputs", async () => {
    const a = await smallBag();
    const b = await smallBag();
    expect(b.w.sha256).toBe(a.w.sha256);
  });

  it("encodes a % in a payload name and still checks", async () => {
    const { bytes } = await smallBag([{ path: "data/100%.txt", text: "x" }]);
    expect(strFromU8(unzipSync(bytes)["test-bag/manifest-sha256.txt"])).toContain("data/100%25.txt");
    expect(verifyBagZip(bytes).valid).toBe(true);
  });

  it("refuses payload paths outside data/ and repeated paths", async () => {
    await expect(smallBag([{ path: "data/../x", text: "" }])).rejects.toThrow(/outside data/);
    await expect(smallBag([{ path: "other/x", text: "" }])).rejects.toThrow(/outside data/);
    await expect(smallBag([{ path: "data/x", text: "" }, { path: "data/x", text: "" }])).rejects.toThrow(/repeated/);
  });

  it("checks a hand-made bag at the top of the zip (no base folder), as RFC 8493 readers accept", () => {
    const payload = strToU8("hello");
    const manifest = `${sha256(payload)} data/hello.txt\n`;
    const zip = zipSync({ "bagit.txt": strToU8(BAGIT_TXT), "manifest-sha256.txt": strToU8(manifest), "data/hello.txt": payload });
    const r = verifyBagZip(zip);
    expect(r.failures).toEqual([]);
    expect(r.bagDirectory).toBe("");
  });

  it("reports a traversal path, an unknown algorithm, a bad line, and a bad bagit.txt", () => {
    const zip = zipSync({
      "b/bagit.txt": strToU8("BagIt-Version: 1.0\n"),
      "b/manifest-sha256.txt": strToU8(`${"0".repeat(64)} ../../etc/passwd\nnot a line\n`),
      "b/manifest-whirlpool.txt": strToU8(""),
      "b/data/x": strToU8("x"),
    });
    const problems = verifyBagZip(zip).failures.map((f) => `${f.path}: ${f.problem}`);
    expect(problems).toContain("bagit.txt: must hold exactly the lines BagIt-Version and Tag-File-Character-Encoding, in that order");
    expect(problems).toContain("../../etc/passwd: manifest-sha256.txt lists a path outside data/");
    expect(problems).toContain('manifest-sha256.txt: line 2 is not "checksum path"');
    expect(problems).toContain('manifest-whirlpool.txt: unknown checksum algorithm "whirlpool"');
    expect(problems).toContain("data/x: payload file not listed in manifest-sha256.txt");
  });

  it("reports a zip that holds no bag, or two", () => {
    expect(verifyBagZip(zipSync({ "x.txt": strToU8("x") })).failures[0].path).toBe("bagit.txt");
    const two = verifyBagZip(zipSync({ "a/bagit.txt": strToU8(BAGIT_TXT), "b/bagit.txt": strToU8(BAGIT_TXT) }));
    expect(two.failures[0].problem).toBe("more than one bag in the zip");
  });

  it("throws NotAZipError on bytes that are not a zip", () => {
    expect(() => verifyBagZip(strToU8("this is plain text, not a zip archive at all"))).toThrow(NotAZipError);
  });
});

describe("thetafold verify-bundle", () => {
  it("prints a JSON report and exits 0 for a valid bag", async () => {
    const { out } = await smallBag();
    const { o, io } = capture();
    expect(await verifyBundleCommand([out], io)).toBe(0);
    const report = JSON.parse(o.out);
    expect(report.file).toBe(out);
    expect(BagVerifyReportSchema.parse(report).valid).toBe(true);
  });

  it("exits 1 and names the file whose byte was changed", async () => {
    const { bytes } = await smallBag();
    const files = unzipSync(bytes);
    files["test-bag/data/a.txt"] = strToU8("alphA\n");
    const tampered = path.join(dir(), "tampered.zip");
    writeFileSync(tampered, zipSync(files));
    const { o, io } = capture();
    expect(await verifyBundleCommand([tampered], io)).toBe(1);
    const report = BagVerifyReportSchema.parse(JSON.parse(o.out));
    expect(report.failures).toEqual([{ path: "data/a.txt", problem: "checksum does not match manifest-sha256.txt" }]);
  });

  it("runs through the thetafold entry point's command table", async () => {
    const { out } = await smallBag();
    const { o, io } = capture();
    expect(await main(["verify-bundle", out], io)).toBe(0);
    expect(BagVerifyReportSchema.parse(JSON.parse(o.out)).valid).toBe(true);
    const help = capture();
    expect(await main(["verify-bundle", "--help"], help.io)).toBe(0);
    expect(help.o.out).toContain("Usage: thetafold verify-bundle FILE.zip");
  });

  it("gives the same exit codes as a process: `thetafold verify-bundle` 0 for a good bag, 1 for a changed one", async () => {
    const { out, bytes } = await smallBag();
    const files = unzipSync(bytes);
    files["test-bag/data/sub/b.csv"] = strToU8("T_K,cp\n2,0.2\n");
    const tampered = path.join(dir(), "tampered.zip");
    writeFileSync(tampered, zipSync(files));
    const bin = path.resolve("server/cli/thetafold.mjs");
    const good = spawnSync(process.execPath, [bin, "verify-bundle", out], { encoding: "utf8" });
    expect(good.status, good.stderr).toBe(0);
    expect(JSON.parse(good.stdout).valid).toBe(true);
    const bad = spawnSync(process.execPath, [bin, "verify-bundle", tampered], { encoding: "utf8" });
    expect(bad.status, bad.stderr).toBe(1);
    expect(JSON.parse(bad.stdout).failures).toEqual([{ path: "data/sub/b.csv", problem: "checksum does not match manifest-sha256.txt" }]);
  }, 60_000);

  it("exits 2 for a missing file, a file that is not a zip, and bad arguments", async () => {
    const notZip = path.join(dir(), "notes.zip");
    writeFileSync(notZip, "just text");
    for (const args of [[path.join(dir(), "missing.zip")], [notZip], [], ["a.zip", "b.zip"], ["--frobnicate", "a.zip"]]) {
      const { o, io } = capture();
      expect(await verifyBundleCommand(args, io), args.join(" ")).toBe(2);
      expect(o.err.length).toBeGreaterThan(0);
      expect(o.out).toBe("");
    }
  });
});
