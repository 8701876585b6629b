import type express from "express";

/** One API route as the server registered it: upper-case method and the full path, e.g. "GET /api/labs/:labId/samples". */
export interface RouteEntry {
  method: string;
  path: string;
}

interface RouterLayer {
  rawPath?: string;
  route?: { path: string | string[]; methods: Record<string, boolean> };
  handle?: { stack?: RouterLayer[] };
}

function join(prefix: string, rest: string): string {
  const joined = `${prefix.replace(/\/+$/, "")}/${rest.replace(/^\/+/, "")}`;
  return joined.length > 1 ? joined.replace(/\/+$/, "") : joined;
}

function walk(stack: readonly RouterLayer[], prefix: string, out: RouteEntry[]): void {
  for (const layer of stack) {
    if (layer.route) {
      const paths = Array.isArray(layer.route.path) ? layer.route.path : [layer.route.path];
      for (const p of paths) {
        for (const [method, on] of Object.entries(layer.route.methods)) {
          // Express adds HEAD to every GET route by itself; "_all" is app.all(), listed as ALL.
          if (on) out.push({ method: method === "_all" ? "ALL" : method.toUpperCase(), path: join(prefix, p) });
        }
      }
    } else if (layer.handle?.stack) {
      // A mounted router (app.use("/api", router)): its layer keeps the mount path as rawPath.
      const mount = typeof layer.rawPath === "string" && layer.rawPath !== "/" ? layer.rawPath : "";
      walk(layer.handle.stack, join(prefix, mount), out);
    }
  }
}

/**
 * Every route registered on an Express 5 app, read from its router stack (app.router.stack → mounted
 * routers' handle.stack → layers with route.path and route.methods), sorted by path then method.
 * @param app from createApp(...)
 * @param options under: keep only paths starting with this prefix (default "/api")
 * @returns one entry per method and path, duplicates removed
 */
export function listRoutes(app: express.Express, options: { under?: string } = {}): RouteEntry[] {
  const under = options.under ?? "/api";
  const stack = (app as unknown as { router: { stack: RouterLayer[] } }).router.stack;
  const out: RouteEntry[] = [];
  walk(stack, "", out);
  const seen = new Set<string>();
  return out
    .filter((r) => r.path.startsWith(under))
    .filter((r) => {
      const key = routeKey(r);
      if (seen.has(key)) return false;
      seen.add(key);
      return true;
    })
    .sort((a, b) => (a.path === b.path ? a.method.localeCompare(b.method) : a.path.localeCompare(b.path)));
}

/** "GET /api/labs/:labId/samples": the key the authorization table is written in. */
export function routeKey(r: RouteEntry): string {
  return `${r.method} ${r.path}`;
}
