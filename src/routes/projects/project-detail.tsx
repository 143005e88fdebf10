import { useState } from "react";
import { Link, useNavigate, useParams, type LoaderFunctionArgs } from "react-router-dom";
import { paths } from "@/config/paths";
import { queryClient } from "@/lib/query-client";
import { getErrorMessage } from "@/lib/api-client";
import { canContribute, roleIn, useMe } from "@/lib/session";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { EmptyState } from "@/components/ui/empty-state";
import { Loading } from "@/components/ui/loading";
import { PageHeader } from "@/components/ui/page-header";
import { Panel, Section } from "@/components/ui/section";
import { RoleBadge } from "@/components/ui/state-badge";
import { projectQueryOptions, useProject } from "@/features/projects/api/get-project";
import { platformsQueryOptions, usePlatforms } from "@/features/platforms/api/get-platforms";
import { CreatePlatformForm } from "@/features/platforms/components/platform-form";
import { PlatformTable } from "@/features/platforms/components/platform-table";
import { useDeploymentOptions } from "@/features/deployments/api/get-deployment-options";
import { datasetsQueryOptions, useDatasets } from "@/features/datasets/api/get-datasets";
import { EditProjectForm } from "@/features/projects/components/project-form";
import { showToast } from "@/lib/toast";
import { CreateDatasetForm } from "@/features/datasets/components/dataset-form";
import { DatasetTable } from "@/features/datasets/components/dataset-table";
import { useMembers } from "@/features/members/api/get-members";
import { AddMemberForm, MembersTable } from "@/features/members/components/members-panel";
import { ArrayDiagnosticsSection } from "@/features/array-diagnostics/components/array-diagnostics-section";

function PlatformsSection({ projectId, canAdd }: { projectId: string; canAdd: boolean }) {
  const { data, isPending, error } = usePlatforms(projectId);
  const [creating, setCreating] = useState(false);
  const navigate = useNavigate();
  return (
    <Section
      title="Platforms"
      description="Moorings and drifters of this project."
      action={canAdd && !creating ? <Button onClick={() => setCreating(true)}>New platform</Button> : null}
    >
      {creating ? (
        <Panel>
          <h3 className="mb-3 font-semibold">New platform</h3>
          <CreatePlatformForm projectId={projectId} onCancel={() => setCreating(false)} onDone={(p) => navigate(paths.platform(p.id))} />
        </Panel>
      ) : null}
      {isPending ? (
        <Loading />
      ) : error ? (
        <Alert tone="attention">{getErrorMessage(error)}</Alert>
      ) : data.items.length === 0 ? (
        <EmptyState title="No platforms yet">
          {canAdd ? "Add each mooring or drifter with “New platform”; then record its deployments." : "Contributors of this project add moorings and drifters here."}
        </EmptyState>
      ) : (
        <PlatformTable items={data.items} />
      )}
    </Section>
  );
}

function DatasetsSection({ projectId, canAdd }: { projectId: string; canAdd: boolean }) {
  const { data, isPending, error } = useDatasets(projectId);
  const [creating, setCreating] = useState(false);
  const navigate = useNavigate();
  const deploymentOptions = useDeploymentOptions(projectId, creating);
  return (
    <Section
      title="Datasets"
      description="Curated series, one per deployment or drifter fleet. Each has numbered versions."
      action={canAdd && !creating ? <Button onClick={() => setCreating(true)}>New dataset</Button> : null}
    >
      {creating ? (
        <Panel>
          <h3 className="mb-3 font-semibold">New dataset</h3>
          <CreateDatasetForm
            projectId={projectId}
            deploymentOptions={deploymentOptions}
            onCancel={() => setCreating(false)}
            onDone={(d) => navigate(paths.dataset(d.id))}
          />
        </Panel>
      ) : null}
      {isPending ? (
        <Loading />
      ) : error ? (
        <Alert tone="attention">{getErrorMessage(error)}</Alert>
      ) : data.items.length === 0 ? (
        <EmptyState title="No datasets yet">
          {canAdd
            ? "Create a dataset for a deployment with “New dataset”. Uploads and versions then live on the dataset's page."
            : "Contributors of this project create datasets here."}
        </EmptyState>
      ) : (
        <DatasetTable items={data.items} />
      )}
    </Section>
  );
}

