import { useEffect, useId, useRef, useState } from "react";
import { Link, useLocation } from "react-router-dom";
import type { User } from "@shared/schemas/auth";
import { cn } from "@/lib/cn";
import { DisplaySettings } from "./display-settings";
import { Spinner } from "./spinner";

/** "Dr. Ilse Marrow (demo lead)" → "IM": titles ending in a full stop and anything in parentheses are skipped. */
function initials(name: string): string {
  const parts = name
    .replace(/\([^)]*\)/g, " ")
    .trim()
    .split(/\s+/)
    .filter((part) => part && !part.endsWith("."));
  const letters = parts.length >= 2 ? parts[0][0] + parts[parts.length - 1][0] : (parts[0] ?? "?").slice(0, 2);
  return letters.toUpperCase();
}

const ITEM = "flex w-full items-center rounded-md px-2 py-1.5 text-left text-sm text-ink hover:bg-sunken";

interface UserMenuProps {
  user: User;
  showOutbox: boolean;
  onSignOut(): void;
  signingOut: boolean;
}

/**
 * The account button and its panel: account page, outbox (site administrators), display settings, sign out.
 * A disclosure, not an ARIA menu: ordinary links, radios and buttons in tab order, closed by Escape or a click outside.
 */
export function UserMenu({ user, showOutbox, onSignOut, signingOut }: UserMenuProps) {
  const [open, setOpen] = useState(false);
  const panelId = useId();
  const buttonRef = useRef<HTMLButtonElement>(null);
  const rootRef = useRef<HTMLDivElement>(null);
  const location = useLocation();

  useEffect(() => setOpen(false), [location.pathname]);

  useEffect(() => {
    if (!open) return;
    const onKey = (event: KeyboardEvent) => {
      if (event.key === "Escape") {
        setOpen(false);
        buttonRef.current?.focus();
      }
    };
    const onPointer = (event: PointerEvent) => {
      if (rootRef.current && !rootRef.current.contains(event.target as Node)) setOpen(false);
    };
    document.addEventListener("keydown", onKey);
    document.addEventListener("pointerdown", onPointer);
    return () => {
      document.removeEventListener("keydown", onKey);
      document.removeEventListener("pointerdown", onPointer);
    };
  }, [open]);

  const name = user.displayName || user.email;
  return (
    <div ref={rootRef} className="relative">
      <button
        ref={buttonRef}
        type="button"
        aria-expanded={open}
        aria-controls={panelId}
        onClick={() => setOpen((v) => !v)}
        className="flex items-center gap-2 rounded-full border border-line py-1 pr-3 pl-1 text-sm text-ink hover:bg-sunken"
      >
        <span aria-hidden="true" className="grid size-7 place-items-center rounded-full bg-ink text-xs font-semibold text-canvas">
          {initials(name)}
        </span>
        <span className="hidden max-w-40 truncate sm:inline">{name}</span>
        <span className="sr-only sm:hidden">Account menu for {name}</span>
        <svg aria-hidden="true" viewBox="0 0 16 16" className={cn("size-3.5 text-ink-muted transition-transform", open && "rotate-180")}>
          <path d="M4 6l4 4 4-4" stroke="currentColor" strokeWidth="1.6" fill="none" strokeLinecap="round" />
        </svg>
      </button>
      <div
        id={panelId}
        hidden={!open}
        className="absolute right-0 z-30 mt-2 w-72 rounded-xl border border-line bg-surface p-2 shadow-card"
      >
        <div className="border-b border-line px-2 pt-1 pb-2">
          <p className="truncate text-sm font-semibold text-ink">{name}</p>
          <p className="truncate text-xs text-ink-muted">{user.email}</p>
        </div>
        <nav aria-label="Account" className="border-b border-line py-1">
          <Link to="/account" className={ITEM}>
            Account and password
          </Link>
          {showOutbox && (
            <Link to="/outbox" className={ITEM}>
              Outbox
              <span className="ml-auto text-xs text-ink-muted">test mail</span>
            </Link>
          )}
        </nav>
        <div className="border-b border-line px-1 py-2">
          <DisplaySettings compact />
        </div>
        <div className="pt-1">
          <button type="button" onClick={onSignOut} disabled={signingOut} className={cn(ITEM, "gap-2")}>
            {signingOut && <Spinner size="sm" />}
            Sign out
          </button>
        </div>
      </div>
    </div>
  );
}
