import { Link, useParams, type LoaderFunctionArgs } from "react-router-dom";
import { CAUTION } from "@shared/compute/diagnostics";
import { paths } from "@/config/paths";
import { queryClient } from "@/lib/query-client";
import { Alert } from "@/components/ui/alert";
import { ButtonLink } from "@/components/ui/button";
import { EmptyState } from "@/components/ui/empty-state";
import { FlagLegend } from "@/components/ui/flag-badge";
import { Loading } from "@/components/ui/loading";
import { PageHeader } from "@/components/ui/page-header";
import { Panel, Section } from "@/components/ui/section";
import { StateBadge } from "@/components/ui/state-badge";
import { UtcTime } from "@/components/ui/utc-time";
import { useVersion, versionQueryOptions } from "@/features/versions/api/get-version";
import { BuildProgress } from "@/features/versions/components/build-progress";
import { CoverageTable, QcRunTable, VariableStatsTable } from "@/features/versions/components/qc-run-summary";

export function Component() {
  const { versionId = "" } = useParams();
  const { data: v, isPending, error } = useVersion(versionId);
  if (isPending) return <Loading label="Loading the version…" />;
  if (error) throw error;
  const built = v.summary !== null;

  return (
    <>
      <PageHeader
        eyebrow={
          <nav aria-label="Breadcrumb" className="flex flex-wrap gap-1">
            <Link to={paths.dataset(v.datasetId)}>{v.datasetTitle}</Link> <span aria-hidden>/</span>
          </nav>
        }
        title={
          <span className="flex flex-wrap items-center gap-3">
            Version <span className="num">{v.number}</span> <StateBadge state={v.state} />
          </span>
        }
        description={
          <span className="flex flex-wrap gap-x-4 gap-y-1">
            <span>
              {v.baseVersionNumber !== null ? (
                <>
                  Version <span className="num">{v.baseVersionNumber}</span> plus
                </>
              ) : (
                "Built from"
              )}{" "}
              upload “{v.uploadName ?? "—"}”
            </span>
            <span>
              Created <UtcTime iso={v.createdAt} /> {v.createdBy ? `by ${v.createdBy}` : null}
            </span>
          </span>
        }
        actions={
          built ? (
            <ButtonLink to={paths.versionExplore(v.id)} variant="primary" data-testid="explore-link">
              Explore: plots, records, QC report, map
            </ButtonLink>
          ) : null
        }
      />

      <div className="space-y-10">
        <Section title="Processing" description="Reading the upload through its column map, quality control, diagnostics and storage, in one step that either completes or leaves nothing behind.">
          <Panel>
            {v.progress ? <BuildProgress version={v} /> : <p className="text-sm text-muted">This version has no processing run.</p>}
          </Panel>
        </Section>

        {built ? (
          <>
            <Section title="Time coverage and gaps" description="All times UTC.">
              <CoverageTable summary={v.summary!} />
            </Section>
            <Section
              title="Variables"
              description="Canonical units. Statistics use values flagged pass or not evaluated; counts cover every record of this version."
              action={<FlagLegend />}
            >
              <VariableStatsTable summary={v.summary!} />
            </Section>
            {v.qcRun ? (
              <Section title="QC run" description="Tests that raised a flag, counted over the records this build read (for an append: the new upload and the re-checked record at the seam).">
                <QcRunTable run={v.qcRun} />
              </Section>
            ) : null}
            <Alert tone="info" title="Diagnostics are estimates">
              {CAUTION}
            </Alert>
          </>
        ) : v.state === "processing" ? (
          <EmptyState title="Summaries appear when processing is done">Statistics, flag counts, coverage and gaps are computed from the stored records at the end of processing.</EmptyState>
        ) : null}
      </div>
    </>
  );
}

/** Start fetching before render. */
export async function loader({ params }: LoaderFunctionArgs) {
  void queryClient.prefetchQuery(versionQueryOptions(params.versionId ?? ""));
  return null;
}

export { RouteError as ErrorBoundary } from "@/components/layout/route-error";
