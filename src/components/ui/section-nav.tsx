import { NavLink } from "react-router-dom";
import { cn } from "@/lib/cn";

export interface SectionLink {
  to: string;
  label: string;
}

/** The main sections of a lab; the current one is marked with aria-current and an ember bar, not colour alone. */
export function SectionNav({ links, className }: { links: readonly SectionLink[]; className?: string }) {
  return (
    <nav aria-label="Lab sections" className={className}>
      <ul className="flex items-stretch gap-1">
        {links.map((link) => (
          <li key={link.to} className="flex">
            <NavLink
              to={link.to}
              className={({ isActive }) =>
                cn(
                  "relative flex items-center rounded-md px-3 py-1.5 text-sm font-medium transition-colors",
                  isActive ? "text-ink" : "text-ink-muted hover:bg-sunken hover:text-ink",
                )
              }
            >
              {({ isActive }) => (
                <>
                  {link.label}
                  <span
                    aria-hidden="true"
                    className={cn("absolute inset-x-3 -bottom-[9px] h-0.5 rounded-full", isActive ? "bg-ember" : "bg-transparent")}
                  />
                </>
              )}
            </NavLink>
          </li>
        ))}
      </ul>
    </nav>
  );
}
