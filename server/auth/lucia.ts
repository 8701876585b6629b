import { DrizzleSQLiteAdapter } from "@lucia-auth/adapter-drizzle";
import { eq, sql } from "drizzle-orm";
import { Lucia, TimeSpan, type DatabaseSession, type DatabaseUser } from "lucia";
import type { Db } from "../db/client";
import { sessions, users } from "../db/schema";

/**
 * The Drizzle adapter with the one query every signed-in request makes (session and user by session
 * id) prepared once, as a single join that reads only the user attributes the app uses (never the
 * password hash). Every other method is the package's own.
 */
class PreparedSessionAdapter extends DrizzleSQLiteAdapter {
  private readonly sessionAndUser;

  constructor(db: Db) {
    super(db, sessions, users);
    this.sessionAndUser = db
      .select({
        id: sessions.id,
        userId: sessions.userId,
        expiresAt: sessions.expiresAt,
        email: users.email,
        displayName: users.displayName,
        isSiteAdmin: users.isSiteAdmin,
      })
      .from(sessions)
      .innerJoin(users, eq(users.id, sessions.userId))
      .where(eq(sessions.id, sql.placeholder("sessionId")))
      .prepare();
  }

  override async getSessionAndUser(sessionId: string): Promise<[session: DatabaseSession | null, user: DatabaseUser | null]> {
    const row = this.sessionAndUser.get({ sessionId });
    if (!row) return [null, null];
    return [
      { id: row.id, userId: row.userId, expiresAt: new Date(row.expiresAt * 1000), attributes: {} },
      { id: row.userId, attributes: { email: row.email, displayName: row.displayName, isSiteAdmin: row.isSiteAdmin } },
    ];
  }
}

/**
 * Lucia 3 over the Drizzle adapter. Sessions last 30 days and slide: lucia renews a session that is past
 * half its life (`session.fresh`), and the session middleware re-sends the cookie then.
 */
export function createLucia(db: Db, secureCookies: boolean) {
  return new Lucia(new PreparedSessionAdapter(db), {
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
