import type { QueryClient } from "@tanstack/react-query";
import { redirect, useNavigate } from "react-router-dom";
import { AuthFrame } from "@/components/ui/auth-frame";
import { Button } from "@/components/ui/button";
import { meQueryOptions, setupStatusQueryOptions, useMe, useSignOut } from "@/features/auth/api";
import { pickLab } from "@/features/auth/utils";
import { readLastLab } from "@/lib/last-lab";

/** "/" sends people where they belong: first-run setup, sign-in, or their lab. */
export const loader = (queryClient: QueryClient) => async () => {
  const status = await queryClient.ensureQueryData(setupStatusQueryOptions());
  if (status.needsSetup) return redirect("/setup");
  const me = await queryClient.ensureQueryData(meQueryOptions());
  if (!me) return redirect("/sign-in");
  const labId = pickLab(me, readLastLab());
  if (labId) return redirect(`/labs/${encodeURIComponent(labId)}/samples`);
  return null;
};

/** Signed in, but no lab (the last membership was removed). */
export function Component() {
  const me = useMe().data;
  const signOut = useSignOut();
  const navigate = useNavigate();
  return (
    <AuthFrame
      title="You are not in a lab yet"
      description={
        <>
          {me ? <>Signed in as {me.user.email}. </> : null}
          Thetafold keeps samples, runs and fits per lab. Ask a lab lead to invite this address; the e-mail has a link that
          adds you.
        </>
      }
    >
      <Button variant="secondary" pending={signOut.isPending} onClick={() => signOut.mutate(undefined, { onSuccess: () => navigate("/sign-in") })}>
        Sign out
      </Button>
    </AuthFrame>
  );
}
