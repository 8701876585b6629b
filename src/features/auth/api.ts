import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import {
  MeSchema,
  SetupStatusSchema,
  type ChangePasswordBody,
  type Me,
  type RequestResetBody,
  type ResetPasswordBody,
  type SetupBody,
  type SignInBody,
} from "@shared/schemas/auth";
import { InvitationPreviewSchema, type AcceptInvitationBody } from "@shared/schemas/labs";
import { api, isApiError } from "@/lib/api-client";

/** Keys of everything about who is signed in: the session, the install's setup state, invitation previews. */
export const authKeys = {
  all: ["auth"] as const,
  me: () => [...authKeys.all, "me"] as const,
  setupStatus: () => [...authKeys.all, "setup-status"] as const,
  invitation: (token: string) => [...authKeys.all, "invitation", token] as const,
};

/** The signed-in user and memberships, or null when nobody is signed in (a 401 is an answer, not a failure). */
export function meQueryOptions() {
  return queryOptions({
    queryKey: authKeys.me(),
    queryFn: async ({ signal }): Promise<Me | null> => {
      try {
        return await api.get("/api/me", MeSchema, signal);
      } catch (error) {
        if (isApiError(error, 401)) return null;
        throw error;
      }
    },
    staleTime: 60_000,
  });
}

export function setupStatusQueryOptions() {
  return queryOptions({
    queryKey: authKeys.setupStatus(),
    queryFn: ({ signal }) => api.get("/api/setup", SetupStatusSchema, signal),
    staleTime: 5 * 60_000,
  });
}

export function invitationPreviewQueryOptions(token: string) {
  return queryOptions({
    queryKey: authKeys.invitation(token),
    queryFn: ({ signal }) => api.get(`/api/invitations/${encodeURIComponent(token)}`, InvitationPreviewSchema, signal),
    staleTime: 60_000,
  });
}

export function useMe() {
  return useQuery(meQueryOptions());
}

export function useSetupStatus() {
  return useQuery(setupStatusQueryOptions());
}

export function useInvitationPreview(token: string) {
  return useQuery(invitationPreviewQueryOptions(token));
}

export function useSignIn() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: SignInBody) => api.post("/api/auth/sign-in", body, MeSchema),
    onSuccess: (me) => {
      // Nothing cached under the previous session may show through to this one.
      queryClient.clear();
      queryClient.setQueryData(authKeys.me(), me);
    },
  });
}

export function useSignOut() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api.post("/api/auth/sign-out"),
    onSuccess: () => {
      queryClient.clear();
      queryClient.setQueryData(authKeys.me(), null);
    },
  });
}

/** First account on an empty install. */
export function useSetup() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: SetupBody) => api.post("/api/setup", body, MeSchema),
    onSuccess: async (me) => {
      queryClient.setQueryData(authKeys.me(), me);
      await queryClient.invalidateQueries({ queryKey: authKeys.setupStatus() });
    },
  });
}

export function useChangePassword() {
  return useMutation({ mutationFn: (body: ChangePasswordBody) => api.post("/api/auth/password", body) });
}

export function useRequestReset() {
  return useMutation({ mutationFn: (body: RequestResetBody) => api.post("/api/auth/reset-request", body) });
}

export function useResetPassword() {
  return useMutation({ mutationFn: (body: ResetPasswordBody) => api.post("/api/auth/reset", body) });
}

export function useAcceptInvitation(token: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: AcceptInvitationBody) =>
      api.post(`/api/invitations/${encodeURIComponent(token)}/accept`, body, MeSchema),
    onSuccess: async (me) => {
      queryClient.setQueryData(authKeys.me(), me);
      // Used up now: drop it rather than refetch (the refetch would answer "expired" while the page moves on).
      queryClient.removeQueries({ queryKey: authKeys.invitation(token) });
    },
  });
}

/** Your membership (lab name and role) in `labId`, once "me" is loaded. */
export function useMembership(labId: string | undefined) {
  const me = useMe().data;
  return me?.memberships.find((m) => m.labId === labId);
}
