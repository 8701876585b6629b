import { Link } from "react-router-dom";
import { buttonClasses } from "./button";

/** "Nothing here" inside a page frame: a wrong address, or a lab this account cannot see. */
export function NotFoundPanel({ homeHref = "/" }: { homeHref?: string }) {
  return (
    <div className="mx-auto max-w-lg py-16 text-center">
      <p className="font-mono text-sm text-ember-ink">404</p>
      <h1 tabIndex={-1} data-page-title className="mt-2 text-2xl font-semibold text-ink focus:outline-none">
        Nothing at this address
      </h1>
      <p className="mt-2 text-sm text-ink-muted">
        The link may be mistyped, or it leads to a lab or item your account cannot see. Labs only show to their members.
      </p>
      <Link to={homeHref} className={buttonClasses("secondary", "md", "mt-6")}>
        Go to your lab
      </Link>
    </div>
  );
}