function MembersSection({ projectId, canManage }: { projectId: string; canManage: boolean }) {
  const { data, isPending, error } = useMembers(projectId);
  return (
    <Section
      title="Members"
      description="Contributors upload and prepare versions; curators review versions uploaded by someone else and release them."
    >
      {canManage ? <AddMemberForm projectId={projectId} /> : null}
      {isPending ? (
        <Loading />
      ) : error ? (
        <Alert tone="attention">{getErrorMessage(error)}</Alert>
      ) : (
        <MembersTable projectId={projectId} items={data.items} canManage={canManage} />
      )}
    </Section>
  );
}

export function Component() {
  const { projectId = "" } = useParams();
  const { data: project, isPending, error } = useProject(projectId);
  const { data: me } = useMe();
  const [editing, setEditing] = useState(false);
  if (isPending) return <Loading label="Loading the project…" />;
  if (error) throw error;
  const role = roleIn(me, projectId) ?? project.myRole;
  const isAdmin = !!me?.user.isAdmin;
  const contribute = canContribute(me, projectId) || role !== null;
  const canEditProject = isAdmin || role === "curator";

  return (
    <>
      <PageHeader
        eyebrow={
          <nav aria-label="Breadcrumb">
            <Link to={paths.projects()}>My projects</Link> <span aria-hidden>/</span>
          </nav>
        }
        title={project.name}
        description={
          <>
            <span className="num text-sm">{project.slug}</span>
            {role ? (
              <span className="ml-2 inline-flex items-center gap-1 text-sm">
                Your role: <RoleBadge role={role} />
              </span>
            ) : isAdmin ? (
              <span className="ml-2 text-sm">You see this project as administrator.</span>
            ) : null}
            {project.description ? <p className="mt-2">{project.description}</p> : null}
          </>
        }
        actions={canEditProject && !editing ? <Button variant="secondary" onClick={() => setEditing(true)}>Edit project</Button> : null}
      />
      {editing ? (
        <Panel className="mb-8">
          <h2 className="mb-3 text-lg font-semibold">Edit project</h2>
          <EditProjectForm
            project={project}
            onCancel={() => setEditing(false)}
            onDone={() => {
              setEditing(false);
              showToast("Project saved.", "success");
            }}
          />
        </Panel>
      ) : null}
      {project.counts ? (
        <dl className="mb-8 grid grid-cols-3 gap-3 sm:max-w-lg">
          {(
            [
              ["Platforms", project.counts.platforms],
              ["Datasets", project.counts.datasets],
              ["Members", project.counts.members],
            ] as const
          ).map(([k, n]) => (
            <div key={k} className="rounded-lg border border-line bg-surface px-3 py-2">
              <dt className="text-sm text-muted">{k}</dt>
              <dd className="num text-xl">{n}</dd>
            </div>
          ))}
        </dl>
      ) : null}
      {!contribute && !isAdmin ? (
        <Alert className="mb-6" tone="info">
          You can look at this project but not change it. Ask an administrator to add you as a contributor.
        </Alert>
      ) : null}
      <div className="space-y-10">
        <PlatformsSection projectId={projectId} canAdd={contribute} />
        <DatasetsSection projectId={projectId} canAdd={contribute} />
        <ArrayDiagnosticsSection projectId={projectId} />
        <MembersSection projectId={projectId} canManage={isAdmin} />
      </div>
    </>
  );
}
/** Start fetching before render; errors surface in the component, where the session check runs first. */
export function loader({ params }: LoaderFunctionArgs) {
  const id = params.projectId ?? "";
  void queryClient.prefetchQuery(projectQueryOptions(id));
  void queryClient.prefetchQuery(platformsQueryOptions(id));
  void queryClient.prefetchQuery(datasetsQueryOptions(id));
  return null;
}

export { RouteError as ErrorBoundary } from "@/components/layout/route-error";
