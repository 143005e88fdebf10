import { useState } from "react";
import { Link, useParams, type LoaderFunctionArgs } from "react-router-dom";
import { paths } from "@/config/paths";
import { queryClient } from "@/lib/query-client";
import { formatUtc } from "@/lib/format";
import { showToast } from "@/lib/toast";
import { canContribute, useMe } from "@/lib/session";
import { Button } from "@/components/ui/button";
import { EmptyState } from "@/components/ui/empty-state";
import { FlagLegend } from "@/components/ui/flag-badge";
import { KindLabel } from "@/components/ui/kind-label";
import { Loading } from "@/components/ui/loading";
import { PageHeader } from "@/components/ui/page-header";
import { Panel, Section } from "@/components/ui/section";
import { StateBadge } from "@/components/ui/state-badge";
import { datasetQueryOptions, useDataset } from "@/features/datasets/api/get-dataset";
import { EditDatasetForm } from "@/features/datasets/components/dataset-form";
import { VersionsTable } from "@/features/datasets/components/versions-table";
import { DatasetReleases } from "@/features/releases/components/dataset-releases";
import { FollowButton } from "@/features/releases/components/follow-button";
import { DatasetUploads } from "@/features/uploads/components/dataset-uploads";
import { VersionMap } from "@/features/plots/components/version-map";
import { LandingMain } from "@/features/catalogue/components/landing-main";

export function Component() {
  const { datasetId = "" } = useParams();
  const { data: d, isPending, error } = useDataset(datasetId);
  const { data: me } = useMe();
  const [editing, setEditing] = useState(false);
  if (isPending) return <Loading label="Loading the dataset…" />;
  if (error) throw error;
  const member = canContribute(me, d.projectId);
  const versions = (
    <Section title="Versions" description="Each version is built from an upload, checked, reviewed by a curator, then released unchanged.">
      {d.versions.length === 0 ? (
        <EmptyState title="No versions yet">
          {member ? "The first version is created when a logger file is uploaded and processed." : "Nothing has been released for this dataset yet."}
        </EmptyState>
      ) : (
        <VersionsTable
          items={d.versions}
          // Versions still being built (or that failed) open their progress page; built ones their review page.
          linkTo={member ? (v) => (["draft", "processing", "failed"].includes(v.state) ? paths.version(v.id) : paths.reviewVersion(v.id)) : undefined}
        />
      )}
    </Section>
  );

  return (
    <>
      <PageHeader
        eyebrow={
          <nav aria-label="Breadcrumb" className="flex flex-wrap gap-1">
            {member ? (
              <>
                <Link to={paths.project(d.projectId)}>{d.projectName}</Link> <span aria-hidden>/</span>
              </>
            ) : (
              <>
                <Link to={paths.catalogue()}>Catalogue</Link> <span aria-hidden>/</span> <span>{d.projectName}</span>
              </>
            )}
          </nav>
        }
        title={d.title}
        actions={
          <>
            {d.latestRelease || member ? <FollowButton datasetId={d.id} signedIn={!!me} /> : null}
            {member && !editing ? <Button variant="secondary" onClick={() => setEditing(true)}>Edit details</Button> : null}
          </>
        }
      />

      {editing ? (
        <Panel className="mb-8">
          <h2 className="mb-3 text-lg font-semibold">Edit dataset</h2>
          <EditDatasetForm
            dataset={d}
            onCancel={() => setEditing(false)}
            onDone={() => {
              setEditing(false);
              showToast("Dataset saved.", "success");
            }}
          />
        </Panel>
      ) : null}

      <div className="grid gap-8 lg:grid-cols-[1fr_20rem]">
        <div className="min-w-0 space-y-10">
          {d.description ? <p className="max-w-3xl whitespace-pre-line">{d.description}</p> : null}

          {/* Members come here to add the next file and follow its versions, so that comes first for them;
              visitors see the released data first. */}
          {member ? (
            <>
              {versions}
              <Section title="Uploads" description="Logger files for this dataset, checked by the server when they arrive. Stored once, never changed.">
                <div data-testid="uploads-area">
                  <DatasetUploads datasetId={d.id} canUpload={member} />
                </div>
              </Section>
              <LandingMain datasetId={d.id} />
            </>
          ) : (
            <>
              <LandingMain datasetId={d.id} />
              {versions}
            </>
          )}

          {(() => {
            // The map shows the newest version with records the caller may read (released ones for visitors).
            const mapVersion = [...d.versions].sort((a, b) => b.number - a.number).find((v) => ["ready", "in_review", "changes_requested", "rejected", "approved", "released", "superseded"].includes(v.state));
            return mapVersion ? (
              <Section
                title="Where"
                description={`Positions of version ${mapVersion.number} on an offline base map.`}
                action={<Link to={paths.versionExplore(mapVersion.id)}>Explore version {mapVersion.number}: plots, records, QC report</Link>}
              >
                <VersionMap versionId={mapVersion.id} height={320} />
              </Section>
            ) : null;
          })()}
        </div>

        <aside aria-label="Dataset details" className="space-y-4">
          <Panel>
            <h2 className="mb-3 font-semibold">Releases</h2>
            <DatasetReleases datasetId={d.id} />
          </Panel>
          <Panel>
            <h2 className="mb-3 font-semibold">Details</h2>
            <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-2 text-[0.95rem]">
              <dt className="text-muted">Project</dt>
              <dd>{d.projectName}</dd>
              <dt className="text-muted">Platform</dt>
              <dd>
                {d.platformName ?? "None (no deployment chosen)"}
                {d.platformKind ? (
                  <div className="text-sm text-muted">
                    <KindLabel kind={d.platformKind} />
                  </div>
                ) : null}
              </dd>
              <dt className="text-muted">Deployment</dt>
              <dd>{d.deploymentName ?? "—"}</dd>
              <dt className="text-muted">Licence</dt>
              <dd>{d.licence}</dd>
              <dt className="text-muted">Created</dt>
              <dd className="num">{formatUtc(d.createdAt)}</dd>
              <dt className="text-muted">Latest release</dt>
              <dd>
                {d.latestRelease ? (
                  <span className="inline-flex flex-wrap items-center gap-1.5">
                    <span className="num">v{d.latestRelease.number}</span> <StateBadge state={d.latestRelease.state} />
                  </span>
                ) : (
                  <span className="text-muted">none yet</span>
                )}
              </dd>
            </dl>
          </Panel>
          <Panel>
            <h2 className="mb-2 font-semibold">QC flags</h2>
            <p className="mb-3 text-sm text-muted">Every value carries one of these flags; derived values take the worst flag of their inputs.</p>
            <FlagLegend />
          </Panel>
        </aside>
      </div>
    </>
  );
}
/** Start fetching before render; errors surface in the component. */
export function loader({ params }: LoaderFunctionArgs) {
  void queryClient.prefetchQuery(datasetQueryOptions(params.datasetId ?? ""));
  return null;
}

export { RouteError as ErrorBoundary } from "@/components/layout/route-error";
