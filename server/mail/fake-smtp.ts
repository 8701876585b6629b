import { randomUUID } from "node:crypto";
import type { AddressInfo } from "node:net";
import { SMTPServer } from "smtp-server";
import type { Db } from "../db/client";
import { mailMessages } from "../db/schema";

/** Largest message the fake server accepts: 10 MiB (our mail is a few hundred bytes of text). */
const MAX_MESSAGE_BYTES = 10 * 1024 * 1024;

export interface FakeSmtpServer {
  host: string;
  port: number;
  close(): Promise<void>;
}

/**
 * Starts an SMTP server on loopback (a free port) that accepts every message without authentication and
 * stores it in mail_messages: the outbox of a local install. STARTTLS is off, so nothing needs a certificate.
 * @param db where received messages go
 * @returns its address and a close()
 */
export async function startFakeSmtp(db: Db): Promise<FakeSmtpServer> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS", "AUTH"],
    disableReverseLookup: true,
    size: MAX_MESSAGE_BYTES,
    logger: false,
    banner: "Thetafold local outbox",
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on("data", (c: Buffer) => chunks.push(c));
      stream.on("error", callback);
      stream.on("end", () => {
        if (stream.sizeExceeded) {
          callback(Object.assign(new Error("Message too large"), { responseCode: 552 }));
          return;
        }
        const raw = Buffer.concat(chunks);
        // Loaded on the first message: mailparser is a large import that start-up does not need.
        import("mailparser")
          .then(({ simpleParser }) => simpleParser(raw))
          .then((parsed) => {
            const envelopeTo = session.envelope.rcptTo.map((a) => a.address).join(", ");
            const headerTo = Array.isArray(parsed.to) ? parsed.to.map((a) => a.text).join(", ") : parsed.to?.text;
            const envelopeFrom = session.envelope.mailFrom ? session.envelope.mailFrom.address : "";
            db.insert(mailMessages)
              .values({
                id: randomUUID(),
                from: parsed.from?.text || envelopeFrom,
                to: headerTo || envelopeTo,
                subject: parsed.subject ?? "",
                // The parser ends the body with the line break the transfer added; the outbox shows it without.
                text: (parsed.text ?? "").replace(/\r?\n$/, ""),
                raw: raw.toString("utf8"),
                receivedAt: Date.now(),
              })
              .run();
            callback();
          })
          .catch((err: Error) => callback(err));
      });
    },
  });
  server.on("error", (err) => console.error("[mail] fake SMTP server error", err));
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => {
      server.off("error", reject);
      resolve();
    });
  });
  const address = server.server.address() as AddressInfo;
  return {
    host: "127.0.0.1",
    port: address.port,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
