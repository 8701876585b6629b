import type { OutboxMessage } from "@shared/schemas/labs";
import { LINK_CLASSES } from "@/components/ui/text-link";
import { linkify } from "../utils";

const timeFormat = new Intl.DateTimeFormat(undefined, { dateStyle: "medium", timeStyle: "medium" });

/** One message as the recipient would read it: headers, then the plain text with its links clickable. */
export function MessageView({ message }: { message: OutboxMessage }) {
  return (
    <article aria-labelledby="message-subject" className="space-y-4">
      <header className="space-y-2 border-b border-line pb-4">
        <h2 id="message-subject" className="text-lg font-semibold text-ink">
          {message.subject || "(no subject)"}
        </h2>
        <dl className="grid grid-cols-[4rem_minmax(0,1fr)] gap-x-3 gap-y-1 text-sm">
          <dt className="text-ink-muted">From</dt>
          <dd className="truncate text-ink">{message.from}</dd>
          <dt className="text-ink-muted">To</dt>
          <dd className="truncate text-ink">{message.to}</dd>
          <dt className="text-ink-muted">Received</dt>
          <dd className="font-mono text-ink">{timeFormat.format(new Date(message.receivedAt))}</dd>
        </dl>
      </header>
      <div className="font-mono text-sm leading-relaxed break-words whitespace-pre-wrap text-ink">
        {linkify(message.text).map((piece, index) =>
          piece.kind === "link" ? (
            <a key={index} href={piece.href} className={LINK_CLASSES}>
              {piece.text}
            </a>
          ) : (
            <span key={index}>{piece.text}</span>
          ),
        )}
      </div>
    </article>
  );
}
