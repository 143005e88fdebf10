import { getErrorMessage } from "@/lib/api-client";
import { Alert } from "@/components/ui/alert";
import { EmptyState } from "@/components/ui/empty-state";
import { Loading } from "@/components/ui/loading";
import { PageHeader } from "@/components/ui/page-header";
import { useReviewQueue } from "@/features/review/api/get-review-queue";
import { ReviewTable } from "@/features/review/components/review-table";

export function Component() {
  const { data, isPending, error } = useReviewQueue();
  return (
    <>
      <PageHeader
        title="Review queue"
        description="Versions submitted in your projects that wait for a curator. You can review only versions uploaded by someone else."
      />
      {isPending ? (
        <Loading label="Loading the review queue…" />
      ) : error ? (
        <Alert tone="attention" title="The review queue could not be loaded">
          {getErrorMessage(error)}
        </Alert>
      ) : data.items.length === 0 ? (
        <EmptyState title="Nothing to review">
          When a contributor submits a processed version, it appears here. Open it to compare with the previous version, then approve it or ask for
          changes with a reason.
        </EmptyState>
      ) : (
        <ReviewTable items={data.items} />
      )}
    </>
  );
}
export { RouteError as ErrorBoundary } from "@/components/layout/route-error";
