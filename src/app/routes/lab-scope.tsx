import { useEffect } from "react";
import type { QueryClient } from "@tanstack/react-query";
import { data, isRouteErrorResponse, Outlet, useParams, useRouteError, type LoaderFunctionArgs } from "react-router-dom";
import { NotFoundPanel } from "@/components/ui/not-found-panel";
import { ErrorNotice } from "@/components/ui/alert";
import { meQueryOptions } from "@/features/auth/api";
import { rememberLastLab } from "@/lib/last-lab";

/** Everything under /labs/:labId: the lab must be one of yours (the server answers 404 for others too). */
export const loader =
  (queryClient: QueryClient) =>
  async ({ params }: LoaderFunctionArgs) => {
    const me = await queryClient.ensureQueryData(meQueryOptions());
    if (!me?.memberships.some((m) => m.labId === params.labId)) throw data("No such lab", { status: 404 });
    return null;
  };

export function Component() {
  const { labId } = useParams();
  useEffect(() => {
    if (labId) rememberLastLab(labId);
  }, [labId]);
  return <Outlet />;
}

export function ErrorBoundary() {
  const error = useRouteError();
  if (isRouteErrorResponse(error) && error.status === 404) return <NotFoundPanel />;
  return <ErrorNotice title="This page ran into a problem" error={error} onRetry={() => window.location.reload()} />;
}
