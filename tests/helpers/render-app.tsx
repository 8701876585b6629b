import { QueryClient } from "@tanstack/react-query";
import { configure, render } from "@testing-library/react";
import { createMemoryRouter, RouterProvider } from "react-router-dom";
import type { Me } from "@shared/schemas/auth";
import type { Member } from "@shared/schemas/labs";
import { Providers } from "@/app/providers";
import { appRoutes } from "@/app/router";

// The first visit to each page imports its lazy route module (transformed on demand): allow more than 1 s (the machine is shared and can be slow).
configure({ asyncUtilTimeout: 10_000 });

/** A QueryClient for one test: no retries (a stubbed failure shows at once), nothing shared between tests. */
export function testQueryClient(): QueryClient {
  return new QueryClient({ defaultOptions: { queries: { retry: false }, mutations: { retry: false } } });
}

/** Renders the real route table at `path` in a memory router, as the browser would. */
export function renderApp(path: string) {
  // jsdom has no scrolling; the router's scroll restoration calls it on every navigation.
  window.scrollTo = () => undefined;
  const queryClient = testQueryClient();
  const router = createMemoryRouter(appRoutes(queryClient), { initialEntries: [path] });
  const view = render(
    <Providers queryClient={queryClient}>
      <RouterProvider router={router} />
    </Providers>,
  );
  return { ...view, router, queryClient };
}

/** The invented lab the client tests use (synthetic; matches no real group). */
export const TEST_LAB = { labId: "lab-1", labName: "Cryo Calorimetry Group (synthetic)" };

export function meFixture(role: "lead" | "researcher" | "guest", overrides: Partial<Me["user"]> = {}): Me {
  return {
    user: { id: `u-${role}`, email: `${role}@example.org`, displayName: `Test ${role}`, isSiteAdmin: false, ...overrides },
    memberships: [{ ...TEST_LAB, role }],
  };
}

export function memberFixture(role: "lead" | "researcher" | "guest", name = `Test ${role}`): Member {
  return { userId: `u-${role}`, email: `${role}@example.org`, displayName: name, role, joinedAt: "2026-11-02T09:30:00.000Z" };
}
