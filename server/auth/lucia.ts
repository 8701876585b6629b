import { DrizzleSQLiteAdapter } from "@lucia-auth/adapter-drizzle";
import { Lucia, TimeSpan } from "lucia";
import type { Db } from "../db/client";
import { sessions, users } from "../db/schema";

/**
 * Lucia 3 over the Drizzle adapter. Sessions last 30 days and slide: lucia renews a session that is past
 * half its life (`session.fresh`), and the session middleware re-sends the cookie then.
 */
export function createLucia(db: Db, secureCookies: boolean) {
  return new Lucia(new DrizzleSQLiteAdapter(db, sessions, users), {
    sessionExpiresIn: new TimeSpan(30, "d"),
    sessionCookie: { attributes: { secure: secureCookies, sameSite: "lax" } },
    getUserAttributes: (a) => ({ email: a.email, displayName: a.displayName, isSiteAdmin: Boolean(a.isSiteAdmin) }),
  });
}

export type AppLucia = ReturnType<typeof createLucia>;

declare module "lucia" {
  interface Register {
    Lucia: AppLucia;
    DatabaseUserAttributes: { email: string; displayName: string; isSiteAdmin: boolean | number };
  }
}
