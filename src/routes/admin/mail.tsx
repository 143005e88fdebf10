import { useParams } from "react-router-dom";
import { getErrorMessage } from "@/lib/api-client";
import { Alert } from "@/components/ui/alert";
import { EmptyState } from "@/components/ui/empty-state";
import { Loading } from "@/components/ui/loading";
import { PageHeader } from "@/components/ui/page-header";
import { useMail } from "@/features/admin/api/get-mail";
import { MailList, MailMessageView } from "@/features/admin/components/mail-box";

export function Component() {
  const { messageId } = useParams();
  const { data, isPending, error } = useMail();
  const selected = messageId ? data?.items.find((m) => m.id === messageId) : undefined;
  return (
    <>
      <PageHeader
        title="Outgoing mail"
        description="Every e-mail Tauline has sent — verification links, password resets, review notices — kept by the local mail server. Nothing leaves this machine."
      />
      {isPending ? (
        <Loading label="Loading messages…" />
      ) : error ? (
        <Alert tone="attention" title="Messages could not be loaded">
          {getErrorMessage(error)}
        </Alert>
      ) : data.items.length === 0 ? (
        <EmptyState title="No e-mail sent yet">Messages appear here when someone signs up, asks for a password reset or a review decision is made.</EmptyState>
      ) : (
        <div className="grid gap-4 lg:grid-cols-[22rem_1fr]">
          <MailList items={data.items} selectedId={messageId} />
          <div className="min-w-0">
            {selected ? (
              <MailMessageView message={selected} />
            ) : messageId ? (
              <Alert tone="attention" title="Message not found">
                It may have been cleared from the mailbox. Choose another message from the list.
              </Alert>
            ) : (
              <p className="rounded-lg border border-dashed border-line px-5 py-8 text-center text-muted">Choose a message to read it.</p>
            )}
          </div>
        </div>
      )}
    </>
  );
}
export { RouteError as ErrorBoundary } from "@/components/layout/route-error";
