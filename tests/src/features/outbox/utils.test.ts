// @vitest-environment jsdom
import { describe, expect, it } from "vitest";
import { linkify } from "@/features/outbox/utils";

describe("linkify", () => {
  it("makes the invitation link clickable and leaves a sentence's full stop outside it", () => {
    expect(linkify("Join here: http://127.0.0.1:3000/invite/abc_DEF-123. It works for 7 days.")).toEqual([
      { kind: "text", text: "Join here: " },
      { kind: "link", href: "http://127.0.0.1:3000/invite/abc_DEF-123", text: "http://127.0.0.1:3000/invite/abc_DEF-123" },
      { kind: "text", text: ". It works for 7 days." },
    ]);
  });

  it("links only http and https, so a javascript: text stays text", () => {
    expect(linkify("javascript:alert(1) and ftp://x")).toEqual([{ kind: "text", text: "javascript:alert(1) and ftp://x" }]);
  });
});
