import { useState } from "react";
import { useNavigate } from "react-router-dom";
import { paths } from "@/config/paths";
import { getErrorMessage } from "@/lib/api-client";
import { useMe } from "@/lib/session";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { EmptyState } from "@/components/ui/empty-state";
import { Loading } from "@/components/ui/loading";
import { PageHeader } from "@/components/ui/page-header";
import { Panel } from "@/components/ui/section";
import { useProjects } from "@/features/projects/api/get-projects";
import { CreateProjectForm } from "@/features/projects/components/project-form";
import { ProjectList } from "@/features/projects/components/project-list";

export function Component() {
  const { data: me } = useMe();
  const { data, isPending, error } = useProjects();
  const [creating, setCreating] = useState(false);
  const navigate = useNavigate();
  const isAdmin = !!me?.user.isAdmin;

  return (
    <>
      <PageHeader
        title="My projects"
        description={isAdmin ? "As an administrator you see every project." : "Observing projects you belong to, with your role in each."}
        actions={
          isAdmin && !creating ? (
            <Button onClick={() => setCreating(true)}>New project</Button>
          ) : null
        }
      />
      {creating ? (
        <Panel className="mb-6">
          <h2 className="mb-3 text-lg font-semibold">New project</h2>
          <CreateProjectForm onCancel={() => setCreating(false)} onDone={(p) => navigate(paths.project(p.id))} />
        </Panel>
      ) : null}
      {isPending ? (
        <Loading label="Loading your projects…" />
      ) : error ? (
        <Alert tone="attention" title="Your projects could not be loaded">
          {getErrorMessage(error)}
        </Alert>
      ) : data.items.length === 0 ? (
        <EmptyState
          title="You are not in a project yet"
          action={isAdmin && !creating ? <Button onClick={() => setCreating(true)}>Create the first project</Button> : null}
        >
          {isAdmin
            ? "Create a project for an observing programme, then add its members."
            : "Ask an administrator to add you to your observing project as a contributor or curator. Meanwhile you can browse released data in the catalogue."}
        </EmptyState>
      ) : (
        <ProjectList items={data.items} />
      )}
    </>
  );
}
export { RouteError as ErrorBoundary } from "@/components/layout/route-error";
