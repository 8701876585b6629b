// @vitest-environment jsdom
import { afterEach, describe, expect, it, vi } from "vitest";
import { buildBundleRequest, type BuildProgress } from "@/features/bundles/api";
import { ApiError } from "@/lib/api-client";

const bundle = {
  id: "bu-1",
  name: "n",
  fileSha256: "a".repeat(64),
  sizeBytes: 10,
  payloadManifestSha256: "b".repeat(64),
  selection: { sampleIds: [], runIds: [], fitIds: [], comparisonId: null, comparisonName: null },
  counts: { samples: 0, runs: 0, fits: 0 },
  contents: [],
  createdBy: null,
  createdAt: "2026-11-25T10:00:00.000Z",
  downloadUrl: "/x",
  links: [],
};

/** A response whose NDJSON body arrives in awkward chunks (lines split across reads). */
function ndjson(lines: unknown[], chunk = 7): Response {
  const text = lines.map((l) => JSON.stringify(l)).join("\n") + "\n";
  const enc = new TextEncoder();
  const body = new ReadableStream<Uint8Array>({
    start(c) {
      for (let i = 0; i < text.length; i += chunk) c.enqueue(enc.encode(text.slice(i, i + chunk)));
      c.close();
    },
  });
  return new Response(body, { status: 201, headers: { "Content-Type": "application/x-ndjson" } });
}

afterEach(() => vi.unstubAllGlobals());

describe("buildBundleRequest", () => {
  it("reports each progress line and resolves with the bundle", async () => {
    vi.stubGlobal(
      "fetch",
      vi.fn(async () =>
        ndjson([
          { type: "progress", phase: "collecting", done: 0, total: 1, label: "reading" },
          { type: "progress", phase: "hashing", done: 3, total: 9, label: "data/raw/01-a/x.txt" },
          { type: "result", bundle },
        ]),
      ),
    );
    const seen: BuildProgress[] = [];
    const b = await buildBundleRequest("lab-1", { name: "n", sampleIds: ["s"] }, (p) => seen.push(p));
    expect(b.id).toBe("bu-1");
    expect(seen.map((p) => `${p.phase} ${p.done}/${p.total}`)).toEqual(["collecting 0/1", "hashing 3/9"]);
    const init = (fetch as unknown as { mock: { calls: [string, RequestInit][] } }).mock.calls[0][1];
    expect((init.headers as Record<string, string>).Accept).toContain("application/x-ndjson");
  });

  it("throws the error line of a build that failed half way", async () => {
    vi.stubGlobal("fetch", vi.fn(async () => ndjson([{ type: "progress", phase: "hashing", done: 0, total: 2, label: "" }, { type: "error", error: { code: "INTERNAL", message: "disk full" } }])));
    await expect(buildBundleRequest("lab-1", { name: "n" }, () => {})).rejects.toThrow("disk full");
  });

  it("throws an ApiError with the server's code for a refusal", async () => {
    vi.stubGlobal(
      "fetch",
      vi.fn(async () => new Response(JSON.stringify({ error: { code: "UNPROCESSABLE", message: "Choose at least one sample" } }), { status: 422, headers: { "Content-Type": "application/json" } })),
    );
    const err = await buildBundleRequest("lab-1", { name: "n" }, () => {}).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ApiError);
    expect((err as ApiError).status).toBe(422);
    expect((err as ApiError).code).toBe("UNPROCESSABLE");
  });
});
