import type { ComponentType } from "react";
import type { QueryClient } from "@tanstack/react-query";
import { createBrowserRouter, redirect, type LoaderFunction, type RouteObject } from "react-router-dom";
import * as root from "./routes/root";

/** What a lazy route module in app/routes/ exports. Loaders take the QueryClient and return the real loader. */
export interface RouteModule {
  Component: ComponentType;
  loader?: (queryClient: QueryClient) => LoaderFunction;
  ErrorBoundary?: ComponentType;
}

/** Loads a route module on first visit and hands its loader the QueryClient through this closure. */
function page(queryClient: QueryClient, load: () => Promise<RouteModule>): RouteObject["lazy"] {
  return async () => {
    const module = await load();
    return {
      Component: module.Component,
      ...(module.loader ? { loader: module.loader(queryClient) } : {}),
      ...(module.ErrorBoundary ? { ErrorBoundary: module.ErrorBoundary } : {}),
    };
  };
}

/** The route table. One entry per URL; new pages add a line here and a module in app/routes/. */
export function appRoutes(queryClient: QueryClient): RouteObject[] {
  const lazy = (load: () => Promise<RouteModule>) => page(queryClient, load);
  return [
    {
      id: "root",
      path: "/",
      Component: root.Component,
      ErrorBoundary: root.ErrorBoundary,
      HydrateFallback: root.HydrateFallback,
      children: [
        { index: true, lazy: lazy(() => import("./routes/home")) },
        { path: "sign-in", lazy: lazy(() => import("./routes/sign-in")) },
        { path: "setup", lazy: lazy(() => import("./routes/setup")) },
        { path: "forgot-password", lazy: lazy(() => import("./routes/forgot-password")) },
        { path: "reset-password/:token", lazy: lazy(() => import("./routes/reset-password")) },
        { path: "invite/:token", lazy: lazy(() => import("./routes/accept-invitation")) },
        {
          // Signed-in area: header, lab switcher, navigation, user menu.
          id: "shell",
          lazy: lazy(() => import("./routes/app-shell")),
          children: [
            {
              path: "labs/:labId",
              id: "lab",
              lazy: lazy(() => import("./routes/lab-scope")),
              children: [
                { index: true, loader: ({ params }) => redirect(`/labs/${params.labId}/samples`) },
                { path: "samples", lazy: lazy(() => import("./routes/samples")) },
                { path: "samples/:sampleId", lazy: lazy(() => import("./routes/sample")) },
                { path: "runs/:runId", lazy: lazy(() => import("./routes/run")) },
                { path: "runs/:runId/fit", lazy: lazy(() => import("./routes/fit-workspace")) },
                { path: "compare", lazy: lazy(() => import("./routes/compare")) },
                { path: "bundles", lazy: lazy(() => import("./routes/bundles")) },
                { path: "lab", lazy: lazy(() => import("./routes/lab")) },
                { path: "*", lazy: lazy(() => import("./routes/lab-not-found")) },
              ],
            },
            { path: "account", lazy: lazy(() => import("./routes/account")) },
            { path: "outbox/:messageId?", lazy: lazy(() => import("./routes/outbox")) },
          ],
        },
        { path: "*", lazy: lazy(() => import("./routes/not-found")) },
      ],
    },
  ];
}

export function createAppRouter(queryClient: QueryClient) {
  return createBrowserRouter(appRoutes(queryClient));
}
