import { useEffect, useRef } from "react";
import { isRouteErrorResponse, Link, Outlet, ScrollRestoration, useLocation, useNavigation, useRouteError } from "react-router-dom";
import { buttonClasses } from "@/components/ui/button";
import { Wordmark } from "@/components/ui/brand";
import { NotFoundPanel } from "@/components/ui/not-found-panel";
import { Spinner } from "@/components/ui/spinner";

/** After each navigation, focus moves to the new page's title, so keyboard and screen-reader users start there. */
function useFocusPageTitle() {
  const location = useLocation();
  // Starts at the page as loaded: a fresh load (or a remount) leaves focus where the browser puts it.
  const previousPath = useRef(location.pathname);
  useEffect(() => {
    if (previousPath.current === location.pathname) return;
    previousPath.current = location.pathname;
    const title = document.querySelector<HTMLElement>("[data-page-title]");
    title?.focus({ preventScroll: true });
  }, [location.pathname]);
}

export function Component() {
  const navigation = useNavigation();
  useFocusPageTitle();
  return (
    <>
      <div
        aria-hidden="true"
        className={`fixed inset-x-0 top-0 z-50 h-0.5 origin-left bg-linear-to-r from-frost to-ember transition-transform duration-500 ${
          navigation.state === "idle" ? "scale-x-0" : "scale-x-75"
        }`}
      />
      <Outlet />
      <ScrollRestoration />
    </>
  );
}

export function HydrateFallback() {
  return (
    <div className="grid min-h-dvh place-items-center">
      <div role="status" className="flex items-center gap-3 text-sm text-ink-muted">
        <Spinner />
        Opening Thetafold…
      </div>
    </div>
  );
}

/** The last stop for errors no page caught: a 404 from a loader, or a crash. */
export function ErrorBoundary() {
  const error = useRouteError();
  const notFound = isRouteErrorResponse(error) && error.status === 404;
  if (!notFound) console.error(error);
  return (
    <div className="min-h-dvh">
      <header className="border-b border-line bg-surface px-4 py-3">
        <Link to="/" aria-label="Thetafold home">
          <Wordmark />
        </Link>
      </header>
      <main className="px-4">
        {notFound ? (
          <NotFoundPanel />
        ) : (
          <div role="alert" className="mx-auto max-w-lg py-16">
            <h1 className="text-2xl font-semibold text-ink">This page ran into a problem</h1>
            <p className="mt-2 text-sm text-ink-muted">
              Nothing you saved is lost. Reload to try again; if it keeps happening, tell your site administrator what you
              were doing and the message below.
            </p>
            <pre className="mt-4 overflow-auto rounded-lg bg-sunken p-3 font-mono text-xs text-ink">
              {error instanceof Error ? error.message : isRouteErrorResponse(error) ? `${error.status} ${error.statusText}` : String(error)}
            </pre>
            <button type="button" className={buttonClasses("primary", "md", "mt-4")} onClick={() => window.location.reload()}>
              Reload
            </button>
          </div>
        )}
      </main>
    </div>
  );
}
