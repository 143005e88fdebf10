import { useState } from "react";
import { Link, useParams, type LoaderFunctionArgs } from "react-router-dom";
import type { Deployment } from "@shared/schemas/platforms";
import { paths } from "@/config/paths";
import { queryClient } from "@/lib/query-client";
import { getErrorMessage } from "@/lib/api-client";
import { showToast } from "@/lib/toast";
import { canContribute, useMe } from "@/lib/session";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { EmptyState } from "@/components/ui/empty-state";
import { KindLabel } from "@/components/ui/kind-label";
import { Loading } from "@/components/ui/loading";
import { PageHeader } from "@/components/ui/page-header";
import { Panel, Section } from "@/components/ui/section";
import { useProject } from "@/features/projects/api/get-project";
import { platformQueryOptions, usePlatform } from "@/features/platforms/api/get-platform";
import { EditPlatformForm } from "@/features/platforms/components/platform-form";
import { deploymentsQueryOptions, useDeployments } from "@/features/deployments/api/get-deployments";
import { DeploymentForm } from "@/features/deployments/components/deployment-form";
import { DeploymentTable } from "@/features/deployments/components/deployment-table";
import { QcThresholdsEditor } from "@/features/deployments/components/qc-thresholds-editor";

type Editing = { mode: "create" } | { mode: "edit"; deployment: Deployment } | { mode: "thresholds"; deployment: Deployment } | null;

export function Component() {
  const { platformId = "" } = useParams();
  const { data: platform, isPending, error } = usePlatform(platformId);
  const project = useProject(platform?.projectId ?? "");
  const deployments = useDeployments(platformId);
  const { data: me } = useMe();
  const [editing, setEditing] = useState<Editing>(null);
  const [editingPlatform, setEditingPlatform] = useState(false);

  if (isPending) return <Loading label="Loading the platform…" />;
  if (error) throw error;
  const canEdit = canContribute(me, platform.projectId) || project.data?.myRole != null;

  return (
    <>
      <PageHeader
        eyebrow={
          <nav aria-label="Breadcrumb" className="flex flex-wrap gap-1">
            <Link to={paths.projects()}>My projects</Link> <span aria-hidden>/</span>
            <Link to={paths.project(platform.projectId)}>{project.data?.name ?? "Project"}</Link> <span aria-hidden>/</span>
          </nav>
        }
        title={platform.name}
        description={
          <span className="flex flex-wrap items-center gap-x-4 gap-y-1">
            <KindLabel kind={platform.kind} />
            <span>
              WMO number: <span className="num">{platform.wmoNumber ?? "none"}</span>
            </span>
          </span>
        }
        actions={canEdit && !editingPlatform ? <Button variant="secondary" onClick={() => setEditingPlatform(true)}>Edit platform</Button> : null}
      />
      {platform.description && !editingPlatform ? <p className="-mt-3 mb-6 max-w-3xl">{platform.description}</p> : null}
      {editingPlatform ? (
        <Panel className="mb-8">
          <h2 className="mb-3 text-lg font-semibold">Edit platform</h2>
          <EditPlatformForm
            platform={platform}
            onCancel={() => setEditingPlatform(false)}
            onDone={() => {
              setEditingPlatform(false);
              showToast("Platform saved.", "success");
            }}
          />
        </Panel>
      ) : null}

      <Section
        title="Deployments"
        description="Each period at sea: where, how deep, and where the sensors sit. Times are UTC."
        action={canEdit && editing === null ? <Button onClick={() => setEditing({ mode: "create" })}>New deployment</Button> : null}
      >
        {editing?.mode === "thresholds" ? (
          <Panel>
            <h3 className="mb-3 font-semibold">QC thresholds of “{editing.deployment.name}”</h3>
            <QcThresholdsEditor deploymentId={editing.deployment.id} deploymentName={editing.deployment.name} canEdit={canEdit} onClose={() => setEditing(null)} />
          </Panel>
        ) : editing ? (
          <Panel>
            <h3 className="mb-3 font-semibold">{editing.mode === "create" ? "New deployment" : `Edit deployment “${editing.deployment.name}”`}</h3>
            <DeploymentForm
              key={editing.mode === "edit" ? editing.deployment.id : "new"}
              platformId={platformId}
              kind={platform.kind}
              deployment={editing.mode === "edit" ? editing.deployment : undefined}
              onCancel={() => setEditing(null)}
              onDone={(d) => {
                showToast(editing.mode === "create" ? `Deployment “${d.name}” created.` : `Deployment “${d.name}” saved.`, "success");
                setEditing(null);
              }}
            />
          </Panel>
        ) : null}
        {deployments.isPending ? (
          <Loading />
        ) : deployments.error ? (
          <Alert tone="attention">{getErrorMessage(deployments.error)}</Alert>
        ) : deployments.data.items.length === 0 ? (
          <EmptyState title="No deployments yet">
            {canEdit
              ? "Record each period at sea with “New deployment”: start time, position, water depth and sensor heights. Datasets are then created per deployment."
              : "Contributors of this project record deployments here."}
          </EmptyState>
        ) : (
          <DeploymentTable
            items={deployments.data.items}
            onEdit={canEdit ? (d) => setEditing({ mode: "edit", deployment: d }) : undefined}
            onThresholds={(d) => setEditing({ mode: "thresholds", deployment: d })}
          />
        )}
      </Section>
    </>
  );
}
/** Start fetching before render; errors surface in the component, where the session check runs first. */
export function loader({ params }: LoaderFunctionArgs) {
  const id = params.platformId ?? "";
  void queryClient.prefetchQuery(platformQueryOptions(id));
  void queryClient.prefetchQuery(deploymentsQueryOptions(id));
  return null;
}

export { RouteError as ErrorBoundary } from "@/components/layout/route-error";
