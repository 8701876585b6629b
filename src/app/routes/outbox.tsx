import type { QueryClient } from "@tanstack/react-query";
import { data, isRouteErrorResponse, useParams, useRouteError } from "react-router-dom";
import { ErrorNotice } from "@/components/ui/alert";
import { Card } from "@/components/ui/card";
import { EmptyState } from "@/components/ui/empty-state";
import { MailIcon } from "@/components/ui/icons";
import { NotFoundPanel } from "@/components/ui/not-found-panel";
import { PageHeader } from "@/components/ui/page-header";
import { LoadingBlock } from "@/components/ui/spinner";
import { meQueryOptions, setupStatusQueryOptions } from "@/features/auth/api";
import { outboxQueryOptions, useOutbox } from "@/features/outbox/api";
import { MessageList } from "@/features/outbox/components/message-list";
import { MessageView } from "@/features/outbox/components/message-view";

/** Only site administrators, and only while the built-in fake mail server is on; others get the 404 they would get from the API. */
export const loader = (queryClient: QueryClient) => async () => {
  const [me, status] = await Promise.all([
    queryClient.ensureQueryData(meQueryOptions()),
    queryClient.ensureQueryData(setupStatusQueryOptions()),
  ]);
  if (!me?.user.isSiteAdmin || !status.fakeMail) throw data("No outbox", { status: 404 });
  await queryClient.prefetchQuery(outboxQueryOptions());
  return null;
};

export function Component() {
  const { messageId } = useParams();
  const outbox = useOutbox();
  const selected = outbox.data?.find((m) => m.id === messageId);
  return (
    <>
      <title>Outbox · Thetafold</title>
      <PageHeader
        title="Outbox"
        description="Mail this install sent while the built-in test mail server is on: nothing leaves the machine, so invitations and password resets are read here."
      />
      {outbox.isPending && <LoadingBlock label="Loading messages…" />}
      {outbox.isError && <ErrorNotice title="Could not load the outbox" error={outbox.error} onRetry={() => void outbox.refetch()} />}
      {outbox.data && outbox.data.length === 0 && (
        <EmptyState illustration={<MailIcon />} title="No mail yet">
          <p>Invitations and password-reset messages appear here the moment they are sent. Invite someone from a lab's Lab page to see one.</p>
        </EmptyState>
      )}
      {outbox.data && outbox.data.length > 0 && (
        <Card className="grid overflow-hidden md:grid-cols-[20rem_minmax(0,1fr)]">
          <div className="max-h-[70vh] overflow-y-auto border-b border-line md:border-r md:border-b-0">
            <MessageList messages={outbox.data} />
          </div>
          <div className="min-w-0 p-5">
            {selected ? (
              <MessageView message={selected} />
            ) : messageId ? (
              <p className="text-sm text-ink-muted">That message is no longer in the outbox.</p>
            ) : (
              <p className="text-sm text-ink-muted">Pick a message on the left to read it.</p>
            )}
          </div>
        </Card>
      )}
    </>
  );
}

export function ErrorBoundary() {
  const error = useRouteError();
  if (isRouteErrorResponse(error) && error.status === 404) return <NotFoundPanel />;
  return <ErrorNotice title="The outbox ran into a problem" error={error} onRetry={() => window.location.reload()} />;
}
