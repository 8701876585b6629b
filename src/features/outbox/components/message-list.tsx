import { NavLink } from "react-router-dom";
import type { OutboxMessage } from "@shared/schemas/labs";
import { cn } from "@/lib/cn";

const timeFormat = new Intl.DateTimeFormat(undefined, { dateStyle: "short", timeStyle: "short" });

/** Received messages, newest first; each opens at /outbox/:messageId. */
export function MessageList({ messages }: { messages: OutboxMessage[] }) {
  const sorted = [...messages].sort((a, b) => b.receivedAt.localeCompare(a.receivedAt));
  return (
    <ul aria-label="Received messages" className="divide-y divide-line">
      {sorted.map((message) => (
        <li key={message.id}>
          <NavLink
            to={`/outbox/${encodeURIComponent(message.id)}`}
            className={({ isActive }) =>
              cn(
                "block border-l-4 px-4 py-3 text-sm hover:bg-sunken",
                isActive ? "border-ember bg-sunken" : "border-transparent",
              )
            }
          >
            <span className="block truncate font-medium text-ink">{message.subject || "(no subject)"}</span>
            <span className="mt-0.5 flex justify-between gap-2 text-xs text-ink-muted">
              <span className="truncate">to {message.to}</span>
              <time dateTime={message.receivedAt} className="shrink-0 font-mono">
                {timeFormat.format(new Date(message.receivedAt))}
              </time>
            </span>
          </NavLink>
        </li>
      ))}
    </ul>
  );
}
