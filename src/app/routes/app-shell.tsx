import { useEffect } from "react";
import { useQueryClient, type QueryClient } from "@tanstack/react-query";
import { Link, Navigate, Outlet, redirect, useLocation, useNavigate, useParams, type LoaderFunctionArgs } from "react-router-dom";
import { Wordmark } from "@/components/ui/brand";
import { LabSwitcher } from "@/components/ui/lab-switcher";
import { ResearchDataNotice } from "@/components/ui/safety-note";
import { SectionNav } from "@/components/ui/section-nav";
import { UserMenu } from "@/components/ui/user-menu";
import { authKeys, meQueryOptions, setupStatusQueryOptions, useMe, useSetupStatus, useSignOut } from "@/features/auth/api";
import { pickLab } from "@/features/auth/utils";
import { isApiError } from "@/lib/api-client";
import { readLastLab } from "@/lib/last-lab";

function signInPath(location: { pathname: string; search: string }): string {
  return `/sign-in?${new URLSearchParams({ next: location.pathname + location.search })}`;
}

export const loader =
  (queryClient: QueryClient) =>
  async ({ request }: LoaderFunctionArgs) => {
    const [me] = await Promise.all([
      queryClient.ensureQueryData(meQueryOptions()),
      queryClient.prefetchQuery(setupStatusQueryOptions()),
    ]);
    if (!me) {
      const url = new URL(request.url);
      return redirect(signInPath(url));
    }
    return null;
  };

/** A 401 from any read or write means the session ended: refresh "me", and the shell sends the person to sign in. */
function useSessionWatch() {
  const queryClient = useQueryClient();
  useEffect(() => {
    const recheck = (error: unknown) => {
      if (isApiError(error, 401)) void queryClient.invalidateQueries({ queryKey: authKeys.me() });
    };
    const offQueries = queryClient.getQueryCache().subscribe((event) => {
      if (event.type === "updated" && event.action.type === "error") recheck(event.action.error);
    });
    const offMutations = queryClient.getMutationCache().subscribe((event) => {
      if (event.type === "updated" && event.action.type === "error") recheck(event.action.error);
    });
    return () => {
      offQueries();
      offMutations();
    };
  }, [queryClient]);
}

export function Component() {
  const me = useMe().data;
  const fakeMail = useSetupStatus().data?.fakeMail ?? false;
  const params = useParams();
  const location = useLocation();
  const navigate = useNavigate();
  const signOut = useSignOut();
  useSessionWatch();

  // Signed out here: plain sign-in page. Session ended elsewhere: sign-in, then back to this page.
  if (!me) return <Navigate to={signOut.isPending || signOut.isSuccess ? "/sign-in" : signInPath(location)} replace />;

  const labId = params.labId ?? pickLab(me, readLastLab());
  const sections = labId
    ? [
        { to: `/labs/${encodeURIComponent(labId)}/samples`, label: "Samples" },
        { to: `/labs/${encodeURIComponent(labId)}/compare`, label: "Compare" },
        { to: `/labs/${encodeURIComponent(labId)}/bundles`, label: "Bundles" },
        { to: `/labs/${encodeURIComponent(labId)}/lab`, label: "Lab" },
      ]
    : [];

  const switchLab = (next: string) => {
    // Keep the section when switching labs: Compare in one lab leads to Compare in the other.
    const section = params.labId ? location.pathname.split("/")[3] : undefined;
    navigate(`/labs/${encodeURIComponent(next)}/${section ?? "samples"}`);
  };

  return (
    <div className="flex min-h-dvh flex-col">
      <a
        href="#main"
        className="sr-only z-50 rounded-md bg-surface px-3 py-2 text-sm font-medium text-ink focus:not-sr-only focus:fixed focus:top-2 focus:left-2"
      >
        Skip to content
      </a>
      <header className="sticky top-0 z-20 border-b border-line bg-surface/95 backdrop-blur">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-x-3 px-4 sm:px-6">
          <div className="flex h-14 min-w-0 flex-1 items-center gap-3 md:flex-none">
            <Link to="/" aria-label="Thetafold, your lab's start page" className="shrink-0 rounded-md">
              <Wordmark />
            </Link>
            <span aria-hidden="true" className="h-6 w-px bg-line" />
            <LabSwitcher memberships={me.memberships} currentLabId={labId} onSelect={switchLab} />
          </div>
          {sections.length > 0 && (
            <SectionNav
              links={sections}
              className="order-last -mx-2 w-full overflow-x-auto border-t border-line py-1.5 md:order-none md:mx-0 md:ml-4 md:w-auto md:border-0 md:py-0"
            />
          )}
          <div className="ml-auto flex h-14 items-center">
            <UserMenu
              user={me.user}
              showOutbox={me.user.isSiteAdmin && fakeMail}
              signingOut={signOut.isPending}
              onSignOut={() => signOut.mutate()}
            />
          </div>
        </div>
        <div aria-hidden="true" className="h-0.5 bg-linear-to-r from-frost via-frost/20 via-60% to-ember" />
      </header>
      <main id="main" tabIndex={-1} className="mx-auto w-full max-w-7xl flex-1 px-4 py-8 focus:outline-none sm:px-6">
        <Outlet />
      </main>
      <footer className="border-t border-line">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center justify-between gap-2 px-4 py-4 sm:px-6">
          <ResearchDataNotice />
          <p className="text-xs text-ink-muted">Thetafold</p>
        </div>
      </footer>
    </div>
  );
}
