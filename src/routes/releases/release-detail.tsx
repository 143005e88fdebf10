import { Link, useParams } from "react-router-dom";
import { paths } from "@/config/paths";
import { formatUtc } from "@/lib/format";
import { useMe } from "@/lib/session";
import { Alert } from "@/components/ui/alert";
import { Loading } from "@/components/ui/loading";
import { PageHeader } from "@/components/ui/page-header";
import { Panel, Section } from "@/components/ui/section";
import { StateBadge } from "@/components/ui/state-badge";
import { useRelease } from "@/features/releases/api/releases";
import { FollowButton } from "@/features/releases/components/follow-button";
import { Citation, ReleaseFacts, ReleaseFiles } from "@/features/releases/components/release-details";

/** A release's public page; once retracted, its tombstone (reason, citation, checksums). */
export function Component() {
  const { releaseId = "" } = useParams();
  const { data: r, isPending, error } = useRelease(releaseId);
  const { data: me } = useMe();
  if (isPending) return <Loading label="Loading the release…" />;
  if (error) throw error;
  const retracted = r.retracted;

  return (
    <>
      <PageHeader
        eyebrow={
          <nav aria-label="Breadcrumb" className="flex flex-wrap gap-1">
            <span>{r.projectName}</span> <span aria-hidden>/</span>
            {retracted && !r.dataAvailable ? <span>{r.datasetTitle}</span> : <Link to={paths.dataset(r.datasetId)}>{r.datasetTitle}</Link>}
          </nav>
        }
        title={
          <span className="inline-flex flex-wrap items-center gap-3">
            {retracted ? "Retracted release" : "Release"} {r.releaseNumber} · version {r.versionNumber} <StateBadge state={r.versionState} />
          </span>
        }
        description={r.datasetTitle}
        actions={!retracted ? <FollowButton datasetId={r.datasetId} signedIn={!!me} /> : null}
      />

      {retracted ? (
        <Alert tone="attention" title={`Retracted on ${formatUtc(retracted.at)}${retracted.byName ? ` by ${retracted.byName}` : ""}`} className="mb-8">
          <p className="whitespace-pre-line" data-testid="retraction-reason">
            {retracted.reason}
          </p>
          <p className="mt-2 text-sm">
            {r.dataAvailable
              ? "As a member of the project you can still open the data, for checking only. Do not use it for new work."
              : "The data of this release is no longer offered. The citation and checksums stay here so existing uses can be traced."}
          </p>
        </Alert>
      ) : r.versionState === "superseded" ? (
        <Alert tone="info" className="mb-8" title="A newer release exists">
          This release is still citable and unchanged. <Link to={paths.dataset(r.datasetId)}>Open the dataset</Link> for its latest release.
        </Alert>
      ) : null}

      <div className="grid gap-8 lg:grid-cols-[minmax(0,1fr)_22rem]">
        <div className="min-w-0 space-y-10">
          <Section title="Citation">
            <Citation release={r} />
          </Section>
          {r.notes ? (
            <Section title="Release notes">
              <p className="max-w-3xl whitespace-pre-line">{r.notes}</p>
            </Section>
          ) : null}
          <Section title="Files and checksums" description="Compute the SHA-256 of a downloaded file and compare it with the value here.">
            <ReleaseFiles release={r} />
          </Section>
        </div>
        <aside aria-label="Release details">
          <Panel>
            <h2 className="mb-3 font-semibold">Details</h2>
            <ReleaseFacts release={r} />
          </Panel>
        </aside>
      </div>
    </>
  );
}
export { RouteError as ErrorBoundary } from "@/components/layout/route-error";
