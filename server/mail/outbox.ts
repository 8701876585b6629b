import { desc } from "drizzle-orm";
import type { OutboxMessage } from "@shared/schemas/labs";
import type { Db } from "../db/client";
import { mailMessages } from "../db/schema";

/** Most messages one outbox listing returns. */
export const OUTBOX_LIST_LIMIT = 200;

/**
 * Messages the fake SMTP server received, newest first (at most OUTBOX_LIST_LIMIT).
 * @param db the database
 */
export function listOutbox(db: Db): OutboxMessage[] {
  return db
    .select()
    .from(mailMessages)
    .orderBy(desc(mailMessages.receivedAt), desc(mailMessages.id))
    .limit(OUTBOX_LIST_LIMIT)
    .all()
    .map((m) => ({
      id: m.id,
      from: m.from,
      to: m.to,
      subject: m.subject,
      text: m.text,
      receivedAt: new Date(m.receivedAt).toISOString(),
    }));
}
