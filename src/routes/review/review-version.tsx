import { Link, useParams } from "react-router-dom";
import type { LoaderFunctionArgs } from "react-router-dom";
import { paths } from "@/config/paths";
import { queryClient } from "@/lib/query-client";
import { formatUtc } from "@/lib/format";
import { Alert } from "@/components/ui/alert";
import { ButtonLink } from "@/components/ui/button";
import { Loading } from "@/components/ui/loading";
import { PageHeader } from "@/components/ui/page-header";
import { Panel, Section } from "@/components/ui/section";
import { StateBadge } from "@/components/ui/state-badge";
import { useVersionReview, versionReviewQueryOptions } from "@/features/review/api/get-version-review";
import { CommentThread } from "@/features/review/components/comment-thread";
import { DecisionPanel } from "@/features/review/components/decision-panel";
import { QcSummary } from "@/features/review/components/qc-summary";
import { StateHistory } from "@/features/review/components/state-history";
import { VersionComparison } from "@/features/review/components/version-comparison";
import { ReleasePanel, RetractPanel } from "@/features/releases/components/release-panel";
import { useDataset } from "@/features/datasets/api/get-dataset";

export async function loader({ params }: LoaderFunctionArgs) {
  void queryClient.prefetchQuery(versionReviewQueryOptions(params.versionId ?? ""));
  return null;
}

export function Component() {
  const { versionId = "" } = useParams();
  const { data: r, isPending, error } = useVersionReview(versionId);
  const dataset = useDataset(r?.version.datasetId ?? "");
  if (isPending) return <Loading label="Loading the version…" />;
  if (error) throw error;
  const v = r.version;

  return (
    <>
      <PageHeader
        eyebrow={
          <nav aria-label="Breadcrumb" className="flex flex-wrap gap-1">
            <Link to={paths.project(v.projectId)}>{v.projectName}</Link> <span aria-hidden>/</span>
            <Link to={paths.dataset(v.datasetId)}>{v.datasetTitle}</Link>
          </nav>
        }
        title={
          <span className="inline-flex flex-wrap items-center gap-3">
            Version {v.number} <StateBadge state={v.state} />
          </span>
        }
        description={
          r.permissions.canDecide
            ? `${v.datasetTitle}. Check the QC summary and what changed since the previous version, then decide.`
            : `${v.datasetTitle}: QC summary, changes since the previous version, and the review so far.`
        }
        actions={
          <ButtonLink to={paths.versionExplore(v.id)} variant="secondary">
            Plots, records and map
          </ButtonLink>
        }
      />

      <div className="grid gap-8 lg:grid-cols-[minmax(0,1fr)_22rem]">
        <div className="min-w-0 space-y-10">
          <Section title="QC summary" description="Flags per variable over the whole version; the tests behind suspect and failed values.">
            <QcSummary review={r} />
          </Section>
          <Section title="Changes since the previous version" description="Records compared row by row; statistics and coverage side by side.">
            <VersionComparison review={r} />
          </Section>
          <Section title="Comments">
            <CommentThread versionId={v.id} canComment={r.permissions.canComment} />
          </Section>
        </div>

        <aside aria-label="Decision and history" className="space-y-6">
          <DecisionPanel review={r} />
          {r.permissions.canRelease ? <ReleasePanel review={r} defaultLicence={dataset.data?.licence} /> : null}
          {r.releaseId ? (
            <Alert tone={v.state === "retracted" ? "attention" : "success"} title={v.state === "retracted" ? "This release was retracted" : "Released"}>
              <Link to={paths.release(r.releaseId)}>Open the release page</Link> for the citation and checksums.
            </Alert>
          ) : null}
          {r.permissions.canRetract ? <RetractPanel versionId={v.id} /> : null}
          <Panel>
            <h2 className="mb-3 font-semibold">About this version</h2>
            <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-2 text-[0.95rem]">
              <dt className="text-muted">Built by</dt>
              <dd>{v.createdByName ?? "—"}</dd>
              <dt className="text-muted">Uploaded by</dt>
              <dd>{v.uploaderName ?? "—"}</dd>
              <dt className="text-muted">File</dt>
              <dd className="break-all">{v.uploadName ?? "—"}</dd>
              <dt className="text-muted">Created</dt>
              <dd className="num">{formatUtc(v.createdAt)}</dd>
              <dt className="text-muted">State since</dt>
              <dd className="num">{formatUtc(v.stateChangedAt)}</dd>
            </dl>
          </Panel>
          <Panel>
            <h2 className="mb-3 font-semibold">History</h2>
            <StateHistory entries={r.history} />
          </Panel>
        </aside>
      </div>
    </>
  );
}
export { RouteError as ErrorBoundary } from "@/components/layout/route-error";
