import { vi } from "vitest";

/** One request the code under test made. */
export interface StubCall {
  method: string;
  path: string;
  params: Record<string, string>;
  body: unknown;
}

export interface StubReply {
  status: number;
  body?: unknown;
}

export type StubHandler = StubReply | ((call: StubCall) => StubReply | Promise<StubReply>);

/** A JSON reply. */
export function reply(status: number, body?: unknown): StubReply {
  return { status, body };
}

/** The API's error body (STYLE §4) with the given status and code. */
export function errorReply(status: number, code: string, message: string, details?: { path?: string; message: string }[]): StubReply {
  return { status, body: { error: { code, message, ...(details ? { details } : {}) } } };
}

function matcher(pattern: string): (path: string) => Record<string, string> | null {
  const names: string[] = [];
  const source = pattern
    .split("/")
    .map((part) => {
      if (part.startsWith(":")) {
        names.push(part.slice(1));
        return "([^/]+)";
      }
      return part.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");
    })
    .join("/");
  const regex = new RegExp(`^${source}$`);
  return (path) => {
    const match = regex.exec(path);
    if (!match) return null;
    return Object.fromEntries(names.map((name, i) => [name, decodeURIComponent(match[i + 1])]));
  };
}

/**
 * Replaces global fetch with a table of routes, keyed "METHOD /api/path/:param".
 * A request no route matches fails the test loudly (status 599 and a recorded `unmatched` entry) instead of hanging.
 * Call `restore()` (or vi.unstubAllGlobals) after the test.
 */
export function stubFetch(routes: Record<string, StubHandler>) {
  const table = Object.entries(routes).map(([key, handler]) => {
    const [method, pattern] = key.split(" ");
    return { method: method.toUpperCase(), match: matcher(pattern), handler };
  });
  const calls: StubCall[] = [];
  const unmatched: string[] = [];

  const fetchStub = vi.fn(async (input: RequestInfo | URL, init?: RequestInit) => {
    const url = new URL(typeof input === "string" ? input : input instanceof URL ? input.href : input.url, "http://localhost");
    const method = (init?.method ?? "GET").toUpperCase();
    const body = typeof init?.body === "string" ? JSON.parse(init.body) : undefined;
    for (const route of table) {
      if (route.method !== method) continue;
      const params = route.match(url.pathname);
      if (!params) continue;
      const call: StubCall = { method, path: url.pathname, params, body };
      calls.push(call);
      const answer = typeof route.handler === "function" ? await route.handler(call) : route.handler;
      const text = answer.body === undefined ? null : JSON.stringify(answer.body);
      return new Response(answer.status === 204 ? null : text, {
        status: answer.status,
        headers: text ? { "Content-Type": "application/json" } : {},
      });
    }
    unmatched.push(`${method} ${url.pathname}`);
    return new Response(JSON.stringify({ error: { code: "INTERNAL", message: `fetch stub: no route for ${method} ${url.pathname}` } }), {
      status: 599,
      headers: { "Content-Type": "application/json" },
    });
  });

  vi.stubGlobal("fetch", fetchStub);
  return {
    calls,
    unmatched,
    /** The calls made to one route key, e.g. "PATCH /api/labs/:labId/members/:userId". */
    callsTo(key: string): StubCall[] {
      const [method, pattern] = key.split(" ");
      const match = matcher(pattern);
      return calls.filter((c) => c.method === method.toUpperCase() && match(c.path) !== null);
    },
    restore: () => vi.unstubAllGlobals(),
  };
}
