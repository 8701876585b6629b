import type { AppLucia } from "./auth/lucia";
import type { Db } from "./db/client";

/** One outgoing message. */
export interface MailMessage {
  to: string;
  subject: string;
  text: string;
}

/** Sends mail; `fake` is true while the in-process fake SMTP server is the destination (the Outbox page is then on). */
export interface Mailer {
  readonly fake: boolean;
  send(message: MailMessage): Promise<void>;
}

export interface AppDeps {
  db: Db;
  /** Holds stored files (files/ by SHA-256); the SQLite file lives here too at run time. */
  dataDir: string;
  mailer: Mailer;
  /** Origin the app is served from, e.g. http://localhost:3000; used in e-mailed links and the Origin check. */
  publicUrl: string;
  /** Secure cookies (production behind TLS). */
  secureCookies?: boolean;
  /** Built client to serve (dist/); omitted in API tests and in `npm run dev`. */
  clientDir?: string;
  /** Further origins whose writes are accepted (the 127.0.0.1 twin of http://localhost:PORT). */
  extraOrigins?: string[];
  /** Requests allowed per minute on sign-in and reset per client address. */
  authRateLimitPerMinute?: number;
}

/** What every router factory receives. */
export interface AppContext extends AppDeps {
  lucia: AppLucia;
}
